#include "design/power.hpp"

#include <cmath>
#include <string>

#include <boost/math/distributions/normal.hpp>

#include "core/error.hpp"

namespace macroreal {

namespace {

void check_level(double alpha, double power) {
  if (!(alpha > 0.0 && alpha < 1.0))
    throw DomainError("power: alpha = " + std::to_string(alpha) + ", but must be in (0, 1)");
  if (!(power > 0.0 && power < 1.0))
    throw DomainError("power: target power = " + std::to_string(power) + ", but must be in (0, 1)");
}

void check_se(double se, const char* name) {
  if (!(se > 0.0) || !std::isfinite(se))
    throw DomainError(std::string("power: ") + name + " = " + std::to_string(se) +
                      ", but must be finite and > 0");
}

}  // namespace

double z_quantile(double p) {
  if (!(p > 0.0 && p < 1.0))
    throw DomainError("normal quantile: p = " + std::to_string(p) + ", but must be in (0, 1)");
  return boost::math::quantile(boost::math::normal_distribution<double>(), p);
}

double normal_cdf(double x) {
  if (std::isnan(x)) return x;
  if (x == INFINITY) return 1.0;
  if (x == -INFINITY) return 0.0;
  return boost::math::cdf(boost::math::normal_distribution<double>(), x);
}

double power_one_sided(double effect, double se1, double alpha) {
  check_se(se1, "se1");
  return normal_cdf(effect / se1 - z_quantile(1.0 - alpha));
}

double power_two_sided(double theta, double se0, double se1, double alpha) {
  check_se(se0, "se0");
  check_se(se1, "se1");
  const double z = z_quantile(1.0 - alpha / 2.0);
  return normal_cdf((theta - z * se0) / se1) + normal_cdf((-theta - z * se0) / se1);
}

double power_tost(double theta, double margin, double se_lo, double se_hi, double se1, double alpha) {
  check_se(se_lo, "se_lo");
  check_se(se_hi, "se_hi");
  check_se(se1, "se1");
  if (!(margin > 0.0))
    throw DomainError("power: margin = " + std::to_string(margin) + ", but must be > 0");
  const double z = z_quantile(1.0 - alpha);
  const double upper = margin - z * se_hi, lower = -margin + z * se_lo;
  if (!(upper > lower)) return 0.0;  // the acceptance region is empty
  return std::max(0.0, normal_cdf((upper - theta) / se1) - normal_cdf((lower - theta) / se1));
}

double units_one_sided(double effect, double sd1, double alpha, double power) {
  check_level(alpha, power);
  check_se(sd1, "sd1");
  if (!(effect > 0.0))
    throw DomainError("sample size: effect (theta - bound) = " + std::to_string(effect) +
                      ", but must be > 0 for a one-sided test of H0: theta <= bound");
  const double z = z_quantile(1.0 - alpha) + z_quantile(power);
  return z * z * sd1 * sd1 / (effect * effect);
}

double units_two_sided(double theta, double sd0, double sd1, double alpha, double power) {
  check_level(alpha, power);
  check_se(sd0, "sd0");
  check_se(sd1, "sd1");
  if (!(theta != 0.0) || !std::isfinite(theta))
    throw DomainError("sample size: effect = " + std::to_string(theta) +
                      ", but a two-sided test needs a nonzero effect");
  const double a = z_quantile(1.0 - alpha / 2.0) * sd0 + z_quantile(power) * sd1;
  return a * a / (theta * theta);
}

double units_tost(double theta, double margin, double sd1, double alpha, double power) {
  check_level(alpha, power);
  check_se(sd1, "sd1");
  if (!(margin > std::abs(theta)))
    throw DomainError("sample size: |theta| = " + std::to_string(std::abs(theta)) +
                      " is not inside the margin " + std::to_string(margin) +
                      ", so equivalence cannot be shown with any sample size");
  const double z = z_quantile(1.0 - alpha) + z_quantile(1.0 - (1.0 - power) / 2.0);
  const double d = margin - std::abs(theta);
  return z * z * sd1 * sd1 / (d * d);
}

double solve_units(const std::function<double(double)>& power_at, double target, double guess) {
  if (!(guess > 0.0) || !std::isfinite(guess))
    throw DomainError("sample size: starting guess = " + std::to_string(guess) + ", but must be > 0");
  double lo = guess, hi = guess;
  while (power_at(lo) >= target && lo > guess * 1e-30) lo /= 2.0;
  while (power_at(hi) < target) {
    hi *= 2.0;
    if (hi > guess * 1e30)
      throw DomainError("sample size: the target power " + std::to_string(target) +
                        " is not reached by any sample size (the power levels off below it)");
  }
  // Bisection in log t.
  for (int it = 0; it < 200 && hi / lo > 1.0 + 1e-12; ++it) {
    const double mid = std::sqrt(lo * hi);
    (power_at(mid) >= target ? hi : lo) = mid;
  }
  return hi;
}

}  // namespace macroreal
