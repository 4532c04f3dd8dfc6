// Classical reference models (see classical_model.hpp).
//
// Written without the Weyl-sum algebra on purpose: the property tests compare these numbers
// with the Weyl engine, so the two must not share the way they are computed.
//
// The point z = (x, p) = sqrt2 (Re alpha, Im alpha) is Gaussian at preparation (mean and
// covariance from State::gaussian_moments). Over each interval it is rotated, shrunk and
// receives isotropic Gaussian noise: z -> s R z + xi, Cov(xi) = Dt I. That variance follows
// from E[exp(g n* - g* n)] = exp(-Dt |g|^2) for the added noise n = (xi_x + i xi_p)/sqrt2:
// g n* - g* n = i l.xi with l = sqrt2 (Im g, -Re g), |l|^2 = 2|g|^2, and a Gaussian xi with
// covariance v I gives exp(-v |l|^2 / 2) = exp(-v |g|^2), so v = Dt. The kicked model adds the
// split's deterministic displacement after each measurement. The points at the measurement
// times are then jointly Gaussian, and every expectation needed is a sum of terms
// E[exp(i sum_j m_j l_j . z_j)] (m_j in {-1, 0, 1}) = exp(i L.mu - L^T Sigma L / 2).
// Rotation angles (quasi-static offset, Markovian dephasing) are jointly Gaussian too; they
// are averaged by product Gauss-Hermite quadrature over a Cholesky factor of their covariance.
#include "phase_space/classical_model.hpp"

#include <cmath>
#include <map>
#include <sstream>
#include <utility>
#include <vector>

#include <Eigen/Dense>

#include "core/error.hpp"

