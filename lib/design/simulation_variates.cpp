#include "design/simulation_variates.hpp"

#include <cmath>
#include <string>

#include <boost/math/special_functions/gamma.hpp>

#include "core/error.hpp"

namespace macroreal {

namespace {

// Sequential search: mean number of steps mean + 1. exp(-mean) is far from underflow for
// mean < 10. A draw whose remaining mass runs out through round-off is repeated.
long poisson_inversion(RandomEngine& g, double mean) {
  const double p0 = std::exp(-mean);
  for (;;) {
    double u = uniform01(g), p = p0;
    long k = 0;
    while (u > p) {
      u -= p;
      ++k;
      if (k > 200) break;  // P(X > 200 | mean < 10) < 1e-150: only round-off gets here
      p *= mean / static_cast<double>(k);
    }
    if (k <= 200) return k;
  }
}

// PTRS (Hormann 1993, algorithm PTRS with the constants of his table); mean >= 10.
long poisson_ptrs(RandomEngine& g, double mean) {
  const double slam = std::sqrt(mean);
  const double loglam = std::log(mean);
  const double b = 0.931 + 2.53 * slam;
  const double a = -0.059 + 0.02483 * b;
  const double inv_alpha = 1.1239 + 1.1328 / (b - 3.4);
  const double vr = 0.9277 - 3.6224 / (b - 2.0);
  for (;;) {
    const double u = uniform01(g) - 0.5;
    const double v = uniform01(g);
    const double us = 0.5 - std::fabs(u);
    const double k = std::floor((2.0 * a / us + b) * u + mean + 0.43);
    if (us >= 0.07 && v <= vr) return static_cast<long>(k);
    if (k < 0.0 || (us < 0.013 && v > us)) continue;
    if (std::log(v) + std::log(inv_alpha) - std::log(a / (us * us) + b) <=
        -mean + k * loglam - std::lgamma(k + 1.0))
      return static_cast<long>(k);
  }
}

}  // namespace

long poisson(RandomEngine& g, double mean) {
  if (!(mean >= 0.0) || !std::isfinite(mean))
    throw DomainError("poisson: mean = " + std::to_string(mean) + ", but must be finite and >= 0");
  if (mean == 0.0) return 0;
  return mean < 10.0 ? poisson_inversion(g, mean) : poisson_ptrs(g, mean);
}

double poisson_cdf(long k, double mean) {
  if (k < 0) return 0.0;
  if (!(mean >= 0.0) || !std::isfinite(mean))
    throw DomainError("poisson_cdf: mean = " + std::to_string(mean) + ", but must be finite and >= 0");
  if (mean == 0.0) return 1.0;
  return boost::math::gamma_q(static_cast<double>(k) + 1.0, mean);
}

}  // namespace macroreal
