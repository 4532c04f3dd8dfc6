// Normal-approximation power and sample size against published worked examples.
#include <catch2/catch.hpp>

#include <cmath>

#include "core/error.hpp"
#include "design/power.hpp"
#include "support/compare.hpp"

using namespace macroreal;

TEST_CASE("one-sided sample size reproduces the published worked examples", "[design]") {
  // Rosner, Fundamentals of Biostatistics, 7th ed. (2010), pp. 224 and 230, as worked on
  // powerandsamplesize.com ("1 mean, 1-sample, 1-sided"): mu = 115, mu0 = 120, sigma = 24,
  // alpha = 0.05, power 0.8 -> n = 143 after rounding up.
  const double n = units_one_sided(5.0, 24.0, 0.05, 0.8);
  CHECK(std::ceil(n) == 143.0);
  CHECK(power_one_sided(5.0, 24.0 / std::sqrt(143.0), 0.05) >= 0.8);
  CHECK(power_one_sided(5.0, 24.0 / std::sqrt(142.0), 0.05) < 0.8);
  // Chow, Shao & Wang, Sample Size Calculations in Clinical Research, 2nd ed. (2008), p. 52
  // (one-sample non-inferiority, worked on powerandsamplesize.com): mu = 2, mu0 = 1.5,
  // delta = -0.5, sigma = 1, alpha = 0.05, power 0.8 -> n = 7; effect mu - mu0 - delta = 1.
  CHECK(std::ceil(units_one_sided(1.0, 1.0, 0.05, 0.8)) == 7.0);
  // The exact solution of power = target is the closed form for the one-sided test.
  const double t = solve_units([](double u) { return power_one_sided(5.0, 24.0 / std::sqrt(u), 0.05); },
                               0.8, 10.0);
  CHECK_CLOSE(t, n, 0.0, 1e-9);
}

TEST_CASE("two-sided sample size and power reproduce Chow, Shao & Wang p. 51", "[design]") {
  // Chow, Shao & Wang (2008) p. 51, one-sample two-sided test of a mean, as worked on
  // powerandsamplesize.com: mu = 2, mu0 = 1.5, sigma = 1, alpha = 0.05, beta = 0.2 ->
  // n = 31.39552, rounded up 32; the power at n = 31.39552 is printed as 0.800001.
  const double n = units_two_sided(0.5, 1.0, 1.0, 0.05, 0.8);
  CHECK_CLOSE(n, 31.39552, 1e-5, 0.0);
  CHECK(std::ceil(n) == 32.0);
  CHECK_CLOSE(power_two_sided(0.5, 1.0 / std::sqrt(31.39552), 1.0 / std::sqrt(31.39552), 0.05),
              0.800001, 1e-6, 0.0);
  // The exact root counts the far tail too, so it lies (slightly) below the closed form.
  const double t = solve_units(
      [](double u) { return power_two_sided(0.5, 1.0 / std::sqrt(u), 1.0 / std::sqrt(u), 0.05); },
      0.8, 1.0);
  CHECK(t <= n);
  CHECK(t > n * 0.999);
}

TEST_CASE("TOST sample size reproduces Chow, Shao & Wang example 3.2.4", "[design]") {
  // Chow, Shao & Wang, Sample Size Calculations in Clinical Research (2003), example 3.2.4
  // (two-sample equivalence), as computed by the R package TrialSize's documentation
  // (TwoSampleMean.Equivalence(alpha = 0.1, beta = 0.1, sigma = 0.1, k = 1, delta = 0.05,
  // margin = 0.01) -> 107): n = (z_{1-alpha} + z_{1-beta/2})^2 sigma^2 (1 + 1/k) / (delta - |eps|)^2.
  // Per-unit variance of the difference of means: sigma^2 (1 + 1/k) = 0.02.
  const double n = units_tost(0.01, 0.05, std::sqrt(0.02), 0.1, 0.9);
  CHECK(std::floor(n) == 107.0);
  // With theta = 0 and equal standard errors the closed form is the exact normal solution:
  // power = 2 Phi(m / se - z_{1-alpha}) - 1 (Schuirmann 1987's two one-sided tests).
  const double n0 = units_tost(0.0, 0.05, std::sqrt(0.02), 0.1, 0.9);
  const double t0 = solve_units(
      [](double u) {
        const double se = std::sqrt(0.02 / u);
        return power_tost(0.0, 0.05, se, se, se, 0.1);
      },
      0.9, 10.0);
  CHECK_CLOSE(t0, n0, 0.0, 1e-9);
  // theta != 0: the z_{beta/2} closed form is conservative (its power exceeds the target).
  const double se = std::sqrt(0.02 / n);
  CHECK(power_tost(0.01, 0.05, se, se, se, 0.1) > 0.9);
}

TEST_CASE("power functions reject effects and levels outside their domain", "[design]") {
  CHECK_THROWS_AS(units_one_sided(-0.1, 1.0, 0.05, 0.8), DomainError);
  CHECK_THROWS_AS(units_one_sided(0.1, 1.0, 1.5, 0.8), DomainError);
  CHECK_THROWS_AS(units_two_sided(0.0, 1.0, 1.0, 0.05, 0.8), DomainError);
  CHECK_THROWS_WITH(units_tost(0.1, 0.05, 1.0, 0.05, 0.8), Catch::Contains("not inside the margin"));
  CHECK(power_tost(0.0, 0.05, 1.0, 1.0, 1.0, 0.05) == 0.0);  // acceptance region empty
  CHECK_THROWS_AS(solve_units([](double) { return 0.5; }, 0.8, 1.0), DomainError);
}
