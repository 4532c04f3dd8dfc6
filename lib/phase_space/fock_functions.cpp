// Log-scaled Laguerre recurrence and Fock/coherent matrix elements (fock_functions.hpp).
#include "phase_space/fock_functions.hpp"

#include <cmath>

#include "core/error.hpp"
#include "phase_space/state.hpp"

namespace macroreal {
namespace detail {

ScaledValue laguerre_scaled(int n, int a, double x) {
  // (k+1) L_{k+1} = (2k+1+a-x) L_k - (k+a) L_{k-1}, L_0 = 1, L_1 = 1+a-x (Abramowitz &
  // Stegun 22.7.12). The running pair is rescaled by 2^-500 whenever it grows past 1e150;
  // the scale is exact (a power of two) and accumulated in log form.
  constexpr double kBig = 1e150;
  constexpr double kFactor = 0x1p-500;
  const double kLogFactor = -500.0 * std::log(2.0);
  ScaledValue r;
  if (n == 0) {
    r.mantissa = 1.0;
    return r;
  }
  double y0 = 1.0, y1 = 1.0 + a - x;
  for (int k = 1; k < n; ++k) {
    const double y2 = ((2.0 * k + 1.0 + a - x) * y1 - (k + a) * y0) / (k + 1.0);
    y0 = y1;
    y1 = y2;
    if (std::abs(y1) > kBig) {
      y0 *= kFactor;
      y1 *= kFactor;
      r.log_scale -= kLogFactor;
    }
  }
  r.mantissa = y1;
  return r;
}

cplx fock_coherent_overlap(int m, cplx gamma) {
  if (gamma == cplx(0.0)) return m == 0 ? 1.0 : 0.0;
  const cplx log_amp = -0.5 * std::norm(gamma) + static_cast<double>(m) * std::log(gamma) -
                       0.5 * std::lgamma(m + 1.0);
  return std::exp(log_amp);
}

}  // namespace detail

double fock_characteristic(int n, double abs_beta_squared) {
  if (n < 0) throw DomainError("Fock n = " + std::to_string(n) + ", but must be >= 0");
  const double x = abs_beta_squared;
  if (x == 0.0) return 1.0;
  const auto l = detail::laguerre_scaled(n, 0, x);
  if (l.mantissa == 0.0) return 0.0;
  // Combine in log form: the scale may exceed the double range while the product does not.
  return std::copysign(std::exp(std::log(std::abs(l.mantissa)) + l.log_scale - 0.5 * x),
                       l.mantissa);
}

cplx displacement_matrix_element(int m, int n, cplx beta) {
  if (m < 0 || n < 0)
    throw DomainError("Fock indices (" + std::to_string(m) + ", " + std::to_string(n) +
                      "), but must be >= 0");
  // <m|D(b)|n> = conj(<n|D(b)^dag|m>) = conj(<n|D(-b)|m>) reduces m < n to m > n.
  if (m < n) return std::conj(displacement_matrix_element(n, m, -beta));
  const double x = std::norm(beta);
  if (x == 0.0) return m == n ? 1.0 : 0.0;
  const int a = m - n;
  const auto l = detail::laguerre_scaled(n, a, x);
  if (l.mantissa == 0.0) return 0.0;
  const double log_mod = 0.5 * (std::lgamma(n + 1.0) - std::lgamma(m + 1.0)) +
                         a * 0.5 * std::log(x) - 0.5 * x + l.log_scale;
  const double mod =
      std::copysign(std::exp(log_mod + std::log(std::abs(l.mantissa))), l.mantissa);
  const double arg = a * std::arg(beta);
  return {mod * std::cos(arg), mod * std::sin(arg)};
}

}  // namespace macroreal
