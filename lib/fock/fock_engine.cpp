// The Fock engine (fock_engine.hpp).
#include "fock/fock_engine.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "core/error.hpp"
#include "fock/density_matrix_state.hpp"
#include "fock/displacement_matrix.hpp"
#include "fock/fock_tabulation.hpp"
#include "fock/serial_eigen.hpp"

namespace macroreal {

namespace {

std::string num(double v) {
  std::ostringstream os;
  os.precision(6);
  os << v;
  return os.str();
}

double clamp_round_off(double v, double lo, double hi) {
  constexpr double kSlack = 1e-9;
  if (v < lo && v >= lo - kSlack) return lo;
  if (v > hi && v <= hi + kSlack) return hi;
  return v;
}

// Largest displacement a branch of the measurement reaches: |beta|/2 (symmetric) or |beta|.
double excursion(const ModularMeasurement& m) {
  return m.split == Split::symmetric ? 0.5 * std::abs(m.beta) : std::abs(m.beta);
}

double top_population(const Eigen::MatrixXcd& x) {
  const int n = static_cast<int>(x.rows());
  const int e = std::max(1, n / 10);
  return x.diagonal().tail(e).cwiseAbs().sum();
}

enum class Mode { outcome, signed_sum, unselective };

// Combination of T0 and T1 for the mode: outcome T0 + c o T1, signed 2 c T1, unselective 2 T0.
Eigen::MatrixXcd combine(Mode mode, double c, int o, const Eigen::MatrixXcd& t0,
                         const Eigen::MatrixXcd& t1) {
  switch (mode) {
    case Mode::outcome: return t0 + (c * o) * t1;
    case Mode::signed_sum: return (2.0 * c) * t1;
    case Mode::unselective: return 2.0 * t0;
  }
  return t0;
}

}  // namespace

FockEngine::FockEngine(StatePtr state, FockEngineOptions options)
    : state_(std::move(state)), options_(std::move(options)) {
  if (!state_) throw DomainError("Fock engine: the state is empty");
  if (options_.cutoff < 0 || options_.cutoff > 5000)
    throw DomainError("Fock engine: cutoff = " + std::to_string(options_.cutoff) +
                      ", but must be 0 (automatic) or in [1, 5000]");
  if (options_.interaction_slices < 1)
    throw DomainError("Fock engine: interaction_slices = " +
                      std::to_string(options_.interaction_slices) + ", but must be >= 1");
  if (options_.initial_quadrature_nodes < 3 ||
      options_.max_quadrature_nodes < options_.initial_quadrature_nodes)
    throw DomainError("Fock engine: quadrature node counts must satisfy 3 <= initial <= max");
  if (!(options_.rotation_tolerance > 0.0))
    throw DomainError("Fock engine: rotation_tolerance must be > 0");
  if (!(options_.state_tail > 0.0 && options_.state_tail < 1.0))
    throw DomainError("Fock engine: state_tail must be in (0, 1)");
  for (const auto& [label, t] : options_.interaction_duration_s)
    if (!(std::isfinite(t) && t >= 0.0))
      throw DomainError("Fock engine: interaction duration of '" + label + "' = " + num(t) +
                        ", but must be finite and >= 0");
}

double FockEngine::duration_of(const TimedMeasurement& m) const {
  if (m.duration_s > 0.0) return m.duration_s;  // the sequence's own duration comes first
  const auto it = options_.interaction_duration_s.find(m.label);
  return it == options_.interaction_duration_s.end() ? 0.0 : it->second;
}

std::shared_ptr<const Eigen::MatrixXcd> FockEngine::initial(int cutoff) const {
  {
    std::lock_guard<std::mutex> lock(mu_);
    auto it = initial_.find(cutoff);
    if (it != initial_.end()) return it->second;
  }
  auto rho = std::make_shared<const Eigen::MatrixXcd>(tabulate(*state_, cutoff));
  std::lock_guard<std::mutex> lock(mu_);
  if (initial_.size() > 16) initial_.clear();
  initial_.emplace(cutoff, rho);
  return rho;
}

int FockEngine::state_levels() const {
  {
    std::lock_guard<std::mutex> lock(mu_);
    if (state_levels_ >= 0) return state_levels_;
  }
  int levels = 0;
  if (const auto* dm = dynamic_cast<const DensityMatrixState*>(state_.get())) {
    levels = dm->dimension();
  } else {
    for (int n = 16;; n = n * 3 / 2) {
      if (n > options_.max_cutoff)
        throw UnsupportedError("Fock engine: the state (" + state_->describe() +
                               ") needs more than max_cutoff = " +
                               std::to_string(options_.max_cutoff) +
                               " Fock levels to hold all but " + num(options_.state_tail) +
                               " of its population; use the Weyl engine (--engine weyl)");
      const auto rho = initial(n);
      const Eigen::VectorXd p = rho->diagonal().real();
      // Smallest level count holding 1 - state_tail of the population (the normalisation is
      // 1 by construction; the tabulated diagonal carries round-off of about 1e-13), found
      // well inside the tabulated block.
      double cum = 0.0;
      int found = -1;
      for (int m = 0; m < n; ++m) {
        cum += p[m];
        if (cum >= 1.0 - options_.state_tail) {
          found = m + 1;
          break;
        }
      }
      if (found < 0 || found + 10 > n) continue;
      levels = found;
      break;
    }
  }
  std::lock_guard<std::mutex> lock(mu_);
  state_levels_ = levels;
  return levels;
}

int FockEngine::automatic_cutoff(const MeasurementSequence& seq) const {
  if (options_.cutoff > 0) return options_.cutoff;
  const int ns = state_levels();
  double b = 0.0, t_end = 0.0;
  for (std::size_t j = 0; j < seq.steps.size(); ++j) {
    const double dur = duration_of(seq.steps[j]);
    if (j + 1 < seq.steps.size() || dur > 0.0) b += excursion(seq.steps[j].measurement);
    t_end = std::max(t_end, seq.steps[j].time_s + dur);
  }
  const auto& nz = seq.noise;
  const double added = (nz.heating_quanta_per_s + nz.force_noise_quanta_per_s +
                        nz.damping_rate_per_s * nz.bath_nbar) * t_end;
  const double s = std::sqrt(static_cast<double>(ns)) + b;
  const double n = s * s + 8.0 * b + 20.0 + 10.0 * added;
  if (n > options_.max_cutoff)
    throw UnsupportedError("Fock engine: this sequence needs about " + num(std::ceil(n)) +
                           " Fock levels (state " + std::to_string(ns) +
                           " levels, displacement excursion " + num(b) +
                           "), more than max_cutoff = " + std::to_string(options_.max_cutoff) +
                           "; use the Weyl engine (--engine weyl) or raise max_cutoff");
  return std::max(static_cast<int>(std::ceil(n)), ns);
}

double FockEngine::evaluate_at(const MeasurementSequence& seq, std::size_t k, Plan plan,
                               const OutcomeString* outcomes, const Eigen::MatrixXcd& rho0,
                               int slices, double delta, double* edge) const {
  const int n = static_cast<int>(rho0.rows());
  const LindbladRates rates = LindbladRates::of(seq.noise);
  Eigen::MatrixXcd x = rho0;
  double t_free = 0.0;
  for (std::size_t j = 0; j < k; ++j) {
    const auto& step = seq.steps[j];
    const ModularMeasurement& m = step.measurement;
    const bool last = j + 1 == k;
    Mode mode = Mode::signed_sum;
    int o = 0;
    if (plan == Plan::probability) {
      mode = Mode::outcome;
      o = (*outcomes)[j];
    } else if (plan == Plan::last_average && !last) {
      mode = Mode::unselective;
    }
    const double dt = step.time_s - t_free;
    propagator_.apply(x, rates, dt, delta * dt);
    const double dur = slices > 0 ? duration_of(step) : 0.0;
    const cplx ph = std::polar(1.0, m.phase_rad);
    if (dur == 0.0) {
      if (last) {
        const Eigen::MatrixXcd d = displacement_matrix(n, m.beta);
        const cplx tr_d = x.cwiseProduct(d.transpose()).sum();  // Tr[D X]
        const double tr = x.trace().real();
        const double re = (ph * tr_d).real();
        switch (mode) {
          case Mode::outcome: return 0.5 * tr + 0.5 * m.contrast * o * re;
          case Mode::signed_sum: return m.contrast * re;
          case Mode::unselective: return tr;
        }
      }
      Eigen::MatrixXcd t0, t1;
      if (m.split == Split::symmetric) {
        const Eigen::MatrixXcd a = displacement_matrix(n, -0.5 * m.beta);
        const Eigen::MatrixXcd b = displacement_matrix(n, 0.5 * m.beta);
        const Eigen::MatrixXcd bx = b * x;
        const Eigen::MatrixXcd bxa = bx * a.adjoint();
        t1 = 0.25 * (ph * bxa + std::conj(ph) * bxa.adjoint());
        if (mode != Mode::signed_sum) t0 = 0.25 * ((a * x) * a.adjoint() + bx * b.adjoint());
      } else {
        const Eigen::MatrixXcd b = displacement_matrix(n, m.beta);
        const Eigen::MatrixXcd bx = b * x;
        t1 = 0.25 * (ph * bx + std::conj(ph) * bx.adjoint());
        if (mode != Mode::signed_sum) t0 = 0.25 * (x + bx * b.adjoint());
      }
      if (mode == Mode::signed_sum) t0 = Eigen::MatrixXcd::Zero(n, n);
      x = combine(mode, m.contrast, o, t0, t1);
    } else {
      // Two-branch operator-sum over the interaction (see the header).
      const bool sym = m.split == Split::symmetric;
      const cplx kick_b = sym ? m.beta / (2.0 * slices) : m.beta / static_cast<double>(slices);
      const Eigen::MatrixXcd kb = displacement_matrix(n, kick_b);
      const Eigen::MatrixXcd ka = sym ? displacement_matrix(n, -kick_b) : Eigen::MatrixXcd();
      Eigen::MatrixXcd raa = x, rbb = x, rba = x;
      const double tau = dur / slices;
      auto noise = [&](Eigen::MatrixXcd& r, double t) { propagator_.apply(r, rates, t, delta * t); };
      noise(raa, tau / 2);
      noise(rbb, tau / 2);
      noise(rba, tau / 2);
      for (int s = 0; s < slices; ++s) {
        if (sym) raa = ka * raa * ka.adjoint();
        rbb = kb * rbb * kb.adjoint();
        rba = sym ? Eigen::MatrixXcd(kb * rba * ka.adjoint()) : Eigen::MatrixXcd(kb * rba);
        const double t = s + 1 == slices ? tau / 2 : tau;
        noise(raa, t);
        noise(rbb, t);
        noise(rba, t);
      }
      const Eigen::MatrixXcd t0 = 0.25 * (raa + rbb);
      const Eigen::MatrixXcd t1 = 0.25 * (ph * rba + std::conj(ph) * rba.adjoint());
      x = combine(mode, m.contrast, o, t0, t1);
      if (last) return x.trace().real();
    }
    if (edge) *edge = std::max(*edge, top_population(x));
    t_free = step.time_s + (slices > 0 ? duration_of(step) : 0.0);
  }
  return x.trace().real();
}

double FockEngine::evaluate(const MeasurementSequence& seq, std::size_t k, Plan plan,
                            const OutcomeString* outcomes, int cutoff, int slices, double* edge,
                            double* rotation_change, int* nodes_used) const {
  const auto rho0 = initial(cutoff);
  const double sigma = seq.noise.frequency_noise_sd_rad_per_s;
  bool rotates = false;
  if (sigma > 0.0)
    for (std::size_t j = 0; j < k; ++j)
      rotates = rotates || seq.steps[j].time_s > 0.0 || (slices > 0 && duration_of(seq.steps[j]) > 0.0);
  if (!rotates) return evaluate_at(seq, k, plan, outcomes, *rho0, slices, 0.0, edge);
  // Nested trapezoidal rule in u = delta / sigma on [-kQuadratureRange, kQuadratureRange]
  // (see the header): each halving of the step adds the odd nodes only, so the total cost is
  // the final node count. Values are normalised by the weight sum, which makes constants exact.
  constexpr double kQuadratureRange = 9.0;  // 2 Q(9) = 2.3e-19: the neglected Gaussian tail
  int intervals = 2;
  while (intervals + 1 < std::max(3, options_.initial_quadrature_nodes)) intervals *= 2;
  double h = 2.0 * kQuadratureRange / intervals;
  double weighted = 0.0, weights = 0.0;
  auto add_node = [&](double u) {
    const double w = std::exp(-0.5 * u * u);
    weighted += w * evaluate_at(seq, k, plan, outcomes, *rho0, slices, sigma * u, edge);
    weights += w;
  };
  for (int i = 0; i <= intervals; ++i) add_node(-kQuadratureRange + i * h);
  double prev = weighted / weights, last_diff = 0.0;
  while (true) {
    if (2 * intervals + 1 > options_.max_quadrature_nodes)
      throw UnsupportedError("Fock engine: frequency-noise averaging did not reach the tolerance " +
                             num(options_.rotation_tolerance) + " with max_quadrature_nodes = " +
                             std::to_string(options_.max_quadrature_nodes) +
                             " (last change " + num(last_diff) + "; sigma = " + num(sigma) +
                             " rad/s)");
    for (int i = 0; i < intervals; ++i) add_node(-kQuadratureRange + (i + 0.5) * h);
    intervals *= 2;
    h *= 0.5;
    const double cur = weighted / weights;
    const double diff = std::abs(cur - prev);
    if (diff <= options_.rotation_tolerance) {
      if (rotation_change) *rotation_change = std::max(*rotation_change, diff);
      if (nodes_used) *nodes_used = std::max(*nodes_used, intervals + 1);
      return cur;
    }
    prev = cur;
    last_diff = diff;
  }
}

FockValue FockEngine::run(const MeasurementSequence& seq, std::size_t k, Plan plan,
                          const OutcomeString* outcomes) const {
  const detail::SerialEigenScope serial;
  seq.validate();
  if (k > seq.steps.size())
    throw DomainError(std::to_string(k) + " outcomes for a sequence of " +
                      std::to_string(seq.steps.size()) + " steps");
  if (outcomes)
    for (int o : *outcomes)
      if (o != 1 && o != -1)
        throw DomainError("outcome = " + std::to_string(o) + ", but must be +1 or -1");
  bool any_duration = false;
  for (std::size_t j = 0; j < k; ++j) {
    const double dur = duration_of(seq.steps[j]);
    any_duration = any_duration || dur > 0.0;
    if (j + 1 < k && seq.steps[j].time_s + dur > seq.steps[j + 1].time_s * (1.0 + 1e-12))
      throw DomainError("measurement '" + seq.steps[j + 1].label + "' at time_s = " +
                        num(seq.steps[j + 1].time_s) + " starts before the interaction of '" +
                        seq.steps[j].label + "' (time_s " + num(seq.steps[j].time_s) +
                        ", duration " + num(dur) + " s) has ended");
  }
  FockValue out;
  auto& d = out.diagnostics;
  const double lo = plan == Plan::probability ? 0.0 : -1.0;
  if (k == 0) {
    out.value.value = 1.0;
    return out;
  }
  const int n = automatic_cutoff(seq);
  d.cutoff = n;
  d.state_population_outside = std::max(0.0, 1.0 - initial(n)->trace().real());
  const int slices = any_duration ? options_.interaction_slices : 0;
  d.slices = slices;
  auto value_at = [&](int cutoff, double* edge, double* slicing) {
    const double v1 =
        evaluate(seq, k, plan, outcomes, cutoff, slices, edge, &d.rotation_change, &d.quadrature_nodes);
    if (slices == 0) return v1;
    const double v2 = evaluate(seq, k, plan, outcomes, cutoff, 2 * slices, edge, &d.rotation_change,
                               &d.quadrature_nodes);
    if (slicing) *slicing = std::abs(v2 - v1);
    return (4.0 * v2 - v1) / 3.0;  // Richardson: Strang splitting has only even error powers
  };
  double v = value_at(n, &d.edge_population, &d.slicing_change);
  if (options_.check_truncation) {
    const int n2 = static_cast<int>(std::ceil(1.25 * n));
    d.check_cutoff = n2;
    const double v2 = value_at(n2, nullptr, nullptr);
    d.truncation_change = std::abs(v2 - v);
    v = v2;
    if (options_.truncation_tolerance > 0.0 && d.truncation_change > options_.truncation_tolerance)
      throw UnsupportedError("Fock engine: truncation error " + num(d.truncation_change) +
                             " (value changed from cutoff " + std::to_string(n) + " to " +
                             std::to_string(n2) + "; population near the edge " +
                             num(d.edge_population) + ") exceeds truncation_tolerance = " +
                             num(options_.truncation_tolerance) + "; raise the cutoff");
  }
  out.value.value = clamp_round_off(v, lo, 1.0);
  out.value.error_estimate = d.truncation_change + d.slicing_change + d.rotation_change;
  out.value.slicing_change = d.slicing_change;
  out.value.slices = d.slices;
  out.value.hermite_nodes = d.quadrature_nodes;  // trapezoidal nodes here (fock_engine.hpp)
  out.value.rotation_dimensions = d.quadrature_nodes > 0 ? 1 : 0;
  return out;
}

FockValue FockEngine::probability_detailed(const MeasurementSequence& seq,
                                           const OutcomeString& o) const {
  return run(seq, o.size(), Plan::probability, &o);
}
FockValue FockEngine::correlator_detailed(const MeasurementSequence& seq) const {
  return run(seq, seq.steps.size(), Plan::correlator, nullptr);
}
FockValue FockEngine::last_average_detailed(const MeasurementSequence& seq) const {
  return run(seq, seq.steps.size(), Plan::last_average, nullptr);
}
EngineValue FockEngine::probability(const MeasurementSequence& seq, const OutcomeString& o) const {
  return probability_detailed(seq, o).value;
}
EngineValue FockEngine::correlator(const MeasurementSequence& seq) const {
  return correlator_detailed(seq).value;
}
EngineValue FockEngine::last_average(const MeasurementSequence& seq) const {
  return last_average_detailed(seq).value;
}

}  // namespace macroreal
