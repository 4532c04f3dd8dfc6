// The Gaussian significance ("sigma") of p-values (stats/leggett_garg_tests.hpp): one-sided
// tests Phi^-1(1 - p), never negative; two-sided tests Phi^-1(1 - p/2). Reference values from
// SciPy (scipy.stats.norm.isf and chi2_contingency) in tests/reference/scipy_gaussian_sigma.py.
#include <catch2/catch.hpp>

#include <cmath>
#include <fstream>
#include <stdexcept>
#include <string>

#include <nlohmann/json.hpp>

#include "core/error.hpp"
#include "stats/leggett_garg_tests.hpp"
#include "stats/nsit_tests.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

nlohmann::json reference() {
  std::ifstream in(std::string(MACROREAL_SOURCE_DIR) + "/tests/reference/scipy_gaussian_sigma.json");
  if (!in) throw std::runtime_error("tests/reference/scipy_gaussian_sigma.json missing");
  return nlohmann::json::parse(in);
}

}  // namespace

TEST_CASE("Gaussian sigma of a one-sided p-value is norm.isf(p), never negative", "[stats]") {
  const auto ref = reference();
  // Source: scipy.stats.norm.isf(p) (the script). Tolerance: Boost's quantile is accurate to
  // a few ulp; 1e-12 relative leaves room for the complement's rounding.
  for (const auto& row : ref["one_sided_isf_p"]) {
    const double p = row[0].get<double>();
    INFO("p = " << p);
    bool capped = true;
    CHECK_CLOSE(gaussian_sigma(p, Sidedness::one_sided, &capped), row[1].get<double>(), 1e-15, 1e-12);
    CHECK_FALSE(capped);
  }
  // p >= 1/2: norm.isf(p) <= 0 (the script prints the negative values), but data on the
  // null's side are no evidence against it, so the significance is 0 (the convention of
  // Cowan, Cranmer, Gross & Vitells, Eur. Phys. J. C 71:1554 (2011), sec. 2: Z = Phi^-1(1 - p),
  // and a deficit gives Z = 0).
  for (const auto& row : ref["one_sided_isf_p_above_half"]) {
    const double p = row[0].get<double>();
    INFO("p = " << p);
    CHECK(row[1].get<double>() <= 0.0);
    CHECK(gaussian_sigma(p, Sidedness::one_sided) == 0.0);
  }
  CHECK(gaussian_sigma(1.0, Sidedness::one_sided) == 0.0);
  bool capped = false;
  CHECK(std::isfinite(gaussian_sigma(0.0, Sidedness::one_sided, &capped)));
  CHECK(capped);
  CHECK_THROWS_AS(gaussian_sigma(1.5, Sidedness::one_sided), DomainError);
  CHECK_THROWS_AS(gaussian_sigma(-0.1, Sidedness::two_sided), DomainError);
}

TEST_CASE("Gaussian sigma of a two-sided p-value is norm.isf(p / 2)", "[stats]") {
  const auto ref = reference();
  // Source: scipy.stats.norm.isf(p / 2) (the script); every value is >= 0, 0 only at p = 1.
  for (const auto& row : ref["two_sided_isf_half_p"]) {
    const double p = row[0].get<double>();
    INFO("p = " << p);
    bool capped = true;
    CHECK_CLOSE(gaussian_sigma(p, Sidedness::two_sided, &capped), row[1].get<double>(), 1e-15, 1e-12);
    CHECK_FALSE(capped);
  }
  CHECK(gaussian_sigma(1.0, Sidedness::two_sided) == 0.0);
  bool capped = false;
  CHECK(std::isfinite(gaussian_sigma(0.0, Sidedness::two_sided, &capped)));
  CHECK(capped);
  // A two-sided z test's p = 2 norm.sf(|z|) (the script) gives back sigma = |z|.
  for (const auto& row : ref["two_sided_p_of_z"])
    CHECK_CLOSE(gaussian_sigma(row[1].get<double>(), Sidedness::two_sided), row[0].get<double>(), 1e-12, 1e-10);
}

TEST_CASE("Test results carry the sigma of their sidedness", "[stats]") {
  const auto ref = reference();
  // One-sided LG z test with the estimate below the bound: z = -1.5, p = 1 - Phi(-1.5) > 1/2,
  // significance 0 (the signed z stays in the statistic).
  const TestResult below = lg_z_test(0.85, 0.1, 1.0);
  CHECK_CLOSE(below.statistic, -1.5, 1e-12, 0.0);
  CHECK(below.p_value > 0.5);
  CHECK(below.sigma == 0.0);
  // Two-sided score test of two binomials, 30 of 100 against 45 of 100: the pooled z test,
  // whose square is Pearson's chi-square without continuity correction
  // (scipy.stats.chi2_contingency in the script). Its sigma is |z| = sqrt(chi2), not
  // Phi^-1(1 - p) (which would be 1.90 here).
  LinearFunctional f;
  f.coef = {{1.0, 0.0}, {-1.0, 0.0}};
  const CellCounts c = {{30.0, 70.0}, {45.0, 55.0}};
  const TestResult s = nsit_score_test(c, f);
  const auto& chi = ref["score_30_of_100_vs_45_of_100"];
  CHECK_CLOSE(s.p_value, chi["p"].get<double>(), 1e-12, 1e-9);
  CHECK_CLOSE(std::abs(s.statistic), chi["sqrt_chi2"].get<double>(), 1e-12, 1e-9);
  CHECK_CLOSE(s.sigma, chi["sqrt_chi2"].get<double>(), 1e-12, 1e-9);
  // The exact two-sided tests use the two-sided conversion of their own p-value.
  const TestResult b = barnard_exact_test(30, 100, 45, 100);
  CHECK(b.sigma == gaussian_sigma(b.p_value, Sidedness::two_sided));
  const TestResult bo = boschloo_exact_test(30, 100, 45, 100);
  CHECK(bo.sigma == gaussian_sigma(bo.p_value, Sidedness::two_sided));
  // Nearly equal proportions: p > 1/2, and the two-sided sigma is still |z| >= 0.
  const TestResult same = nsit_score_test({{40.0, 60.0}, {41.0, 59.0}}, f);
  CHECK(same.p_value > 0.5);
  CHECK(same.sigma >= 0.0);
  CHECK_CLOSE(same.sigma, std::abs(same.statistic), 1e-12, 1e-9);
}
