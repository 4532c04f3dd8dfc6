// Wilson, Clopper-Pearson and Newcombe's hybrid score intervals (see the header).
#include "stats/proportion_intervals.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

#include <boost/math/distributions/binomial.hpp>
#include <boost/math/distributions/normal.hpp>

#include "core/error.hpp"

namespace macroreal {

namespace {

std::string num(double x) {
  std::ostringstream os;
  os.precision(12);
  os << x;
  return os.str();
}

void check(double k, double n, double level, const char* what) {
  if (!(n > 0.0) || !std::isfinite(n))
    throw DomainError(std::string(what) + ": trials = " + num(n) + ", but must be positive");
  if (!(k >= 0.0 && k <= n))
    throw DomainError(std::string(what) + ": successes = " + num(k) + ", but must be in [0, " +
                      num(n) + "]");
  if (!(level > 0.0 && level < 1.0))
    throw DomainError(std::string(what) + ": level = " + num(level) + ", but must be in (0, 1)");
}

double two_sided_z(double level) {
  const boost::math::normal_distribution<> unit;
  return boost::math::quantile(boost::math::complement(unit, (1.0 - level) / 2.0));
}

}  // namespace

ProportionInterval wilson_interval(double successes, double trials, double level) {
  check(successes, trials, level, "wilson interval");
  const double z = two_sided_z(level), z2 = z * z, n = trials, p = successes / trials;
  const double denom = 1.0 + z2 / n;
  const double centre = (p + z2 / (2.0 * n)) / denom;
  const double half = z / denom * std::sqrt(p * (1.0 - p) / n + z2 / (4.0 * n * n));
  // At k = 0 or k = n the exact limit is 0 or 1; clamp the rounding of centre - half.
  const double lower = successes == 0.0 ? 0.0 : std::max(0.0, centre - half);
  const double upper = successes == trials ? 1.0 : std::min(1.0, centre + half);
  return {lower, upper, level, "wilson"};
}

ProportionInterval clopper_pearson_interval(double successes, double trials, double level) {
  check(successes, trials, level, "clopper-pearson interval");
  using boost::math::binomial_distribution;
  const double alpha = (1.0 - level) / 2.0;
  const double lower =
      successes == 0.0 ? 0.0 : binomial_distribution<>::find_lower_bound_on_p(trials, successes, alpha);
  const double upper = successes == trials
                           ? 1.0
                           : binomial_distribution<>::find_upper_bound_on_p(trials, successes, alpha);
  return {lower, upper, level, "clopper-pearson"};
}

ProportionInterval newcombe_difference_interval(double k1, double n1, double k2, double n2,
                                                double level) {
  check(k1, n1, level, "newcombe interval (first sample)");
  check(k2, n2, level, "newcombe interval (second sample)");
  const auto w1 = wilson_interval(k1, n1, level);
  const auto w2 = wilson_interval(k2, n2, level);
  const double p1 = k1 / n1, p2 = k2 / n2, d = p1 - p2;
  const double lower = d - std::sqrt((p1 - w1.lower) * (p1 - w1.lower) + (w2.upper - p2) * (w2.upper - p2));
  const double upper = d + std::sqrt((w1.upper - p1) * (w1.upper - p1) + (p2 - w2.lower) * (p2 - w2.lower));
  return {lower, upper, level, "newcombe-hybrid-score"};
}

}  // namespace macroreal