namespace macroreal {

std::string to_string(ClassicalKind k) {
  switch (k) {
    case ClassicalKind::non_invasive: return "non-invasive";
    case ClassicalKind::kicked: return "kicked";
  }
  return "unknown";
}

bool classical_model_applies(const State& state, std::string* why_not) {
  std::string reason;
  if (!state.wigner_nonnegative()) {
    reason = "classical reference model needs a state with a non-negative Wigner function; '" +
             state.describe() + "' has negative regions (or is not known to be non-negative)";
  } else if (!state.gaussian_moments()) {
    reason = "classical reference model handles Gaussian states only; '" + state.describe() +
             "' has a non-negative Wigner function but no Gaussian moments (mixtures are not "
             "supported yet)";
  }
  if (why_not) *why_not = reason;
  return reason.empty();
}

namespace {

// Gauss-Hermite rule for the standard normal weight: sum_i w_i f(x_i) ~ E[f(N(0,1))].
// Nodes from the Jacobi matrix of the orthonormal probabilists' Hermite polynomials
// (Golub & Welsch, Math. Comp. 23, 221 (1969)), polished by Newton steps on p_n; weights are
// the Christoffel numbers 1 / sum_{k<n} p_k(x_i)^2, accurate also for the small ones.
struct HermiteRule {
  std::vector<double> nodes, weights;
};

// Orthonormal probabilists' Hermite p_0..p_n at x: p_{k+1} = (x p_k - sqrt(k) p_{k-1}) / sqrt(k+1).
void orthonormal_hermite(int n, double x, std::vector<double>& p) {
  p.assign(n + 1, 0.0);
  p[0] = 1.0;
  if (n >= 1) p[1] = x;
  for (int k = 1; k < n; ++k)
    p[k + 1] = (x * p[k] - std::sqrt(static_cast<double>(k)) * p[k - 1]) /
               std::sqrt(static_cast<double>(k + 1));
}

HermiteRule compute_hermite_rule(int n) {
  HermiteRule r;
  if (n == 1) {
    r.nodes = {0.0};
    r.weights = {1.0};
    return r;
  }
  Eigen::MatrixXd jacobi = Eigen::MatrixXd::Zero(n, n);
  for (int k = 1; k < n; ++k) jacobi(k, k - 1) = jacobi(k - 1, k) = std::sqrt(double(k));
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> eig(jacobi, Eigen::EigenvaluesOnly);
  std::vector<double> p;
  double total = 0.0;
  for (int i = 0; i < n; ++i) {
    double x = eig.eigenvalues()(i);
    for (int it = 0; it < 3; ++it) {  // p_n' = sqrt(n) p_{n-1}
      orthonormal_hermite(n, x, p);
      const double d = std::sqrt(double(n)) * p[n - 1];
      const double step = p[n] / d;
      if (!std::isfinite(step)) break;  // far nodes of large rules overflow; keep the eigenvalue
      x -= step;
    }
    orthonormal_hermite(n - 1, x, p);
    double s = 0.0;
    for (int k = 0; k < n; ++k) s += p[k] * p[k];
    // A far node whose sum overflows has a weight below the double range: zero.
    const double w = std::isfinite(s) && s > 0.0 ? 1.0 / s : 0.0;
    r.nodes.push_back(x);
    r.weights.push_back(w);
    total += w;
  }
  for (double& w : r.weights) w /= total;  // exact total mass 1 (removes rounding drift)
  return r;
}

// Per-thread cache: the rules are reused by every call with the same node count.
const HermiteRule& hermite_rule(int n) {
  thread_local std::map<int, HermiteRule> cache;
  auto it = cache.find(n);
  if (it == cache.end()) it = cache.emplace(n, compute_hermite_rule(n)).first;
  return it->second;
}

// What each step contributes: its factor f_j(z) = a0 + ap e^{i l.z} + am e^{-i l.z}.
struct StepFactor {
  cplx a0 = 0.0, ap = 0.0, am = 0.0;
};

// Outcome o:  1/2 [1 + o c Re(e^{i phi} w)]; signed (sum_o o P): c Re(e^{i phi} w);
// ignored (sum_o P): 1.
StepFactor outcome_factor(const ModularMeasurement& m, int o) {
  const cplx e = std::polar(0.25 * o * m.contrast, m.phase_rad);
  return {0.5, e, std::conj(e)};
}
StepFactor signed_factor(const ModularMeasurement& m) {
  const cplx e = std::polar(0.5 * m.contrast, m.phase_rad);
  return {0.0, e, std::conj(e)};
}
StepFactor ignored_factor() { return {1.0, 0.0, 0.0}; }

// The Weyl symbol of D(beta) at z: exp(beta alpha* - beta* alpha) = exp(i l.z) with
// l = sqrt2 (Im beta, -Re beta), since beta alpha* - beta* alpha = 2i Im(beta alpha*).
Eigen::Vector2d symbol_wavevector(cplx beta) {
  return std::sqrt(2.0) * Eigen::Vector2d(beta.imag(), -beta.real());
}

// The kick alpha -> alpha + beta/2 in (x, p): x += Re(beta)/sqrt2, p += Im(beta)/sqrt2.
Eigen::Vector2d kick_vector(cplx beta) {
  return Eigen::Vector2d(beta.real(), beta.imag()) / std::sqrt(2.0);
}

// One evaluation for fixed rotation angles theta_j (interval j ends at step j).
class FixedAngleModel {
 public:
  FixedAngleModel(const GaussianMoments& prep, const std::vector<GaussianChannel>& channels,
                  const std::vector<Eigen::Vector2d>& wavevectors,
                  const std::vector<Eigen::Vector2d>& kicks, std::vector<StepFactor> factors)
      : prep_(prep), channels_(channels), l_(wavevectors), kicks_(kicks),
        factors_(std::move(factors)) {
    const std::size_t k = l_.size();
    mu_.resize(k);
    block_.assign(k * k, Eigen::Matrix2d::Zero());
    G_ = Eigen::MatrixXd::Zero(k, k);
    h_.assign(k, 0.0);
  }

