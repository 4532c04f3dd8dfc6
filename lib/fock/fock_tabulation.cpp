// Fock-basis density matrices of oscillator states (fock_tabulation.hpp).
#include "fock/fock_tabulation.hpp"

#include <algorithm>
#include <cmath>
#include <mutex>
#include <map>
#include <string>

#include "core/error.hpp"
#include "fock/density_matrix_state.hpp"
#include "fock/displacement_matrix.hpp"
#include "fock/serial_eigen.hpp"

namespace macroreal {

namespace {

void check_cutoff(int cutoff) {
  if (cutoff < 1 || cutoff > 5000)
    throw DomainError("Fock cutoff = " + std::to_string(cutoff) + ", but must be in [1, 5000]");
}

// Gauss-Laguerre rule for int_0^inf e^{-x} h(x) dx with the weights returned already
// multiplied by e^{x_i} (W_i = w_i e^{x_i} = x_i / ((R+1)^2 l_{R+1}(x_i)^2), l = e^{-x/2} L,
// A&S 25.4.45), so that int_0^inf g(x) dx ~ sum W_i g(x_i) for g = e^{-x} x h.
// Nodes: eigenvalues of the Jacobi matrix (diagonal 2i+1, off-diagonal i+1; Golub & Welsch,
// Math. Comp. 23, 221 (1969)), polished by Newton steps on l_R.
struct LaguerreRule {
  std::vector<double> x, w_scaled;
};

const LaguerreRule& laguerre_rule(int r) {
  static std::mutex mu;
  static std::map<int, LaguerreRule> cache;
  std::lock_guard<std::mutex> lock(mu);
  auto it = cache.find(r);
  if (it != cache.end()) return it->second;
  Eigen::VectorXd diag(r), off(std::max(r - 1, 0));
  for (int i = 0; i < r; ++i) diag[i] = 2.0 * i + 1.0;
  for (int i = 0; i + 1 < r; ++i) off[i] = i + 1.0;
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> es;
  es.computeFromTridiagonal(diag, off, Eigen::EigenvaluesOnly);
  LaguerreRule rule;
  std::vector<double> l(r + 2);
  for (int i = 0; i < r; ++i) {
    double x = es.eigenvalues()[i];
    for (int it2 = 0; it2 < 3; ++it2) {  // Newton on L_R: L_R' = R (L_R - L_{R-1}) / x
      detail::normalised_laguerre(0, x, r + 1, l.data());
      const double denom = r * (l[r] - l[r - 1]);
      if (denom == 0.0) break;
      x -= x * l[r] / denom;
    }
    detail::normalised_laguerre(0, x, r + 2, l.data());
    rule.x.push_back(x);
    rule.w_scaled.push_back(x / ((r + 1.0) * (r + 1.0) * l[r + 1] * l[r + 1]));
  }
  return cache.emplace(r, std::move(rule)).first->second;
}

}  // namespace

Eigen::MatrixXcd tabulate_from_characteristic(const State& state, int cutoff,
                                              const TabulationOptions& options) {
  check_cutoff(cutoff);
  const detail::SerialEigenScope serial;
  const int n = cutoff;
  const int support = options.support > 0 ? std::max(options.support, n) : n + 40;
  const int r = (support + n + 1) / 2 + 2;
  const int l_angles = n + support + 1;
  const LaguerreRule& rule = laguerre_rule(r);

  // Angular modes chi_q(x_i), q = -(n-1)..(n-1), stored at column q + n - 1.
  Eigen::MatrixXcd modes(r, 2 * n - 1);
  std::vector<cplx> samples(l_angles), twiddle(l_angles);
  for (int j = 0; j < l_angles; ++j) twiddle[j] = std::polar(1.0, -2.0 * kPi * j / l_angles);
  for (int i = 0; i < r; ++i) {
    const double rad = std::sqrt(rule.x[i]);
    for (int j = 0; j < l_angles; ++j)
      samples[j] = state.characteristic(std::polar(rad, 2.0 * kPi * j / l_angles));
    for (int q = -(n - 1); q <= n - 1; ++q) {
      cplx s = 0.0;
      const int step = ((q % l_angles) + l_angles) % l_angles;
      int idx = 0;
      for (int j = 0; j < l_angles; ++j) {
        s += samples[j] * twiddle[idx];
        idx += step;
        if (idx >= l_angles) idx -= l_angles;
      }
      modes(i, q + n - 1) = s / static_cast<double>(l_angles);
    }
  }

  Eigen::MatrixXcd rho = Eigen::MatrixXcd::Zero(n, n);
  std::vector<double> f(n);
  for (int i = 0; i < r; ++i) {
    const double w = rule.w_scaled[i];
    for (int k = 0; k < n; ++k) {
      detail::normalised_laguerre(k, rule.x[i], n - k, f.data());
      const cplx up = w * modes(i, k + n - 1);
      const cplx down = w * modes(i, -k + n - 1) * ((k % 2) ? -1.0 : 1.0);
      for (int m = 0; m + k < n; ++m) {
        rho(m, m + k) += up * f[m];
        if (k > 0) rho(m + k, m) += down * f[m];
      }
    }
  }
  return 0.5 * (rho + rho.adjoint());
}

Eigen::MatrixXcd tabulate(const State& state, int cutoff, const TabulationOptions& options) {
  check_cutoff(cutoff);
  if (const auto* dm = dynamic_cast<const DensityMatrixState*>(&state)) {
    Eigen::MatrixXcd rho = Eigen::MatrixXcd::Zero(cutoff, cutoff);
    const int k = std::min(cutoff, dm->dimension());
    rho.topLeftCorner(k, k) = dm->matrix().topLeftCorner(k, k);
    return rho;
  }
  return tabulate_from_characteristic(state, cutoff, options);
}

Eigen::MatrixXcd thermal_density(double nbar, int cutoff) {
  check_cutoff(cutoff);
  if (!(nbar >= 0.0) || !std::isfinite(nbar))
    throw DomainError("nbar must be finite and >= 0");
  Eigen::MatrixXcd rho = Eigen::MatrixXcd::Zero(cutoff, cutoff);
  const double q = nbar / (nbar + 1.0);
  double p = 1.0 / (nbar + 1.0);
  for (int m = 0; m < cutoff; ++m) {
    rho(m, m) = p;
    p *= q;
  }
  return rho;
}

Eigen::MatrixXcd fock_density(int n, int cutoff) {
  check_cutoff(cutoff);
  if (n < 0) throw DomainError("Fock n must be >= 0");
  Eigen::MatrixXcd rho = Eigen::MatrixXcd::Zero(cutoff, cutoff);
  if (n < cutoff) rho(n, n) = 1.0;
  return rho;
}

Eigen::VectorXcd coherent_amplitudes(cplx alpha, int cutoff) {
  check_cutoff(cutoff);
  Eigen::VectorXcd c(cutoff);
  const double a = std::abs(alpha);
  const double ph = a > 0.0 ? std::arg(alpha) : 0.0;
  for (int m = 0; m < cutoff; ++m) {
    if (a == 0.0) {
      c[m] = m == 0 ? 1.0 : 0.0;
      continue;
    }
    const double lg = -0.5 * a * a + m * std::log(a) - 0.5 * std::lgamma(m + 1.0);
    c[m] = std::polar(std::exp(lg), m * ph);
  }
  return c;
}

Eigen::MatrixXcd pure_density(const Eigen::VectorXcd& amplitudes) {
  return amplitudes * amplitudes.adjoint();
}

Eigen::MatrixXcd coherent_density(cplx alpha, int cutoff) {
  return pure_density(coherent_amplitudes(alpha, cutoff));
}

Eigen::MatrixXcd cat_density(cplx alpha, double relative_phase_rad, int cutoff) {
  const double norm2 = 2.0 + 2.0 * std::cos(relative_phase_rad) * std::exp(-2.0 * std::norm(alpha));
  if (!(norm2 > 1e-300)) throw DomainError("cat state has zero norm");
  const Eigen::VectorXcd c = (coherent_amplitudes(alpha, cutoff) +
                              std::polar(1.0, relative_phase_rad) * coherent_amplitudes(-alpha, cutoff)) /
                             std::sqrt(norm2);
  return pure_density(c);
}

Eigen::MatrixXcd squeezed_density(double r, double theta_rad, double nbar, cplx alpha, int cutoff) {
  check_cutoff(cutoff);
  const detail::SerialEigenScope serial;
  if (!(r >= 0.0) || !(nbar >= 0.0)) throw DomainError("squeezed: r and nbar must be >= 0");
  const double q = nbar / (nbar + 1.0);
  const int n_thermal =
      nbar == 0.0 ? 1 : std::max(1, static_cast<int>(std::ceil(std::log(1e-18) / std::log(q))));
  const double ch = std::cosh(r), sh = std::sinh(r), th = std::tanh(r);
  const cplx e_up = std::polar(1.0, theta_rad);
  int w = std::max(cutoff, 16);
  for (int attempt = 0; attempt < 12; ++attempt, w = w * 3 / 2) {
    const int m = w + n_thermal + 2;  // the top n_thermal rows are corrupted by the truncation
    Eigen::VectorXcd v = Eigen::VectorXcd::Zero(m);
    // Squeezed vacuum, Gerry & Knight eq. (7.64): c_{2j} = (-e^{i theta} tanh r)^j
    // sqrt((2j)!)/(2^j j!) / sqrt(cosh r), by the ratio c_{2j+2}/c_{2j}.
    cplx c = 1.0 / std::sqrt(ch);
    for (int j = 0; 2 * j < m; ++j) {
      v[2 * j] = c;
      c *= -e_up * th * std::sqrt((2.0 * j + 1.0) / (2.0 * j + 2.0));
    }
    Eigen::MatrixXcd sigma = Eigen::MatrixXcd::Zero(w, w);
    double p = 1.0 / (nbar + 1.0);
    for (int n = 0; n < n_thermal; ++n) {
      sigma += p * v.head(w) * v.head(w).adjoint();
      // v <- (cosh r a^dag + e^{-i theta} sinh r a) v / sqrt(n+1)
      Eigen::VectorXcd next = Eigen::VectorXcd::Zero(m);
      for (int i = 0; i < m; ++i) {
        if (i > 0) next[i] += ch * std::sqrt(static_cast<double>(i)) * v[i - 1];
        if (i + 1 < m) next[i] += std::conj(e_up) * sh * std::sqrt(i + 1.0) * v[i + 1];
      }
      v = next / std::sqrt(n + 1.0);
      p *= q;
    }
    if (1.0 - sigma.trace().real() > 1e-15) continue;
    if (alpha != cplx(0.0)) {
      const Eigen::MatrixXcd d = displacement_matrix(w, alpha);
      sigma = d * sigma * d.adjoint();
    }
    return sigma.topLeftCorner(cutoff, cutoff);
  }
  throw UnsupportedError("squeezed state: r = " + std::to_string(r) +
                         " needs more Fock levels than the tabulation allows");
}

Eigen::MatrixXcd apply_outcome(const ModularMeasurement& m, int outcome, const Eigen::MatrixXcd& rho) {
  const detail::SerialEigenScope serial;
  const int n = static_cast<int>(rho.rows());
  const cplx ph = std::polar(1.0, m.phase_rad);
  Eigen::MatrixXcd t0, t1;
  if (m.split == Split::symmetric) {
    const Eigen::MatrixXcd a = displacement_matrix(n, -0.5 * m.beta);
    const Eigen::MatrixXcd b = displacement_matrix(n, 0.5 * m.beta);
    const Eigen::MatrixXcd ar = a * rho, br = b * rho;
    const Eigen::MatrixXcd bra = br * a.adjoint();
    t0 = 0.25 * (ar * a.adjoint() + br * b.adjoint());
    t1 = 0.25 * (ph * bra + std::conj(ph) * bra.adjoint());
  } else {
    const Eigen::MatrixXcd b = displacement_matrix(n, m.beta);
    const Eigen::MatrixXcd br = b * rho;
    t0 = 0.25 * (rho + br * b.adjoint());
    t1 = 0.25 * (ph * br + std::conj(ph) * br.adjoint());
  }
  return t0 + (m.contrast * outcome) * t1;
}

double edge_population(const Eigen::MatrixXcd& rho, int edge) {
  const int n = static_cast<int>(rho.rows());
  const int e = std::clamp(edge, 1, n);
  return rho.diagonal().tail(e).real().sum();
}

}  // namespace macroreal
