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

}  // namespace macroreal::testing
