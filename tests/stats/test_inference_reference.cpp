// Bootstrap intervals, LG / NSIT tests and multiplicity corrections against SciPy and
// independent Python implementations (tests/reference/scipy_stats_reference.py, which names
// the source of every value).
#include <cmath>

#include <boost/math/distributions/normal.hpp>
#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "stats/bootstrap.hpp"
#include "stats/estimator_statistic.hpp"
#include "stats/leggett_garg_tests.hpp"
#include "stats/linear_functional.hpp"
#include "stats/multiplicity.hpp"
#include "stats/nsit_tests.hpp"
#include "support/compare.hpp"
#include "inference_fixtures.hpp"

using namespace macroreal;
using namespace macroreal::testing;

namespace {
double npdf(double z) { return std::exp(-0.5 * z * z) / std::sqrt(2.0 * kPi); }
}  // namespace

TEST_CASE("Linear functionals: coefficients of K and S follow the definitions", "[stats]") {
  // Source: DESIGN.md section 2 (C_ij = sum o_i o_j P, K = C12 + C23 - C13, S = P_B(+) -
  // sum_a P_AB(a,+)) as transcribed independently in scipy_stats_reference.py (K_COEF, S_COEF).
  const auto ref = scipy_stats_reference();
  for (const auto& b : ref["bootstrap"]) {
    const CellCounts counts = json_counts(b["counts"]);
    const CellCounts coef = json_counts(b["coef"]);
    const LinearFunctional f = b["name"] == "K" ? lg_functional(lg3_campaign(counts), {"A", "B", "C"})
                                                : nsit_functional(nsit_campaign(counts), "A", "B");
    REQUIRE(f.coef.size() == coef.size());
    for (std::size_t s = 0; s < coef.size(); ++s)
      for (std::size_t j = 0; j < coef[s].size(); ++j) CHECK(f.coef[s][j] == coef[s][j]);
    CHECK_CLOSE(f.estimate(counts), b["estimate"].get<double>(), 1e-12, 0.0);
  }
  CHECK_THROWS_AS(lg_functional(lg3_campaign({}), {"A", "B"}), DomainError);
  CHECK_THROWS_AS(lg_functional(lg3_campaign({}), {"A", "B", "D"}), DomainError);
}

