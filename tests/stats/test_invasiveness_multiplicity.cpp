// The invasiveness bound against explicit macrorealist models, and the max-statistic
// calibration against the Sidak identity for independent settings.
#include <cmath>
#include <random>

#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "stats/invasiveness.hpp"
#include "stats/leggett_garg_tests.hpp"
#include "stats/multiplicity.hpp"
#include "support/compare.hpp"
#include "inference_fixtures.hpp"

using namespace macroreal;
using namespace macroreal::testing;

namespace {

// A classical invasive model on three times: hidden (Q1, Q2, Q3) in {+-1}^3 with weights w;
// a measurement at time i moves each later Q_j, on outcome branch q of Q_i, to +1 with
// probability push[i][j][q] (push[.][.][0] for q = +1, [1] for q = -1). Pushing towards +1
// on both branches is a sign-uniform disturbance. Exact correlators and NSIT values.
struct Model {
  double w[8];
  double push[3][3][2];
  // E[Q_i Q_j] in runs of [i, j] and E[Q_j] with / without the measurement at i.
  double correlator(int i, int j) const {
    double c = 0;
    for (int h = 0; h < 8; ++h) {
      const int qi = (h >> (2 - i)) & 1 ? -1 : 1, qj = (h >> (2 - j)) & 1 ? -1 : 1;
      const double pp = push[i][j][qi > 0 ? 0 : 1];
      const double eqj = pp * 1.0 + (1 - pp) * qj;  // disturbed mean of Q_j
      c += w[h] * qi * eqj;
    }
    return c;
  }
  double nsit(int i, int j) const {  // P_j(+) - sum_a P_ij(a, +)
    double alone = 0, after = 0;
    for (int h = 0; h < 8; ++h) {
      const int qi = (h >> (2 - i)) & 1 ? -1 : 1, qj = (h >> (2 - j)) & 1 ? -1 : 1;
      const double pp = push[i][j][qi > 0 ? 0 : 1];
      alone += w[h] * (qj > 0);
      after += w[h] * (pp + (1 - pp) * (qj > 0));
    }
    return alone - after;
  }
};

}  // namespace

TEST_CASE("Invasiveness bound holds for random sign-uniform invasive macrorealist models", "[stats]") {
  // Source: the derivation in invasiveness.hpp (K <= 1 + 2 sum |S|) checked on explicit
  // hidden-variable models.
  std::mt19937_64 g(2024);
  std::uniform_real_distribution<double> u(0.0, 1.0);  // test-only draws: bytes need not be portable
  double max_excess_over_lg = 0.0;
  for (int trial = 0; trial < 2000; ++trial) {
    Model m{};
    double tot = 0;
    for (double& x : m.w) tot += (x = u(g));
    for (double& x : m.w) x /= tot;
    for (auto& a : m.push)
      for (auto& b : a) b[0] = b[1] = 0.0;
    for (auto [i, j] : {std::pair{0, 1}, {1, 2}, {0, 2}}) {
      m.push[i][j][0] = 0.3 * u(g);
      m.push[i][j][1] = 0.3 * u(g);
    }
    const double K = m.correlator(0, 1) + m.correlator(1, 2) - m.correlator(0, 2);
    const double bound = 1 + 2 * (std::abs(m.nsit(0, 1)) + std::abs(m.nsit(1, 2)) + std::abs(m.nsit(0, 2)));
    REQUIRE(K <= bound + 1e-12);
    max_excess_over_lg = std::max(max_excess_over_lg, K - 1.0);
  }
  CHECK(max_excess_over_lg > 0.0);  // the disturbance does violate the plain LG bound

  const InvasivenessBound b = invasiveness_bound({"A", "B", "C"}, 1.50, 0.02,
                                                 {{"A", "B", 0.05, 0.01}, {"B", "C", -0.02, 0.01}, {"A", "C", 0.0, 0.01}});
  CHECK_CLOSE(b.bound, 1.0 + 2 * (0.05 + 0.02 + 0.0), 1e-12, 0.0);
  // z_{1 - 0.05 / 12} (Boost/standard normal quantile) = 2.6382; K lower at z_{0.975} = 1.96.
  CHECK_CLOSE(b.bound_upper, 1.14 + 2 * 3 * 2.638257 * 0.01, 1e-5, 0.0);
  CHECK_CLOSE(b.k_lower, 1.50 - 1.959964 * 0.02, 1e-5, 0.0);
  CHECK(b.exceeds == (b.k_lower > b.bound_upper));
  CHECK(b.exceeds);
  CHECK_THROWS_AS(invasiveness_bound({"A", "B", "C"}, 1.3, 0.02, {{"A", "B", 0.05, 0.01}}), DomainError);
}

