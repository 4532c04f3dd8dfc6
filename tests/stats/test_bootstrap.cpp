// Stratified bootstrap: reproducibility, degenerate data, input errors, the studentised
// interval's large-sample limit, and the pooled-MLE adapter.
#include <cmath>
#include <cstring>

#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "stats/bootstrap.hpp"
#include "stats/estimator_statistic.hpp"
#include "stats/linear_functional.hpp"
#include "support/compare.hpp"
#include "inference_fixtures.hpp"

using namespace macroreal;
using namespace macroreal::testing;

namespace {
const CellCounts kCounts = {{17, 6, 9}, {5, 14, 10}, {19, 5, 7}, {4, 15, 9}, {9, 12, 10}, {11, 8, 11}};  // invented
}

TEST_CASE("Bootstrap: same seed gives the same bytes for any thread count", "[stats]") {
  const LinearFunctional k = lg_functional(lg3_campaign(kCounts), {"A", "B", "C"});
  BootstrapOptions o;
  o.replicates = 3000;
  o.keep_replicates = true;
  o.threads = 1;
  const auto r1 = stratified_bootstrap(kCounts, linear_statistic(k), o);
  o.threads = 2;
  const auto r2 = stratified_bootstrap(kCounts, linear_statistic(k), o);
  REQUIRE(r1.quantities[0].replicates.size() == 3000);
  CHECK(std::memcmp(r1.quantities[0].replicates.data(), r2.quantities[0].replicates.data(),
                    3000 * sizeof(double)) == 0);
  CHECK(r1.quantities[0].bca.lo == r2.quantities[0].bca.lo);
  CHECK(r1.seed == o.seed);
  o.seed += 1;
  const auto r3 = stratified_bootstrap(kCounts, linear_statistic(k), o);
  CHECK(r3.quantities[0].replicates != r1.quantities[0].replicates);
}

TEST_CASE("Bootstrap: every sequence in one cell gives a degenerate, point interval", "[stats]") {
  const CellCounts c = {{30, 0, 0}, {0, 30, 0}, {30, 0, 0}, {0, 30, 0}, {0, 0, 30}, {0, 0, 30}};
  const LinearFunctional k = lg_functional(lg3_campaign(c), {"A", "B", "C"});
  BootstrapOptions o;
  o.replicates = 500;
  o.smoothing = 0.0;  // the ordinary bootstrap
  const auto r = stratified_bootstrap(c, linear_statistic(k), o);
  const auto& q = r.quantities[0];
  CHECK(q.status == BootstrapStatus::degenerate);
  CHECK(q.estimate == 4.0);  // C_AB = 1 + 1 (AB+ all ++, AB- all --), C_BC = 2, C_AC = 0 -> K = 4
  CHECK(q.bca.valid);
  CHECK(q.bca.lo == q.estimate);
  CHECK(q.bca.hi == q.estimate);
  CHECK(q.bootstrap_se == 0.0);
}

TEST_CASE("Bootstrap: invalid input throws", "[stats]") {
  const LinearFunctional k = lg_functional(lg3_campaign(kCounts), {"A", "B", "C"});
  BootstrapOptions o;
  o.replicates = 1;
  CHECK_THROWS_AS(stratified_bootstrap(kCounts, linear_statistic(k), o), DomainError);
  o.replicates = 100;
  o.level = 1.0;
  CHECK_THROWS_AS(stratified_bootstrap(kCounts, linear_statistic(k), o), DomainError);
  o.level = 0.95;
  CellCounts bad = kCounts;
  bad[0][0] = 2.5;
  CHECK_THROWS_AS(stratified_bootstrap(bad, linear_statistic(k), o), DomainError);
  CHECK_THROWS_AS(stratified_bootstrap({}, linear_statistic(k), o), DomainError);
  CHECK_THROWS_AS(parse_interval_method("normal"), DomainError);
  CHECK(parse_interval_method("bca") == IntervalMethod::bca);
}