TEST_CASE("Bootstrap: BCa, percentile and basic agree with scipy.stats.bootstrap", "[stats]") {
  const auto ref = scipy_stats_reference();
  for (const auto& b : ref["bootstrap"]) {
    const CellCounts counts = json_counts(b["counts"]);
    const LinearFunctional f = b["name"] == "K" ? lg_functional(lg3_campaign(counts), {"A", "B", "C"})
                                                : nsit_functional(nsit_campaign(counts), "A", "B");
    BootstrapOptions o;
    o.replicates = 100000;
    o.seed = 777;
    o.smoothing = 0.0;  // scipy resamples the observed shots themselves
    const BootstrapResult r = stratified_bootstrap(counts, linear_statistic(f), o);
    const BootstrapQuantity& q = r.quantities[0];
    INFO("statistic " << b["name"].get<std::string>());
    // Source: scipy.stats._resampling._bca_interval (what scipy.stats.bootstrap uses) and a
    // brute-force per-shot jackknife; both deterministic, so a tight tolerance.
    CHECK_CLOSE(q.acceleration, b["acceleration_scipy"].get<double>(), 1e-12, 1e-9);
    CHECK_CLOSE(q.acceleration, b["acceleration_bruteforce"].get<double>(), 1e-12, 1e-9);
    // Bootstrap SE: relative MC error of an SD estimate ~ 1/sqrt(2B) for each of the two runs.
    const double sd = b["bootstrap_se"].get<double>();
    CHECK_CLOSE(q.bootstrap_se, sd, 0.0, 4.0 * std::sqrt(2.0) / std::sqrt(2.0 * o.replicates));
    // Endpoints: both runs carry Monte Carlo error. The alpha-quantile of B replicates has SD
    // ~ sd * sqrt(alpha (1 - alpha) / B) / phi(z_alpha); z0 has SD sqrt(1/(4B)) / phi(0) and moves a
    // BCa endpoint by about 2 sd per unit z0. Tolerance: 4 sqrt(2) times the sum (two independent runs).
    const double B = static_cast<double>(o.replicates), a = 0.025, za = 1.959963984540054;
    const double quant = sd * std::sqrt(a * (1 - a) / B) / npdf(za);
    const double tol_pct = 4.0 * std::sqrt(2.0) * quant;
    const double tol_bca = 4.0 * std::sqrt(2.0) * (quant + 2.0 * sd * std::sqrt(1.0 / (4.0 * B)) / npdf(0.0));
    // The counts are integers over small n, so replicates sit on a lattice of spacing
    // 1/n_min; an interpolated quantile may jump by one lattice step between runs.
    double nmin = 1e300;
    for (const auto& row : counts) {
      double n = 0;
      for (double x : row) n += x;
      nmin = std::min(nmin, n);
    }
    const double lattice = 1.0 / nmin;
    REQUIRE(q.bca.valid);
    CHECK_CLOSE(q.bca.lo, b["bca"][0].get<double>(), tol_bca + lattice, 0.0);
    CHECK_CLOSE(q.bca.hi, b["bca"][1].get<double>(), tol_bca + lattice, 0.0);
    CHECK_CLOSE(q.percentile.lo, b["percentile"][0].get<double>(), tol_pct + lattice, 0.0);
    CHECK_CLOSE(q.percentile.hi, b["percentile"][1].get<double>(), tol_pct + lattice, 0.0);
    CHECK_CLOSE(q.basic.lo, b["basic"][0].get<double>(), tol_pct + lattice, 0.0);
    CHECK_CLOSE(q.basic.hi, b["basic"][1].get<double>(), tol_pct + lattice, 0.0);
  }
}

TEST_CASE("LG tests: Hoeffding and empirical-Bernstein p-values match the formulas", "[stats]") {
  // Source: independent Python implementation of Hoeffding (1963) Thm 2 and Maurer & Pontil
  // (2009) Thm 4 with a union bound (scipy_stats_reference.py).
  const auto ref = scipy_stats_reference();
  for (const auto& c : ref["finite_sample"]) {
    const CellCounts counts = json_counts(c["counts"]);
    const LinearFunctional k = lg_functional(lg3_campaign(counts), {"A", "B", "C"});
    const double bound = c["bound"].get<double>();
    const TestResult h = lg_hoeffding_test(counts, k, bound);
    const TestResult e = lg_empirical_bernstein_test(counts, k, bound);
    CHECK(h.method == "hoeffding");
    CHECK_CLOSE(h.p_value, c["hoeffding_p"].get<double>(), 1e-300, 1e-10);
    CHECK_CLOSE(e.p_value, c["empirical_bernstein_p"].get<double>(), 1e-300, 1e-9);
  }
}

TEST_CASE("LG tests: z test and Gaussian sigma", "[stats]") {
  // Source: standard normal table (Abramowitz & Stegun 26.2): 1 - Phi(2) = 0.0227501319481792,
  // 1 - Phi(3) = 0.00134989803163009 (from memory, to the digits quoted).
  const TestResult z = lg_z_test(1.2, 0.1, 1.0);
  CHECK_CLOSE(z.statistic, 2.0, 1e-12, 0.0);
  CHECK_CLOSE(z.p_value, 0.0227501319481792, 1e-15, 0.0);
  CHECK_CLOSE(z.sigma, 2.0, 1e-9, 0.0);
  CHECK_CLOSE(gaussian_sigma(0.00134989803163009, Sidedness::one_sided), 3.0, 1e-9, 0.0);
  bool capped = false;
  CHECK(std::isfinite(gaussian_sigma(0.0, Sidedness::one_sided, &capped)));
  CHECK(capped);
  CHECK_THROWS_AS(lg_z_test(1.0, -1.0, 1.0), DomainError);
  CHECK_THROWS_AS(gaussian_sigma(1.5, Sidedness::one_sided), DomainError);
}