  // E[prod_j f_j(z_j)] for rotation angles theta (alpha -> e^{-i theta} alpha per interval).
  double evaluate(const std::vector<double>& theta) {
    const int k = static_cast<int>(l_.size());
    // Forward propagation of the joint moments of z_0..z_{k-1}.
    Eigen::Vector2d prev_mean = prep_.mean;
    Eigen::Matrix2d prev_cov = prep_.covariance;
    for (int j = 0; j < k; ++j) {
      const double c = std::cos(theta[j]), s = std::sin(theta[j]);
      Eigen::Matrix2d A;
      A << c, s, -s, c;  // rotation by -theta
      A *= channels_[j].shrink;
      const Eigen::Vector2d pre_mean = j == 0 ? prev_mean : Eigen::Vector2d(prev_mean + kicks_[j - 1]);
      mu_[j] = A * pre_mean;
      block(j, j) = A * prev_cov * A.transpose() + channels_[j].diffusion * Eigen::Matrix2d::Identity();
      for (int l = 0; l < j; ++l) block(j, l) = A * block(j - 1, l);
      prev_mean = mu_[j];
      prev_cov = block(j, j);
    }
    for (int j = 0; j < k; ++j) {
      h_[j] = l_[j].dot(mu_[j]);
      for (int l = 0; l <= j; ++l) G_(j, l) = G_(l, j) = l_[j].dot(block(j, l) * l_[l]);
    }
    // Sum over the sign patterns m_j in {0, +1, -1} with nonzero coefficients.
    std::vector<int> m(k, 0);
    return enumerate(0, m, 1.0).real();
  }

 private:
  Eigen::Matrix2d& block(int j, int l) { return block_[j * l_.size() + l]; }

  cplx enumerate(int j, std::vector<int>& m, cplx coeff) {
    const int k = static_cast<int>(l_.size());
    if (j == k) {
      double lin = 0.0, quad = 0.0;
      for (int a = 0; a < k; ++a) {
        if (m[a] == 0) continue;
        lin += m[a] * h_[a];
        for (int b = 0; b < k; ++b)
          if (m[b] != 0) quad += m[a] * m[b] * G_(a, b);
      }
      return coeff * std::exp(cplx(-0.5 * quad, lin));
    }
    cplx sum = 0.0;
    const StepFactor& f = factors_[j];
    const cplx choice[3] = {f.a0, f.ap, f.am};
    const int sign[3] = {0, +1, -1};
    for (int c = 0; c < 3; ++c) {
      if (choice[c] == 0.0) continue;
      m[j] = sign[c];
      sum += enumerate(j + 1, m, coeff * choice[c]);
    }
    m[j] = 0;
    return sum;
  }