TEST_CASE("Bootstrap: large counts give intervals close to estimate +- 1.96 SE", "[stats]") {
  // Source: first-order equivalence of bootstrap intervals with the normal interval for a
  // smooth statistic of large samples (Davison & Hinkley (1997), section 5.4; Efron 1987).
  // With 20000 shots per sequence skewness is negligible; the endpoints must agree with
  // estimate +- 1.959964 se within 5 % of the half-width (MC error of B = 4000 quantiles
  // ~ 1 % of the half-width at B = 20000, plus O(n^-1/2) skewness terms).
  CellCounts big = kCounts;
  for (auto& row : big)
    for (auto& x : row) x *= 700;
  const LinearFunctional k = lg_functional(lg3_campaign(big), {"A", "B", "C"});
  BootstrapOptions o;
  o.replicates = 20000;
  const auto r = stratified_bootstrap(big, linear_statistic(k), o);
  const auto& q = r.quantities[0];
  const double half = 1.959963984540054 * q.std_error;
  for (const Interval* iv : {&q.percentile, &q.basic, &q.studentized, &q.bca}) {
    REQUIRE(iv->valid);
    CHECK_CLOSE(iv->lo, q.estimate - half, 0.05 * half, 0.0);
    CHECK_CLOSE(iv->hi, q.estimate + half, 0.05 * half, 0.0);
  }
  // Bootstrap SD vs plug-in SE: relative MC error 1/sqrt(2B) = 0.5 %; tolerance 4 of them.
  CHECK_CLOSE(q.bootstrap_se, q.std_error, 0.0, 4.0 / std::sqrt(2.0 * o.replicates));
  CHECK(q.default_interval().lo == q.bca.lo);
}

TEST_CASE("Bootstrap adapter: pooled-MLE K from CampaignEstimator", "[stats]") {
  // For large counts the bootstrap SD of the pooled MLE must match its delta-method SE
  // (computed by estimator.hpp from central differences, an independent route; first-order
  // theory, Davison & Hinkley (1997) 2.7). Tolerance: 4 relative MC errors 1/sqrt(2B) plus 2 %
  // for O(1/n) terms.
  CellCounts big = kCounts;
  for (auto& row : big)
    for (auto& x : row) x *= 100;
  Protocol p;
  p.readout = Readout::destructive;
  const CampaignCounts layout = lg3_campaign(big);
  for (const auto& s : layout.sequences) {
    SequenceSpec spec;
    spec.name = s.name;
    spec.steps = s.steps;
    spec.dark_is = s.dark_is;
    p.sequences.push_back(spec);
  }
  TestSpec t;
  t.kind = TestSpec::Kind::leggett_garg;
  t.order = {"A", "B", "C"};
  p.tests.push_back(t);
  const CampaignEstimator est(p, layout);
  BootstrapOptions o;
  o.replicates = 5000;
  const auto r = stratified_bootstrap(big, estimator_statistic(est, {"K[ABC]"}), o);
  REQUIRE(r.quantities.size() == 1);
  const auto& q = r.quantities[0];
  CHECK(q.status == BootstrapStatus::ok);
  CHECK(q.studentized.valid);
  CHECK_CLOSE(q.bootstrap_se, q.std_error, 0.0, 4.0 / std::sqrt(2.0 * o.replicates) + 0.02);
  CHECK_THROWS_AS(estimator_statistic(est, {"K[XYZ]"}), DomainError);
}

TEST_CASE("Bootstrap: smoothed resampling keeps empty cells possible and recentres", "[stats]") {
  // Data with every sequence in one cell: the ordinary bootstrap collapses to a point; with a
  // pseudo count the bootstrap world has all cells, so the interval has positive width and,
  // recentred, still contains the estimate (percentile of t* - t0 + t). Common practice, no source.
  const CellCounts c = {{30, 0, 0}, {0, 30, 0}, {30, 0, 0}, {0, 30, 0}, {0, 0, 30}, {0, 0, 30}};
  const LinearFunctional k = lg_functional(lg3_campaign(c), {"A", "B", "C"});
  BootstrapOptions o;
  o.replicates = 2000;
  o.smoothing = 0.5;
  const auto r = stratified_bootstrap(c, linear_statistic(k), o);
  const auto& q = r.quantities[0];
  CHECK(q.status == BootstrapStatus::ok);
  CHECK(r.smoothing == 0.5);
  CHECK(q.bootstrap_se > 0.0);
  // t0 = K at counts + 1/2 rescaled: each correlator sequence has (30.5, 0.5, 0.5) / 31.5 ...
  // C_AB = 2 * (30 / 31.5) = 1.9048, C_BC the same, C_AC = 0 -> t0 = 3.8095 (hand arithmetic).
  CHECK_CLOSE(q.smoothed_centre, 4.0 * 30.0 / 31.5, 1e-12, 0.0);
  for (const Interval* iv : {&q.percentile, &q.basic, &q.bca, &q.envelope}) {
    REQUIRE(iv->valid);
    CHECK(iv->lo < iv->hi);
  }
  CHECK(q.envelope.lo <= std::min({q.percentile.lo, q.basic.lo, q.bca.lo}));
  CHECK(q.envelope.hi >= std::max({q.percentile.hi, q.basic.hi, q.bca.hi}));
  o.smoothing = -1.0;
  CHECK_THROWS_AS(stratified_bootstrap(c, linear_statistic(k), o), DomainError);
}
