// Truncated Fock-basis matrix of D(beta) from the Laguerre closed form (displacement_matrix.hpp).
#include "fock/displacement_matrix.hpp"

#include <cmath>
#include <string>

#include "core/error.hpp"

namespace macroreal {

namespace {

// f_n, n = 0..len-1, on diagonal k >= 0 (real; see the header).
void normalised_laguerre_diagonal(int k, double x, int len, double* out) {
  if (len <= 0) return;
  if (x == 0.0) {  // D(0) = identity
    for (int n = 0; n < len; ++n) out[n] = (k == 0) ? 1.0 : 0.0;
    return;
  }
  // f_n = g_n * exp(scale); g is rescaled whenever it grows large.
  double scale = 0.5 * k * std::log(x) - 0.5 * std::lgamma(k + 1.0) - 0.5 * x;
  double g_prev = 0.0, g = 1.0;
  out[0] = std::exp(scale);
  for (int n = 0; n + 1 < len; ++n) {
    const double a = (2.0 * n + 1.0 + k - x);
    const double b = std::sqrt(static_cast<double>(n) * (n + k));
    const double g_next = (a * g - b * g_prev) / std::sqrt((n + 1.0) * (n + 1.0 + k));
    g_prev = g;
    g = g_next;
    const double mag = std::abs(g);
    if (mag > 1e150 || (mag < 1e-150 && mag > 0.0)) {
      scale += std::log(mag);
      g_prev /= mag;
      g /= mag;
    }
    out[n + 1] = g * std::exp(scale);  // underflows to 0 only where the value is negligible
  }
}

void check_args(int dim, cplx beta) {
  if (dim < 1) throw DomainError("displacement matrix dimension = " + std::to_string(dim) +
                                 ", but must be >= 1");
  if (!std::isfinite(beta.real()) || !std::isfinite(beta.imag()))
    throw DomainError("displacement beta must be finite");
}

}  // namespace

void detail::normalised_laguerre(int k, double x, int len, double* out) {
  normalised_laguerre_diagonal(k, x, len, out);
}

Eigen::VectorXcd displacement_diagonal(int dim, int k, cplx beta) {
  check_args(dim, beta);
  const int ak = std::abs(k);
  if (ak >= dim) return Eigen::VectorXcd();
  const int len = dim - ak;
  Eigen::VectorXd f(len);
  normalised_laguerre_diagonal(ak, std::norm(beta), len, f.data());
  // Phase: beta^k / |beta|^k below the main diagonal, (-beta*)^k / |beta|^k above it.
  cplx phase = 1.0;
  if (ak > 0 && std::abs(beta) > 0.0) {
    const double arg = std::arg(beta);
    phase = (k > 0) ? std::polar(1.0, ak * arg) : std::polar(1.0, -ak * arg) * ((ak % 2) ? -1.0 : 1.0);
  }
  return f.cast<cplx>() * phase;
}

Eigen::MatrixXcd displacement_matrix(int dim, cplx beta) {
  check_args(dim, beta);
  Eigen::MatrixXcd d(dim, dim);
  const double x = std::norm(beta);
  const double arg = std::abs(beta) > 0.0 ? std::arg(beta) : 0.0;
  Eigen::VectorXd f(dim);
  for (int k = 0; k < dim; ++k) {
    const int len = dim - k;
    normalised_laguerre_diagonal(k, x, len, f.data());
    const cplx below = std::polar(1.0, k * arg);                        // beta^k / |beta|^k
    const cplx above = std::polar(1.0, -k * arg) * ((k % 2) ? -1.0 : 1.0);  // (-beta*)^k / |beta|^k
    for (int n = 0; n < len; ++n) {
      d(n + k, n) = f[n] * below;
      if (k > 0) d(n, n + k) = f[n] * above;
    }
  }
  return d;
}

}  // namespace macroreal