TEST_CASE("Max-statistic calibration: independent settings follow the Sidak identity", "[stats]") {
  // Source: for K independent continuous statistics, P(max T* >= t) = 1 - (1 - p(t))^K
  // (Sidak, JASA 62:626 (1967)). Three identical settings with their own sequences (2000
  // shots per sequence, close to continuous) with K near the bound; the adjusted p must match
  // 1 - (1 - q)^3, q the calibration of one setting alone, within 4 MC standard errors of
  // B = 20000 replicates (both estimates) plus a lattice allowance.
  const CellCounts c = {{1000, 550, 450}, {480, 1020, 500}, {1010, 500, 490},
                        {520, 980, 500}, {700, 800, 500}, {760, 740, 500}};  // invented
  const LinearFunctional k = lg_functional(lg3_campaign(c), {"A", "B", "C"});
  ParametricBootstrapOptions o;
  o.replicates = 20000;
  const MaxStatisticResult single = max_statistic_calibration({ScanSetting{c, k, 1.0}}, o);
  std::vector<ScanSetting> settings(3, ScanSetting{c, k, 1.0});
  o.seed = 99;  // an independent stream for the scan
  const MaxStatisticResult r = max_statistic_calibration(settings, o);
  const double ps = single.p_largest, sidak = 1 - std::pow(1 - ps, 3);
  INFO("single p " << ps << ", K^ " << k.estimate(c));
  REQUIRE(ps > 0.01);
  REQUIRE(ps < 0.5);
  // The one-setting calibration agrees with the parametric bootstrap at the null fit (both
  // estimate the same one-sided p; 5 MC standard errors plus 10 % for the different
  // resampling schemes, centred pivot vs. constrained fit).
  const TestResult pb = lg_parametric_bootstrap_test(c, k, 1.0, o);
  CHECK_CLOSE(ps, pb.p_value, 5 * std::sqrt(2 * ps * (1 - ps) / o.replicates) + 0.1 * ps, 0.0);
  const double se = std::sqrt(sidak * (1 - sidak) / o.replicates) + 3 * std::sqrt(ps * (1 - ps) / o.replicates);
  CHECK_CLOSE(r.p_largest, sidak, 4 * se + 0.01 * sidak, 0.0);
  CHECK(r.adjusted_p.size() == 3);
  CHECK(r.adjusted_p[0] == r.adjusted_p[1]);
  CHECK_THROWS_AS(max_statistic_calibration(std::vector<ScanSetting>{}, o), DomainError);
}

TEST_CASE("Max-statistic calibration: statistics that share sequences keep their dependence", "[stats]") {
  // Two LG statistics on ONE campaign that use the same sequences: identical functionals
  // (the extreme of sharing). Their maximum is the statistic itself, so the joint
  // calibration must give exactly the one-statistic p-value (same seed, same resamples),
  // while treating them as independent settings gives 1 - (1 - q)^2 (Sidak, JASA 62:626
  // (1967)), about twice as large: the difference must exceed 6 MC standard errors.
  const CellCounts c = {{1000, 550, 450}, {480, 1020, 500}, {1010, 500, 490},
                        {520, 980, 500}, {700, 800, 500}, {760, 740, 500}};  // invented
  const LinearFunctional k = lg_functional(lg3_campaign(c), {"A", "B", "C"});
  ParametricBootstrapOptions o;
  o.replicates = 20000;
  const MaxStatisticResult one = max_statistic_calibration(JointScan{c, {k}, {1.0}}, o);
  const MaxStatisticResult shared = max_statistic_calibration(JointScan{c, {k, k}, {1.0, 1.0}}, o);
  CHECK(shared.p_largest == one.p_largest);
  CHECK(shared.adjusted_p[0] == shared.adjusted_p[1]);
  o.seed = 7;
  const MaxStatisticResult indep = max_statistic_calibration({ScanSetting{c, k, 1.0}, ScanSetting{c, k, 1.0}}, o);
  const double q = one.p_largest, sidak = 1 - (1 - q) * (1 - q);
  const double se = std::sqrt(sidak * (1 - sidak) / o.replicates) + 2 * std::sqrt(q * (1 - q) / o.replicates);
  INFO("q " << q << ", independent " << indep.p_largest);
  REQUIRE(q > 0.02);
  CHECK(indep.p_largest - shared.p_largest > 6 * se);
  CHECK_CLOSE(indep.p_largest, sidak, 4 * se + 0.01 * sidak, 0.0);
  // The same statistic against two bounds: fully dependent, so the larger T decides and its
  // adjusted p equals its p-value alone (no look-elsewhere penalty for a redundant test).
  const MaxStatisticResult shifted = max_statistic_calibration(JointScan{c, {k, k}, {1.0, 0.98}}, o);
  const MaxStatisticResult alone = max_statistic_calibration(JointScan{c, {k}, {0.98}}, o);
  CHECK(shifted.largest == 1);
  CHECK(shifted.p_largest == alone.p_largest);
  CHECK_THROWS_AS(max_statistic_calibration(JointScan{c, {k}, {}}, o), DomainError);
}
