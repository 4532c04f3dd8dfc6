// Wilson, Clopper-Pearson and Newcombe intervals against SciPy and published values.
#include <fstream>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "core/error.hpp"
#include "stats/proportion_intervals.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

nlohmann::json scipy_reference() {
  // Values computed by tests/reference/scipy_proportions.py with SciPy (see that script).
  std::ifstream in(std::string(MACROREAL_SOURCE_DIR) + "/tests/reference/scipy_proportions.json");
  REQUIRE(in.good());
  return nlohmann::json::parse(in);
}

}  // namespace

TEST_CASE("Wilson interval matches its closed form evaluated with SciPy", "[stats]") {
  const auto ref = scipy_reference();
  int checked = 0;
  for (const auto& c : ref["proportions"]) {
    const auto w = wilson_interval(c["k"].get<double>(), c["n"].get<double>(), c["level"].get<double>());
    INFO("k = " << c["k"] << ", n = " << c["n"] << ", level = " << c["level"]);
    // Source: Wilson (1927) score interval, z from scipy.stats.norm.ppf.
    CHECK_CLOSE(w.lower, c["wilson"][0].get<double>(), 1e-10, 0.0);
    CHECK_CLOSE(w.upper, c["wilson"][1].get<double>(), 1e-10, 0.0);
    CHECK(w.method == "wilson");
    ++checked;
  }
  CHECK(checked == 39);
}

TEST_CASE("Clopper-Pearson interval matches SciPy beta quantiles and binomtest", "[stats]") {
  const auto ref = scipy_reference();
  for (const auto& c : ref["proportions"]) {
    const auto cp =
        clopper_pearson_interval(c["k"].get<double>(), c["n"].get<double>(), c["level"].get<double>());
    INFO("k = " << c["k"] << ", n = " << c["n"] << ", level = " << c["level"]);
    // Source: scipy.stats.beta.ppf(alpha/2, k, n-k+1) and ppf(1-alpha/2, k+1, n-k).
    CHECK_CLOSE(cp.lower, c["clopper_pearson_beta"][0].get<double>(), 1e-10, 0.0);
    CHECK_CLOSE(cp.upper, c["clopper_pearson_beta"][1].get<double>(), 1e-10, 0.0);
    // Source: scipy.stats.binomtest(k, n).proportion_ci(method='exact') (SciPy 1.10).
    CHECK_CLOSE(cp.lower, c["clopper_pearson_binomtest"][0].get<double>(), 1e-10, 0.0);
    CHECK_CLOSE(cp.upper, c["clopper_pearson_binomtest"][1].get<double>(), 1e-10, 0.0);
  }
}

TEST_CASE("Clopper-Pearson: closed form at k = 0 and k = n", "[stats]") {
  // Source: Clopper & Pearson (1934); at k = 0 the upper limit solves (1-p)^n = alpha/2,
  // i.e. p = 1 - (alpha/2)^(1/n) (standard closed form).
  const auto a = clopper_pearson_interval(0, 20, 0.95);
  CHECK(a.lower == 0.0);
  CHECK_CLOSE(a.upper, 1.0 - std::pow(0.025, 1.0 / 20.0), 1e-12, 0.0);
  const auto b = clopper_pearson_interval(20, 20, 0.95);
  CHECK(b.upper == 1.0);
  CHECK_CLOSE(b.lower, std::pow(0.025, 1.0 / 20.0), 1e-12, 0.0);
}

TEST_CASE("Newcombe hybrid score interval matches SciPy-based Wilson limits", "[stats]") {
  const auto ref = scipy_reference();
  for (const auto& c : ref["differences"]) {
    const auto d = newcombe_difference_interval(c["k1"].get<double>(), c["n1"].get<double>(),
                                                c["k2"].get<double>(), c["n2"].get<double>(),
                                                c["level"].get<double>());
    INFO(c["k1"] << "/" << c["n1"] << " - " << c["k2"] << "/" << c["n2"] << " at " << c["level"]);
    // Source: Newcombe, Stat. Med. 17:873 (1998), method 10, from Wilson limits (SciPy).
    CHECK_CLOSE(d.lower, c["newcombe"][0].get<double>(), 1e-10, 0.0);
    CHECK_CLOSE(d.upper, c["newcombe"][1].get<double>(), 1e-10, 0.0);
    CHECK(d.method == "newcombe-hybrid-score");
  }
}

TEST_CASE("Newcombe interval: worked examples of the 1998 paper", "[stats]") {
  // Source: Newcombe, Stat. Med. 17:873 (1998), Table II, method 10, 95 % limits to four
  // decimals. The numbers are from memory; each agrees with the SciPy-based computation in
  // tests/reference/scipy_proportions.json.
  struct Case { double k1, n1, k2, n2, lower, upper; };
  const Case cases[] = {{56, 70, 48, 80, 0.0524, 0.3339},
                        {9, 10, 3, 10, 0.1705, 0.8090},
                        {5, 56, 0, 29, -0.0381, 0.1926},
                        {0, 10, 0, 20, -0.1611, 0.2775},
                        {10, 10, 0, 20, 0.6791, 1.0000}};
  for (const auto& c : cases) {
    const auto d = newcombe_difference_interval(c.k1, c.n1, c.k2, c.n2, 0.95);
    INFO(c.k1 << "/" << c.n1 << " - " << c.k2 << "/" << c.n2);
    CHECK_CLOSE(d.lower, c.lower, 5e-5, 0.0);
    CHECK_CLOSE(d.upper, c.upper, 5e-5, 0.0);
  }
}

TEST_CASE("Proportion intervals reject counts and levels outside their domain", "[stats]") {
  CHECK_THROWS_AS(wilson_interval(3, 0), DomainError);
  CHECK_THROWS_AS(wilson_interval(-1, 10), DomainError);
  CHECK_THROWS_WITH(clopper_pearson_interval(11, 10), Catch::Contains("successes = 11"));
  CHECK_THROWS_WITH(wilson_interval(1, 10, 1.0), Catch::Contains("level = 1"));
  CHECK_THROWS_AS(newcombe_difference_interval(1, 10, 12, 10), DomainError);
}
