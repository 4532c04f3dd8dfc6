// Independent reference for the phase-space tests: operators as truncated Fock-space matrices.
// S(xi) = exp((xi* a^2 - xi a^dag^2)/2) by Eigen's general matrix exponential
// (unsupported/MatrixFunctions, Pade approximation with scaling and squaring; Higham, SIAM J.
// Matrix Anal. Appl. 26, 1179 (2005)); D(b) = exp(b a^dag - b* a) by the spectral
// decomposition of the Hermitian generator i(a^dag - a) = V L V^dag (cached per dimension):
// D(b) = E V e^{-i|b| L} V^dag E^dag with E = diag(e^{i n arg b}). Truncation at dimension N
// only disturbs elements near the edge, so tests compare the block of low indices with
// N >> |b|^2 + index.
#pragma once

#include <complex>
#include <map>

#include <Eigen/Dense>
#include <Eigen/Eigenvalues>

#include "phase_space/channel.hpp"
#include <unsupported/Eigen/MatrixFunctions>

namespace macroreal::testing {

using Mat = Eigen::MatrixXcd;
using Vec = Eigen::VectorXcd;
using cd = std::complex<double>;

inline Mat annihilation(int dim) {
  Mat a = Mat::Zero(dim, dim);
  for (int n = 1; n < dim; ++n) a(n - 1, n) = std::sqrt(static_cast<double>(n));
  return a;
}

struct GeneratorSpectrum {
  Eigen::VectorXd values;
  Mat vectors;
};

inline const GeneratorSpectrum& generator_spectrum(int dim) {
  static std::map<int, GeneratorSpectrum> cache;  // tests are single-threaded
  auto it = cache.find(dim);
  if (it != cache.end()) return it->second;
  const Mat a = annihilation(dim);
  const Mat h = cd(0.0, 1.0) * (a.adjoint() - a);
  Eigen::SelfAdjointEigenSolver<Mat> es(h);
  return cache.emplace(dim, GeneratorSpectrum{es.eigenvalues(), es.eigenvectors()}).first->second;
}

inline Mat displacement_matrix(int dim, cd beta) {
  const auto& g = generator_spectrum(dim);
  const double r = std::abs(beta), phi = std::arg(beta);
  Eigen::VectorXcd ph(dim), e(dim);
  for (int k = 0; k < dim; ++k) {
    ph(k) = std::polar(1.0, -r * g.values(k));
    e(k) = std::polar(1.0, phi * k);
  }
  // D(r e^{i phi}) = U^dag D(r) U with U = exp(-i phi a^dag a) (U^dag a U = a e^{-i phi}).
  return e.asDiagonal() * (g.vectors * ph.asDiagonal() * g.vectors.adjoint()) *
         e.conjugate().asDiagonal();
}

inline Mat squeeze_matrix(int dim, cd xi) {
  const Mat a = annihilation(dim);
  const Mat g = 0.5 * (std::conj(xi) * a * a - xi * a.adjoint() * a.adjoint());
  return g.exp();
}

inline Mat rotation_matrix(int dim, double theta) {  // exp(-i theta a^dag a)
  Mat u = Mat::Zero(dim, dim);
  for (int n = 0; n < dim; ++n) u(n, n) = std::polar(1.0, -theta * n);
  return u;
}

inline Vec fock_vector(int dim, int n) {
  Vec v = Vec::Zero(dim);
  v(n) = 1.0;
  return v;
}

inline Vec coherent_vector(int dim, cd alpha) {
  return displacement_matrix(dim, alpha) * fock_vector(dim, 0);
}

inline Mat thermal_matrix(int dim, double nbar) {
  Mat r = Mat::Zero(dim, dim);
  const double q = nbar / (nbar + 1.0);
  double p = 1.0 / (nbar + 1.0);
  for (int n = 0; n < dim; ++n, p *= q) r(n, n) = p;
  return r;
}

// Tr[rho D(beta)].
inline cd chi_of(const Mat& rho, cd beta) {
  return (rho * displacement_matrix(static_cast<int>(rho.rows()), beta)).trace();
}

// The Lindblad equation of DESIGN.md §2 (D[L] rho = L rho L^dag - 1/2 {L^dag L, rho}) with all generators added: damping gamma(n_th+1) D[a]
// + gamma n_th D[a^dag], heating and force noise (ndot + f)(D[a] + D[a^dag]), dephasing
// kappa D[a^dag a]; integrated over t with classical fourth-order Runge-Kutta (Press et al.,
// Numerical Recipes, 3rd ed. (2007), eq. 17.1.3). Quasi-static frequency noise is not included.
inline Mat lindblad_evolve(const macroreal::NoiseModel& nm, Mat rho, double t, int steps) {
  if (t <= 0.0) return rho;
  const int dim = static_cast<int>(rho.rows());
  const double g = nm.damping_rate_per_s, nth = nm.bath_nbar;
  const double h = nm.heating_quanta_per_s + nm.force_noise_quanta_per_s;
  const double k = nm.dephasing_rate_per_s;
  const double down = g * (nth + 1) + h, up = g * nth + h;  // rates of D[a] and D[a^dag]
  // Element-wise in the Fock basis: (D[a] rho)_mn = sqrt((m+1)(n+1)) rho_{m+1,n+1}
  // - (m+n)/2 rho_mn; (D[a^dag] rho)_mn = sqrt(mn) rho_{m-1,n-1} - (m+n+2)/2 rho_mn;
  // (D[a^dag a] rho)_mn = -(m-n)^2/2 rho_mn.
  auto rhs = [&](const Mat& r) -> Mat {
    Mat o(dim, dim);
    for (int n = 0; n < dim; ++n)
      for (int m = 0; m < dim; ++m) {
        cd v = -(down * 0.5 * (m + n) + up * 0.5 * (m + n + 2) + k * 0.5 * (m - n) * (m - n)) *
               r(m, n);
        if (m + 1 < dim && n + 1 < dim) v += down * std::sqrt((m + 1.0) * (n + 1.0)) * r(m + 1, n + 1);
        if (m > 0 && n > 0) v += up * std::sqrt(1.0 * m * n) * r(m - 1, n - 1);
        o(m, n) = v;
      }
    return o;
  };
  const double dt = t / steps;
  for (int s = 0; s < steps; ++s) {
    const Mat k1 = rhs(rho);
    const Mat k2 = rhs(rho + 0.5 * dt * k1);
    const Mat k3 = rhs(rho + 0.5 * dt * k2);
    const Mat k4 = rhs(rho + dt * k3);
    rho += dt / 6.0 * (k1 + 2.0 * k2 + 2.0 * k3 + k4);
  }
  return rho;
}

}  // namespace macroreal::testing
