// The Weyl engine (weyl_engine.hpp).
//
// Rotations. A rotation U(T) = exp(-i T a^dag a) of the state before measurement j (T = delta t
// for a frequency offset delta: H = delta a^dag a) satisfies U^dag D(b) U = D(b e^{iT}), and
// the phase-insensitive channels commute with U. Moving every rotation to the front of the
// sequence therefore turns measurement j into one with beta_j e^{i Theta_j}, Theta_j the
// cumulative angle at t_j; the leftover U on the far left cancels in the trace. For a
// rotation-invariant state Theta_0 can be taken out as well (only Theta_j - Theta_0 matter).
//   Theta_j = delta t_j + sum_{i <= j} eps_i,  delta ~ N(0, sigma^2) (one per shot),
//   eps_i ~ N(0, kappa dt_i) independently per interval (kappa D[a^dag a] over dt is a random
//   rotation of angle variance kappa dt: both damp rho_mn by exp(-kappa dt (m-n)^2 / 2)).
// The sign of delta is irrelevant for the average (the distribution is symmetric).
//
// Quadrature: probabilists' Gauss-Hermite rules (weight N(0,1), hermite_rule.hpp), one standard
// normal z_d per angle source, Theta_j = sum_d coeff[d][j] z_d. The integrand is an entire but
// doubly-exponentially growing function of z (e.g. cos(A sin(s z))), for which Gauss-Hermite
// converges slowly once the angle spread s reaches ~0.8 rad: reaching 1e-12 then needs more
// than 96 nodes (hence the default limit of 384 for one or two angles), and the engine refuses
// rather than return an unconverged value.
#include "phase_space/weyl_engine.hpp"

#include <algorithm>
#include <cmath>
#include <string>

#include "core/error.hpp"
#include "phase_space/hermite_rule.hpp"
#include "phase_space/measurement_maps.hpp"
#include "phase_space/number_text.hpp"
#include "phase_space/sliced_measurement.hpp"