TEST_CASE("LG parametric bootstrap reproduces the exact binomial test for one binomial", "[stats]") {
  // Source: scipy.stats.binomtest(x, n, p0, alternative='greater'). For one sequence with
  // cells (+, -) and L = P(+), the least-favourable null is P(+) = p0 exactly, and the
  // studentised statistic is monotone in x (checked in the script), so the parametric
  // bootstrap p-value estimates P(X >= x). Tolerance: 4 MC standard errors sqrt(p(1-p)/B).
  const auto ref = scipy_stats_reference()["binomial"];
  REQUIRE(ref["monotone_statistic"].get<bool>());
  const double n = ref["n"], x = ref["x"], p0 = ref["p0"], p = ref["binomtest_greater"];
  CampaignCounts layout;
  layout.readout = Readout::destructive;
  layout.sequences.push_back(make_sequence("B", {"B"}, {+1}, {x, n - x}));
  LinearFunctional f;
  f.name = "P[B:+]";
  f.coef = {{1.0, 0.0}};
  ParametricBootstrapOptions o;
  o.replicates = 200000;
  const TestResult r = lg_parametric_bootstrap_test(counts_of(layout), f, p0, o);
  CHECK(r.method == "parametric-bootstrap");
  CHECK_CLOSE(r.p_value, p, 4.0 * std::sqrt(p * (1 - p) / o.replicates) + 1.0 / o.replicates, 0.0);
}

TEST_CASE("Constrained fit: two binomials with equal-proportion constraint give the pooled proportion", "[stats]") {
  // Source: the restricted MLE of p1 = p2 is (x1 + x2) / (n1 + n2) (Agresti 2013, 3.1.x;
  // common practice). With a vanishing pseudo count the fit must reproduce it.
  LinearFunctional f;
  f.coef = {{1.0, 0.0}, {-1.0, 0.0}};
  const CellCounts c = {{14, 16}, {23, 7}};
  const ConstrainedFit fit = constrained_fit(c, f, 0.0, 1e-10);
  CHECK(fit.converged);
  CHECK_CLOSE(fit.probabilities[0][0], 37.0 / 60.0, 1e-8, 0.0);
  CHECK_CLOSE(fit.probabilities[1][0], 37.0 / 60.0, 1e-8, 0.0);
  CHECK_THROWS_AS(constrained_fit(c, f, 1.5), DomainError);  // outside the range (-1, 1)
}

