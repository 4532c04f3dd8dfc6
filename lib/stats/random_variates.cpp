#include "stats/random_variates.hpp"

#include <algorithm>
#include <cmath>
#include <string>

#include "core/error.hpp"

namespace macroreal {

std::uint64_t derive_seed(std::uint64_t seed, std::uint64_t index) {
  std::uint64_t z = seed + 0x9e3779b97f4a7c15ULL * (index + 1);
  z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ULL;
  z = (z ^ (z >> 27)) * 0x94d049bb133111ebULL;
  return z ^ (z >> 31);
}

double standard_normal(RandomEngine& g) {
  const double u1 = uniform01(g), u2 = uniform01(g);
  return std::sqrt(-2.0 * std::log(u1)) * std::cos(6.283185307179586 * u2);
}

namespace {

// log(k!) - [(k + 1/2) log(k + 1) - (k + 1) + log(2 pi)/2], the Stirling remainder used by BTRD.
// Values for k < 10 computed with mpmath at 30 digits; the series beyond (Hormann 1993, eq. for fc).
double stirling_tail(double k) {
  static constexpr double table[10] = {
      0.081061466795327261, 0.041340695955409297, 0.027677925684998338, 0.020790672103765093,
      0.016644691189821193, 0.013876128823070748, 0.01189670994589177,  0.010411265261972096,
      0.0092554621827127329, 0.0083305634333628708};
  if (k < 10) return table[static_cast<int>(k)];
  const double r = 1.0 / (k + 1.0), r2 = r * r;
  return (1.0 / 12 - (1.0 / 360 - r2 / 1260) * r2) * r;
}

// Sequential search inversion; mean number of steps n p + 1. Requires p <= 1/2.
long binomial_inversion(RandomEngine& g, long n, double p) {
  const double q = 1.0 - p, s = p / q, a = (n + 1) * s;
  const double r0 = std::pow(q, static_cast<double>(n));
  for (;;) {
    double r = r0, u = uniform01(g);
    long x = 0;
    while (u > r) {
      u -= r;
      ++x;
      if (x > n) break;  // round-off left mass beyond n: draw again
      r *= a / x - s;
    }
    if (x <= n) return x;
  }
}

// BTRD (Hormann 1993, algorithm BTRD, steps 0-5). Requires p <= 1/2 and n p >= 10.
long binomial_btrd(RandomEngine& g, long n, double p) {
  const double nd = static_cast<double>(n);
  const double npq = nd * p * (1.0 - p);
  const double spq = std::sqrt(npq);
  const double b = 1.15 + 2.53 * spq;
  const double a = -0.0873 + 0.0248 * b + 0.01 * p;
  const double c = nd * p + 0.5;
  const double alpha = (2.83 + 5.1 / b) * spq;
  const double vr = 0.92 - 4.2 / b;
  const double urvr = 0.86 * vr;
  const double m = std::floor((nd + 1.0) * p);
  const double r = p / (1.0 - p);
  const double nr = (nd + 1.0) * r;
  for (;;) {
    double v = uniform01(g);
    double u;
    if (v <= urvr) {  // step 1: the inner box, accepted at once
      u = v / vr - 0.43;
      return static_cast<long>(std::floor((2.0 * a / (0.5 - std::fabs(u)) + b) * u + c));
    }
    if (v >= vr) {  // step 2: the outer region
      u = uniform01(g) - 0.5;
    } else {
      u = v / vr - 0.93;
      u = std::copysign(0.5, u) - u;
      v = uniform01(g) * vr;
    }
    const double us = 0.5 - std::fabs(u);  // step 3
    const double k = std::floor((2.0 * a / us + b) * u + c);
    if (k < 0.0 || k > nd) continue;
    v = v * alpha / (a / (us * us) + b);
    const double km = std::fabs(k - m);
    if (km <= 15.0) {  // step 3.1: recursive evaluation of f(k)/f(m)
      double f = 1.0;
      if (m < k) {
        for (double i = m + 1.0; i <= k; i += 1.0) f *= nr / i - r;
      } else if (m > k) {
        for (double i = k + 1.0; i <= m; i += 1.0) v *= nr / i - r;
      }
      if (v <= f) return static_cast<long>(k);
      continue;
    }
    v = std::log(v);  // step 4: squeeze
    const double rho = (km / npq) * (((km / 3.0 + 0.625) * km + 1.0 / 6.0) / npq + 0.5);
    const double t = -km * km / (2.0 * npq);
    if (v < t - rho) return static_cast<long>(k);
    if (v > t + rho) continue;
    const double nm = nd - m + 1.0;  // step 5: final acceptance with Stirling's formula
    const double h = (m + 0.5) * std::log((m + 1.0) / (r * nm)) + stirling_tail(m) +
                     stirling_tail(nd - m);
    const double nk = nd - k + 1.0;
    if (v <= h + (nd + 1.0) * std::log(nm / nk) + (k + 0.5) * std::log(nk * r / (k + 1.0)) -
                 stirling_tail(k) - stirling_tail(nd - k))
      return static_cast<long>(k);
  }
}

}  // namespace

long binomial(RandomEngine& g, long n, double p) {
  if (n < 0) throw DomainError("binomial: n = " + std::to_string(n) + ", but must be >= 0");
  if (!(p >= 0.0 && p <= 1.0))
    throw DomainError("binomial: p = " + std::to_string(p) + ", but must be in [0, 1]");
  if (n == 0 || p == 0.0) return 0;
  if (p == 1.0) return n;
  const bool flip = p > 0.5;
  const double pp = flip ? 1.0 - p : p;
  const long k = (static_cast<double>(n) * pp < 10.0) ? binomial_inversion(g, n, pp)
                                                     : binomial_btrd(g, n, pp);
  return flip ? n - k : k;
}

void multinomial(RandomEngine& g, long n, std::span<const double> weights, std::span<double> out) {
  MACROREAL_CHECK(out.size() == weights.size());
  const std::size_t J = weights.size();
  for (double w : weights)
    if (!(w >= 0.0) || !std::isfinite(w))
      throw DomainError("multinomial: weight = " + std::to_string(w) + ", but must be >= 0");
  long left = n;
  for (std::size_t j = 0; j < J; ++j) {
    // Suffix sums are recomputed (J is small) so that a zero-weight cell can never receive
    // a count through round-off in a running difference.
    double rest = 0.0;
    for (std::size_t i = j; i < J; ++i) rest += weights[i];
    if (left == 0) {
      out[j] = 0.0;
      continue;
    }
    if (!(rest > 0.0)) throw DomainError("multinomial: all weights are zero but n > 0");
    const double p = std::min(1.0, weights[j] / rest);
    const long k = (j + 1 == J) ? left : binomial(g, left, p);
    out[j] = static_cast<double>(k);
    left -= k;
  }
}

}  // namespace macroreal