  GaussianMoments prep_;
  const std::vector<GaussianChannel>& channels_;
  const std::vector<Eigen::Vector2d>& l_;
  const std::vector<Eigen::Vector2d>& kicks_;
  std::vector<StepFactor> factors_;
  std::vector<Eigen::Vector2d> mu_;
  std::vector<Eigen::Matrix2d> block_;
  Eigen::MatrixXd G_;
  std::vector<double> h_;
};

long checked_power(int base, int exponent, long limit) {
  long r = 1;
  for (int i = 0; i < exponent; ++i) {
    if (r > limit / base) return limit + 1;
    r *= base;
  }
  return r;
}

}  // namespace

void refuse_durations(const MeasurementSequence& seq, std::size_t k) {
  for (std::size_t j = 0; j < k && j < seq.steps.size(); ++j) {
    const TimedMeasurement& step = seq.steps[j];
    if (step.duration_s > 0.0) {
      std::ostringstream os;
      os.precision(6);
      os << "classical reference model: measurement '" << step.label << "' has duration_s = "
         << step.duration_s << " s; the classical models treat every measurement as "
         << "instantaneous and do not model noise during a finite interaction, so they give no "
         << "value here (set duration_s to 0 to compare with them)";
      throw UnsupportedError(os.str());
    }
  }
}

ClassicalModel::ClassicalModel(StatePtr state, ClassicalKind kind, WeylEngineOptions options)
    : state_(std::move(state)), kind_(kind), options_(options) {
  if (!state_) throw DomainError("classical reference model: state is null");
  std::string why;
  if (!classical_model_applies(*state_, &why)) throw UnsupportedError(why);
  if (options_.initial_hermite_nodes < 1 || options_.max_hermite_nodes < options_.initial_hermite_nodes)
    throw DomainError("classical reference model: Hermite node counts must satisfy 1 <= initial <= max");
}

namespace {

// Shared driver: the expectation of prod_j factors[j](z_j) over the first factors.size()
// steps of `seq`, averaged over the rotation angles.
EngineValue classical_expectation(const State& state, ClassicalKind kind,
                                  const WeylEngineOptions& opt, const MeasurementSequence& seq,
                                  const std::vector<StepFactor>& factors) {
  const int k = static_cast<int>(factors.size());
  refuse_durations(seq, static_cast<std::size_t>(k));
  EngineValue out;
  if (k == 0) {
    out.value = 1.0;
    return out;
  }
  const GaussianMoments prep = *state.gaussian_moments();
  std::vector<GaussianChannel> channels;
  std::vector<Eigen::Vector2d> wavevectors, kicks;
  std::vector<double> intervals;
  double previous_time = 0.0;
  for (int j = 0; j < k; ++j) {
    const TimedMeasurement& step = seq.steps[j];
    const double dt = step.time_s - previous_time;
    previous_time = step.time_s;
    intervals.push_back(dt);
    channels.push_back(GaussianChannel::over(seq.noise, dt));
    wavevectors.push_back(symbol_wavevector(step.measurement.beta));
    const bool kicks_here = kind == ClassicalKind::kicked && step.measurement.split == Split::one_sided;
    kicks.push_back(kicks_here ? kick_vector(step.measurement.beta) : Eigen::Vector2d::Zero());
  }
  FixedAngleModel model(prep, channels, wavevectors, kicks, factors);

  // Rotation angles theta_j over interval j: delta * dt_j (one offset per shot) plus an
  // independent Markovian angle of variance kappa * dt_j; jointly Gaussian with covariance
  // C = sigma^2 dt dt^T + kappa diag(dt). A rotation before the first measurement does nothing
  // to a rotation-invariant state, so that interval is left out for such states.
  const double sigma = seq.noise.frequency_noise_sd_rad_per_s;
  const double kappa = seq.noise.dephasing_rate_per_s;
  std::vector<int> active;  // intervals carrying a random angle
  for (int j = 0; j < k; ++j) {
    if (intervals[j] <= 0.0) continue;
    if (j == 0 && state.rotation_invariant()) continue;
    if (sigma > 0.0 || kappa > 0.0) active.push_back(j);
  }
  std::vector<double> theta(k, 0.0);
  if (active.empty()) {
    out.value = model.evaluate(theta);
    return out;
  }
  // Factor: theta_active = F u with u standard normal, u of dimension `dims`.
  const int na = static_cast<int>(active.size());
  Eigen::MatrixXd F;
  if (kappa == 0.0) {
    F = Eigen::MatrixXd(na, 1);
    for (int a = 0; a < na; ++a) F(a, 0) = sigma * intervals[active[a]];
  } else {
    Eigen::MatrixXd C(na, na);
    for (int a = 0; a < na; ++a)
      for (int b = 0; b < na; ++b)
        C(a, b) = sigma * sigma * intervals[active[a]] * intervals[active[b]] +
                  (a == b ? kappa * intervals[active[a]] : 0.0);
    F = Eigen::LLT<Eigen::MatrixXd>(C).matrixL();
  }
  const int dims = static_cast<int>(F.cols());

  auto integrate = [&](int nodes, long& evaluations) {
    const HermiteRule& rule = hermite_rule(nodes);
    evaluations = checked_power(nodes, dims, opt.max_rotation_evaluations);
    if (evaluations > opt.max_rotation_evaluations) {
      std::ostringstream os;
      os << "classical reference model: averaging over " << dims << " rotation angles with "
         << nodes << " Gauss-Hermite nodes each exceeds max_rotation_evaluations = "
         << opt.max_rotation_evaluations << "; use the Fock engine (--engine fock)";
      throw UnsupportedError(os.str());
    }
    std::vector<int> idx(dims, 0);
    Eigen::VectorXd u(dims);
    double sum = 0.0;
    for (long e = 0; e < evaluations; ++e) {
      double w = 1.0;
      for (int d = 0; d < dims; ++d) {
        u(d) = rule.nodes[idx[d]];
        w *= rule.weights[idx[d]];
      }
      const Eigen::VectorXd th = F * u;
      for (int a = 0; a < na; ++a) theta[active[a]] = th(a);
      sum += w * model.evaluate(theta);
      for (int d = 0; d < dims; ++d) {  // odometer
        if (++idx[d] < nodes) break;
        idx[d] = 0;
      }
    }
    return sum;
  };

  int nodes = opt.initial_hermite_nodes;
  long evaluations = 0, total = 0;
  double previous = integrate(nodes, evaluations);
  total += evaluations;
  while (true) {
    const int next = nodes * 2;
    if (next > opt.max_hermite_nodes) {
      std::ostringstream os;
      os << "classical reference model: rotation average did not reach rotation_tolerance = "
         << opt.rotation_tolerance << " with " << nodes << " Gauss-Hermite nodes per angle "
         << "(max_hermite_nodes = " << opt.max_hermite_nodes << "); use the Fock engine "
         << "(--engine fock)";
      throw UnsupportedError(os.str());
    }
    const double current = integrate(next, evaluations);
    total += evaluations;
    nodes = next;
    const double diff = std::abs(current - previous);
    previous = current;
    if (diff <= opt.rotation_tolerance) {
      out.value = current;
      out.error_estimate = diff;
      break;
    }
  }
  out.hermite_nodes = nodes;
  out.rotation_dimensions = dims;
  out.evaluations = total;
  return out;
}

}  // namespace

EngineValue ClassicalModel::probability(const MeasurementSequence& seq,
                                        const OutcomeString& outcomes) const {
  seq.validate();
  if (outcomes.size() > seq.steps.size())
    throw DomainError("classical reference model: " + std::to_string(outcomes.size()) +
                      " outcomes given, but the sequence has only " +
                      std::to_string(seq.steps.size()) + " steps");
  std::vector<StepFactor> factors;
  for (std::size_t j = 0; j < outcomes.size(); ++j) {
    if (outcomes[j] != 1 && outcomes[j] != -1)
      throw DomainError("classical reference model: outcome " + std::to_string(outcomes[j]) +
                        " at step " + std::to_string(j + 1) + ", but must be +1 or -1");
    factors.push_back(outcome_factor(seq.steps[j].measurement, outcomes[j]));
  }
  return classical_expectation(*state_, kind_, options_, seq, factors);
}

EngineValue ClassicalModel::correlator(const MeasurementSequence& seq) const {
  seq.validate();
  if (seq.steps.empty()) throw DomainError("classical reference model: correlator of an empty sequence");
  std::vector<StepFactor> factors;
  for (const auto& s : seq.steps) factors.push_back(signed_factor(s.measurement));
  return classical_expectation(*state_, kind_, options_, seq, factors);
}

EngineValue ClassicalModel::last_average(const MeasurementSequence& seq) const {
  seq.validate();
  if (seq.steps.empty()) throw DomainError("classical reference model: last_average of an empty sequence");
  std::vector<StepFactor> factors(seq.steps.size() - 1, ignored_factor());
  factors.push_back(signed_factor(seq.steps.back().measurement));
  return classical_expectation(*state_, kind_, options_, seq, factors);
}

}  // namespace macroreal
