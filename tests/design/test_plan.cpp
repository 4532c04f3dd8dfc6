// Campaign plans: the planned shots reach the target power by the plan's own normal
// approximation, follow the optimum allocation, and the Monte Carlo check is reproducible and
// independent of the thread count. The power check against simulation is test_plan_long.cpp.
#include <catch2/catch.hpp>

#include <cmath>

#include <boost/math/distributions/normal.hpp>

#include "core/error.hpp"
#include "design/campaign_plan.hpp"
#include "design/plan_verification.hpp"
#include "protocol/protocol_reader.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {
Protocol protocol(const std::string& name) {
  return read_protocol(std::string(MACROREAL_SOURCE_DIR) + "/protocols/" + name);
}
}  // namespace

TEST_CASE("plan: LG shots reach the target power and follow the optimum allocation", "[design]") {
  PlanOptions o;
  o.alpha = 0.05;
  o.power = 0.8;
  const CampaignPlan plan = plan_campaign(protocol("lg3_prepared_cat_conclusive.json"), o);
  REQUIRE(plan.feasible);
  CHECK(plan.model_value > 1.0);
  CHECK(plan.bound == 1.0);
  // Independent route: the statistics core's variance_at at counts N_s p_s of the rounded shots,
  // and the one-sided normal power Phi((K - 1)/se - z_{0.95}) from Boost.Math directly
  // (Chow, Shao & Wang (2008) sec. 3.1 one-sided power formula).
  CellCounts counts = plan.cells.probabilities;
  double total = 0.0;
  for (std::size_t s = 0; s < counts.size(); ++s) {
    for (double& x : counts[s]) x *= static_cast<double>(plan.sequences[s].shots_rounded);
    total += static_cast<double>(plan.sequences[s].shots_rounded);
  }
  CHECK(static_cast<long long>(total) == plan.total_shots);
  const double se = std::sqrt(plan.functional.variance_at(plan.cells.probabilities, counts));
  boost::math::normal_distribution<double> nd;
  const double power = boost::math::cdf(nd, (plan.model_value - 1.0) / se - boost::math::quantile(nd, 0.95));
  CHECK_CLOSE(plan.planned_power, power, 1e-12, 0.0);
  CHECK(power >= 0.8);
  // Rounding up adds at most one shot per sequence: the continuous optimum sits at the target.
  std::vector<double> cont;
  for (const auto& s : plan.sequences) cont.push_back(s.shots);
  CHECK_CLOSE(plan.power_at(cont), 0.8, 1e-9, 0.0);
  // Neyman-type shape: N_s / sqrt(v_s / c_s) is the same for every used sequence (Cochran (1977) 5.5).
  double ratio = -1.0;
  for (const auto& s : plan.sequences) {
    if (!(s.variance_per_shot > 0.0)) continue;
    const double r = s.shots / std::sqrt(s.variance_per_shot / s.seconds_per_shot);
    if (ratio < 0.0) ratio = r;
    CHECK_CLOSE(r, ratio, 0.0, 1e-9);
  }
  // The power curve increases with the total and passes the plan at 20/20 of its total.
  REQUIRE(plan.power_curve.size() == 40);
  for (std::size_t k = 1; k < plan.power_curve.size(); ++k)
    CHECK(plan.power_curve[k].power > plan.power_curve[k - 1].power);
  CHECK_CLOSE(plan.power_curve[19].power, 0.8, 2e-3, 0.0);
}

TEST_CASE("plan: a model without a violation or without signalling gives no plan", "[design]") {
  PlanOptions o;
  o.test = PlanTest::nsit;  // lg3_thermal's S[A->B] is 0 (the symmetric split does not signal)
  const CampaignPlan p = plan_campaign(protocol("lg3_thermal.json"), o);
  CHECK_FALSE(p.feasible);
  CHECK_THAT(p.infeasible_reason, Catch::Contains("is 0"));
  o.test = PlanTest::equivalence;
  CHECK_THROWS_WITH(plan_campaign(protocol("lg3_thermal.json"), o), Catch::Contains("needs a margin"));
  o.margin = 0.05;
  const CampaignPlan e = plan_campaign(protocol("lg3_thermal.json"), o);
  CHECK(e.feasible);
  CHECK(e.planned_power >= 0.8);
  o.alpha = 0.7;
  CHECK_THROWS_AS(plan_campaign(protocol("lg3_thermal.json"), o), DomainError);
}

TEST_CASE("plan verification: same seed same result, for any thread count", "[design]") {
  PlanOptions o;
  const CampaignPlan plan = plan_campaign(protocol("lg3_prepared_cat_conclusive.json"), o);
  VerifyOptions v;
  v.campaigns = 300;
  v.seed = 11;
  v.threads = 1;
  long calls = 0;
  v.progress = [&](long done, long total) { ++calls; CHECK(done <= total); };
  const PlanVerification a = verify_plan(plan, v);
  v.threads = 2;
  v.progress = nullptr;
  const PlanVerification b = verify_plan(plan, v);
  CHECK(a.rejections == b.rejections);
  CHECK(calls >= 1);
  CHECK(a.campaigns == 300);
  CHECK(a.lo <= a.power);
  CHECK(a.power <= a.hi);
  // A plan at a quarter of the shots has clearly less power (normal approximation and simulation).
  std::vector<long long> quarter;
  for (const auto& s : plan.sequences) quarter.push_back((s.shots_rounded + 3) / 4);
  const PlanVerification q = verify_plan_at(plan, quarter, v);
  CHECK(q.planned_power < 0.5);
  CHECK(q.power < a.power);
}