TEST_CASE("NSIT tests: Barnard exact, score and TOST against SciPy", "[stats]") {
  const auto ref = scipy_stats_reference();
  for (const auto& t : ref["two_binomial"]) {
    const long x1 = t["x1"], n1 = t["n1"], x2 = t["x2"], n2 = t["n2"];
    INFO("table " << x1 << "/" << n1 << " vs " << x2 << "/" << n2);
    const TestResult b = barnard_exact_test(x1, n1, x2, n2);
    // Source: scipy.stats.barnard_exact (shgo maximiser; rel 1e-3 allows its search error) and
    // a 20001-point grid maximum of the same function (rel 1e-6).
    CHECK_CLOSE(b.p_value, t["barnard_scipy"].get<double>(), 0.0, 1e-3);
    CHECK_CLOSE(b.p_value, std::min(1.0, t["barnard_grid"].get<double>()), 0.0, 1e-6);
    CHECK_CLOSE(b.statistic, t["wald"].get<double>(), 1e-12, 1e-12);
    const TestResult bo = boschloo_exact_test(x1, n1, x2, n2);
    // Source: scipy.stats.boschloo_exact (two-sided = twice the smaller one-sided p; shgo
    // maximiser, rel 1e-3 for its search error), a 20001-point grid maximum of the same
    // functions with scipy.stats.hypergeom tails (rel 1e-6), and SciPy's statistic (the
    // Fisher one-sided p-value of the smaller side).
    CHECK(bo.method == "boschloo-exact");
    CHECK_CLOSE(bo.p_value, t["boschloo_scipy"].get<double>(), 0.0, 1e-3);
    CHECK_CLOSE(bo.p_value, t["boschloo_grid"].get<double>(), 0.0, 1e-6);
    CHECK_CLOSE(bo.statistic, t["boschloo_statistic_scipy"].get<double>(), 1e-14, 1e-9);
    // Boschloo's test is at least as powerful as Fisher's exact test, whose two-sided p here
    // is at most twice its statistic (Boschloo 1970): p_Boschloo <= min(1, 2 * Fisher p).
    CHECK(bo.p_value <= std::min(1.0, 2.0 * bo.statistic) * (1 + 1e-9));
    // Score test == Pearson chi-square without continuity correction (scipy.stats.chi2_contingency).
    LinearFunctional f;
    f.coef = {{1.0, 0.0}, {-1.0, 0.0}};
    const CellCounts c = {{double(x1), double(n1 - x1)}, {double(x2), double(n2 - x2)}};
    const TestResult s = nsit_score_test(c, f);
    CHECK_CLOSE(s.p_value, t["score_chi2_p"].get<double>(), 1e-9, 1e-7);
    if (!t["tost_p"].is_null()) {
      // Source: TOST with restricted-MLE variances, scipy.optimize in the script.
      const TestResult e = nsit_tost(c, f, t["tost_margin"].get<double>());
      CHECK_CLOSE(e.p_value, t["tost_p"].get<double>(), 1e-7, 1e-5);
    }
  }
  CHECK_THROWS_AS(barnard_exact_test(5, 4, 1, 3), DomainError);
  CHECK_THROWS_AS(barnard_exact_test(5000, 10000, 10, 10000), UnsupportedError);
  CHECK_THROWS_AS(boschloo_exact_test(5, 4, 1, 3), DomainError);
  CHECK_THROWS_AS(boschloo_exact_test(5000, 10000, 10, 10000), UnsupportedError);
}

TEST_CASE("NSIT: two-sided Hoeffding bound against the reference script", "[stats]") {
  const auto ref = scipy_stats_reference();
  // Source: Hoeffding, JASA 58:13 (1963), Thm 2, written independently in
  // tests/reference/scipy_stats_reference.py; two-sided = twice the smaller one-sided bound.
  for (const auto& t : ref["nsit_hoeffding"]) {
    const CellCounts c = t["counts"].get<CellCounts>();
    const CampaignCounts camp = nsit_campaign(c);
    const LinearFunctional s = nsit_functional(camp, "A", "B");
    const TestResult h = nsit_hoeffding_test(c, s);
    CHECK(h.method == "hoeffding");
    CHECK_CLOSE(h.p_value, t["p"].get<double>(), 1e-12, 1e-9);
  }
}

TEST_CASE("NSIT: binomial arms need non-destructive readout", "[stats]") {
  CampaignCounts d = nsit_campaign({{10, 5}, {3, 4, 5}, {2, 2, 2}});
  CHECK_THROWS_AS(nsit_binomial_arms(d, "A", "B"), UnsupportedError);
  CampaignCounts nd;
  nd.readout = Readout::nondestructive;
  nd.sequences.push_back(make_sequence("B", {"B"}, {+1}, {12, 8}, Readout::nondestructive));
  nd.sequences.push_back(make_sequence("AB", {"A", "B"}, {+1, +1}, {5, 3, 6, 6}, Readout::nondestructive));
  const BinomialArms arms = nsit_binomial_arms(nd, "A", "B");
  // Layout ++, +-, -+, --: B = + in cells 0 and 2 (campaign_counts.hpp).
  CHECK(arms.x1 == 12);
  CHECK(arms.n1 == 20);
  CHECK(arms.x2 == 11);
  CHECK(arms.n2 == 20);
}