namespace macroreal {

namespace {

enum class Plan { probability, correlator, last_average };

struct Job {
  const MeasurementSequence* seq;
  std::size_t k;                  // steps performed
  Plan plan;
  const OutcomeString* outcomes;  // for Plan::probability
};

// Re <E> for the effect operator of the job, with measurement j's beta rotated by
// rot[j] = e^{i Theta_j} (rot == nullptr: no rotation); measurements with duration_s > 0 are
// applied in `slices` slices (sliced_measurement.hpp; never combined with rotations).
double evaluate(const State& state, const Job& job, const cplx* rot, int slices = 0) {
  // Reused buffers: after the first call the inner loop does not allocate.
  thread_local WeylSum cur, next;
  auto& steps = job.seq->steps;
  cur.mutable_terms().clear();
  cur.add(1.0, 0.0);
  for (std::size_t j = job.k; j-- > 0;) {
    ModularMeasurement m = steps[j].measurement;
    if (rot) m.beta *= rot[j];
    detail::EffectMode mode = detail::EffectMode::signed_sum;
    int o = 0;
    if (job.plan == Plan::probability) {
      mode = detail::EffectMode::outcome;
      o = (*job.outcomes)[j];
    } else if (job.plan == Plan::last_average && j + 1 != job.k) {
      mode = detail::EffectMode::unselective;
    }
    next.mutable_terms().clear();
    if (slices > 0 && steps[j].duration_s > 0.0)
      detail::apply_sliced_effect_map(m, mode, o, job.seq->noise, steps[j].duration_s, slices,
                                      cur.terms(), next.mutable_terms());
    else
      detail::apply_effect_map(m, mode, o, cur.terms(), next.mutable_terms(), false);
    next.merge();
    // Free evolution from the end of the previous interaction (validate() allows a 1e-12
    // relative overlap from decimal round-off; it is clamped here).
    const double t_prev = j == 0 ? 0.0 : steps[j - 1].end_s();
    GaussianChannel::over(job.seq->noise, std::max(0.0, steps[j].time_s - t_prev))
        .apply_adjoint(next);
    std::swap(cur, next);
  }
  return state.expectation(cur).real();
}

// Keeps round-off inside the range; a value far outside is left raw (it would be a bug, and
// hiding it would hide the bug).
double clamp_round_off(double v, double lo, double hi) {
  constexpr double kSlack = 1e-12;
  if (v < lo && v >= lo - kSlack) return lo;
  if (v > hi && v <= hi + kSlack) return hi;
  return v;
}

struct RotationDimensions {
  // Theta_j = sum_d coeff[d][j] z_d with z_d independent standard normals.
  std::vector<std::vector<double>> coeff;
};

RotationDimensions rotation_dimensions(const State& state, const Job& job) {
  RotationDimensions r;
  const auto& steps = job.seq->steps;
  const auto& noise = job.seq->noise;
  const std::size_t k = job.k;
  if (k == 0) return r;
  const bool invariant = state.rotation_invariant();
  const double t_ref = invariant ? steps[0].time_s : 0.0;
  const double sigma = noise.frequency_noise_sd_rad_per_s;
  if (sigma > 0.0) {
    std::vector<double> a(k);
    bool any = false;
    for (std::size_t j = 0; j < k; ++j) {
      a[j] = sigma * (steps[j].time_s - t_ref);
      any = any || a[j] != 0.0;
    }
    if (any) r.coeff.push_back(std::move(a));
  }
  const double kappa = noise.dephasing_rate_per_s;
  if (kappa > 0.0) {
    for (std::size_t i = invariant ? 1 : 0; i < k; ++i) {
      const double dt = steps[i].time_s - (i == 0 ? 0.0 : steps[i - 1].time_s);
      if (!(kappa * dt > 0.0)) continue;
      std::vector<double> a(k, 0.0);
      const double s = std::sqrt(kappa * dt);
      for (std::size_t j = i; j < k; ++j) a[j] = s;
      r.coeff.push_back(std::move(a));
    }
  }
  return r;
}

// Product Gauss-Hermite rule with n nodes per dimension.
double quadrature(const State& state, const Job& job, const RotationDimensions& dims, int n) {
  const auto& rule = detail::gauss_hermite_rule(n);
  const std::size_t d = dims.coeff.size();
  std::vector<int> idx(d, 0);
  std::vector<cplx> rot(job.k);
  double sum = 0.0;
  while (true) {
    double w = 1.0;
    for (std::size_t q = 0; q < d; ++q) w *= rule.weights[idx[q]];
    for (std::size_t j = 0; j < job.k; ++j) {
      double theta = 0.0;
      for (std::size_t q = 0; q < d; ++q) theta += dims.coeff[q][j] * rule.nodes[idx[q]];
      rot[j] = {std::cos(theta), std::sin(theta)};
    }
    sum += w * evaluate(state, job, rot.data());
    std::size_t q = 0;
    for (; q < d; ++q) {
      if (++idx[q] < n) break;
      idx[q] = 0;
    }
    if (q == d) break;
  }
  return sum;
}

[[noreturn]] void refuse(const std::string& why) {
  throw UnsupportedError("Weyl engine: " + why +
                         "; use the Fock engine (--engine fock) for this noise");
}

EngineValue run(const State& state, const WeylEngineOptions& opt, const Job& job, double lo,
                double hi) {
  EngineValue out;
  bool durations = false;
  for (std::size_t j = 0; j < job.k; ++j) durations = durations || job.seq->steps[j].duration_s > 0.0;
  if (durations) {
    // Finite-duration measurements: the rotation angle would grow during the interaction and
    // couple to the slices; not modelled here.
    if (job.seq->noise.has_rotations())
      refuse("finite-duration measurements (duration_s > 0) with dephasing or frequency noise "
             "are not modelled");
    // n and 2n slices; Strang splitting has only even error powers, so the Richardson
    // combination removes the n^-2 term (as in the Fock engine).
    const int n = opt.interaction_slices;
    const double v1 = evaluate(state, job, nullptr, n);
    const double v2 = evaluate(state, job, nullptr, 2 * n);
    out.value = clamp_round_off((4.0 * v2 - v1) / 3.0, lo, hi);
    out.slicing_change = std::abs(v2 - v1);
    out.error_estimate = out.slicing_change;
    out.slices = n;
    out.evaluations = 2;
    return out;
  }
  if (!job.seq->noise.has_rotations()) {
    out.value = clamp_round_off(evaluate(state, job, nullptr), lo, hi);
    return out;
  }
  const RotationDimensions dims = rotation_dimensions(state, job);
  const int d = static_cast<int>(dims.coeff.size());
  if (d == 0) {
    out.value = clamp_round_off(evaluate(state, job, nullptr), lo, hi);
    return out;
  }
  auto evaluations_for = [d](int n) { return std::pow(static_cast<long double>(n), d); };
  auto check_size = [&](int n) {
    if (evaluations_for(n) > static_cast<long double>(opt.max_rotation_evaluations))
      refuse("averaging over " + std::to_string(d) + " rotation angle(s) with " +
             std::to_string(n) + " nodes each needs " +
             detail::number_text(static_cast<double>(evaluations_for(n))) +
             " evaluations (limit max_rotation_evaluations = " +
             std::to_string(opt.max_rotation_evaluations) + ")");
    if (n > opt.max_hermite_nodes)
      refuse("rotation averaging did not reach the tolerance " +
             detail::number_text(opt.rotation_tolerance) + " with max_hermite_nodes = " +
             std::to_string(opt.max_hermite_nodes) + " per angle");
  };
  int n = std::max(1, opt.initial_hermite_nodes);
  check_size(n);
  double prev = quadrature(state, job, dims, n);
  long evaluations = static_cast<long>(evaluations_for(n));
  while (true) {
    const int n2 = 2 * n;
    check_size(n2);
    const double cur = quadrature(state, job, dims, n2);
    evaluations += static_cast<long>(evaluations_for(n2));
    const double diff = std::abs(cur - prev);
    if (diff <= opt.rotation_tolerance) {
      out.value = clamp_round_off(cur, lo, hi);
      out.error_estimate = diff;
      out.hermite_nodes = n2;
      out.rotation_dimensions = d;
      out.evaluations = evaluations;
      return out;
    }
    prev = cur;
    n = n2;
  }
}

void check_sequence(const MeasurementSequence& seq, std::size_t k) {
  seq.validate();
  if (k > seq.steps.size())
    throw DomainError(std::to_string(k) + " outcomes for a sequence of " +
                      std::to_string(seq.steps.size()) + " steps");
}

}  // namespace

WeylEngine::WeylEngine(StatePtr state, WeylEngineOptions options)
    : state_(std::move(state)), options_(options) {
  if (!state_) throw DomainError("Weyl engine: the state is empty");
  if (options_.initial_hermite_nodes < 1)
    throw DomainError("initial_hermite_nodes = " +
                      std::to_string(options_.initial_hermite_nodes) + ", but must be >= 1");
  if (options_.interaction_slices < 1)
    throw DomainError("interaction_slices = " + std::to_string(options_.interaction_slices) +
                      ", but must be >= 1");
  if (!(options_.rotation_tolerance > 0.0))
    throw DomainError("rotation_tolerance = " +
                      detail::number_text(options_.rotation_tolerance) + ", but must be > 0");
}

EngineValue WeylEngine::probability(const MeasurementSequence& seq,
                                    const OutcomeString& outcomes) const {
  check_sequence(seq, outcomes.size());
  for (int o : outcomes)
    if (o != 1 && o != -1)
      throw DomainError("outcome = " + std::to_string(o) + ", but must be +1 or -1");
  return run(*state_, options_, Job{&seq, outcomes.size(), Plan::probability, &outcomes}, 0.0,
             1.0);
}

EngineValue WeylEngine::correlator(const MeasurementSequence& seq) const {
  check_sequence(seq, seq.steps.size());
  return run(*state_, options_, Job{&seq, seq.steps.size(), Plan::correlator, nullptr}, -1.0,
             1.0);
}

EngineValue WeylEngine::last_average(const MeasurementSequence& seq) const {
  check_sequence(seq, seq.steps.size());
  return run(*state_, options_, Job{&seq, seq.steps.size(), Plan::last_average, nullptr}, -1.0,
             1.0);
}

}  // namespace macroreal