TEST_CASE("Multiplicity: Holm and Benjamini-Hochberg adjusted p-values", "[stats]") {
  // Source: independent Python implementation (scipy_stats_reference.py) and, for the first
  // set, Benjamini & Hochberg (1995) section 4.2 (from memory): at level 0.05 their procedure
  // rejects the 4 smallest of the 15 p-values, the Bonferroni-type (Holm) procedure 3.
  const auto ref = scipy_stats_reference();
  for (const auto& m : ref["multiplicity"]) {
    const std::vector<double> p = m["p"].get<std::vector<double>>();
    const auto holm = holm_adjust(p), bh = benjamini_hochberg_adjust(p);
    for (std::size_t i = 0; i < p.size(); ++i) {
      CHECK_CLOSE(holm[i], m["holm"][i].get<double>(), 1e-15, 1e-12);
      CHECK_CLOSE(bh[i], m["bh"][i].get<double>(), 1e-15, 1e-12);
    }
  }
  const std::vector<double> p15 = ref["multiplicity"][0]["p"].get<std::vector<double>>();
  int rej_bh = 0, rej_holm = 0;
  for (double x : benjamini_hochberg_adjust(p15)) rej_bh += x <= 0.05;
  for (double x : holm_adjust(p15)) rej_holm += x <= 0.05;
  CHECK(rej_bh == 4);
  CHECK(rej_holm == 3);
  CHECK_THROWS_AS(holm_adjust({0.1, 1.2}), DomainError);
}

TEST_CASE("Campaign-level LG and NSIT test lists", "[stats]") {
  // The lists must hold exactly the single tests, in the documented order (consistency with
  // the single-test functions checked against SciPy above).
  const CellCounts counts = {{17, 6, 9}, {5, 14, 10}, {19, 5, 7}, {4, 15, 9}, {9, 12, 10}, {11, 8, 11}};
  const CampaignCounts lg = lg3_campaign(counts);
  ParametricBootstrapOptions o;
  o.replicates = 999;
  const auto tests = leggett_garg_tests(lg, {"A", "B", "C"}, 1.7, 0.3, o);
  REQUIRE(tests.size() == 4);
  CHECK(tests[0].method == "z-asymptotic");
  CHECK(tests[1].method == "hoeffding");
  CHECK(tests[2].method == "empirical-bernstein");
  CHECK(tests[3].method == "parametric-bootstrap");
  const LinearFunctional k = lg_functional(lg, {"A", "B", "C"});
  CHECK(tests[1].p_value == lg_hoeffding_test(counts, k, 1.0).p_value);
  CampaignCounts nd;
  nd.readout = Readout::nondestructive;
  nd.sequences.push_back(make_sequence("B", {"B"}, {+1}, {12, 8}, Readout::nondestructive));
  nd.sequences.push_back(make_sequence("AB", {"A", "B"}, {+1, +1}, {5, 3, 6, 6}, Readout::nondestructive));
  const auto ns = nsit_tests(nd, "A", "B", 0.2);
  REQUIRE(ns.size() == 5);
  CHECK(ns[0].method == "score");
  CHECK(ns[1].method == "barnard-exact");
  CHECK(ns[1].p_value == barnard_exact_test(12, 20, 11, 20).p_value);
  CHECK(ns[2].method == "boschloo-exact");
  CHECK(ns[2].p_value == boschloo_exact_test(12, 20, 11, 20).p_value);
  CHECK(ns[3].method == "hoeffding");
  CHECK(ns[4].method == "tost");
  // Destructive readout: no exact test exists (S combines three sequences); the score test
  // and the finite-sample Hoeffding bound remain.
  const auto nsd = nsit_tests(nsit_campaign({{10, 5}, {3, 4, 5}, {2, 2, 2}}), "A", "B");
  REQUIRE(nsd.size() == 2);
  CHECK(nsd[0].method == "score");
  CHECK(nsd[1].method == "hoeffding");
}
