// The planned power is met: for five scenarios (plus one small-sample case, see below), 2000
// campaigns simulated at the planned shots and analysed by the statistics core's test reject in a fraction whose 95 % Clopper-Pearson
// interval (Clopper & Pearson, Biometrika 26:404 (1934)) contains the planned power. Fixed
// seeds; the interval is the Monte Carlo error (half-width ~0.018 at power 0.8, M = 2000).
#include <catch2/catch.hpp>

#include <optional>

#include "design/campaign_plan.hpp"
#include "design/plan_verification.hpp"
#include "protocol/protocol_reader.hpp"

using namespace macroreal;

namespace {

void check_scenario(const std::string& file, PlanTest test, double alpha, double power,
                    std::optional<double> margin, std::uint64_t seed, bool small_sample = false) {
  const Protocol p = read_protocol(std::string(MACROREAL_SOURCE_DIR) + "/protocols/" + file);
  PlanOptions o;
  o.alpha = alpha;
  o.power = power;
  o.test = test;
  o.margin = margin;
  const CampaignPlan plan = plan_campaign(p, o);
  REQUIRE(plan.feasible);
  VerifyOptions v;
  v.campaigns = 2000;
  v.seed = seed;
  const PlanVerification r = verify_plan(plan, v);
  INFO(file << " " << to_string(test) << ": planned " << r.planned_power << ", measured " << r.power
            << " [" << r.lo << ", " << r.hi << "], " << plan.total_shots << " shots, undefined "
            << r.undefined);
  WARN("planned " << r.planned_power << ", measured " << r.power << " [" << r.lo << ", " << r.hi << "], "
       << plan.total_shots << " shots (" << file << " " << to_string(test) << ")");
  if (small_sample) {
    // Tens of shots: the normal approximation is not expected to be accurate; the check is
    // only that it does not promise more power than the campaigns have (it is conservative).
    CHECK(r.planned_power <= r.hi);
  } else {
    CHECK(r.planned_within_interval);
  }
  CHECK(r.planned_power >= power);
}

}  // namespace

TEST_CASE("planned power is met by simulated campaigns (6 scenarios, M = 2000)", "[design][long]") {
  check_scenario("lg3_thermal.json", PlanTest::leggett_garg, 0.05, 0.8, {}, 101);
  check_scenario("lg3_prepared_cat_conclusive.json", PlanTest::leggett_garg, 0.01, 0.9, {}, 102);
  check_scenario("lg3_thermal.json", PlanTest::leggett_garg, 0.001, 0.95, {}, 103);
  // S = 0.5 needs only ~57 shots; measured 0.858 [0.842, 0.873] against the planned 0.816 at
  // seed 104 (the normal approximation is conservative at such counts).
  check_scenario("nsit_prepared_cat.json", PlanTest::nsit, 0.05, 0.8, {}, 104, true);
  check_scenario("lg3_thermal.json", PlanTest::equivalence, 0.05, 0.8, 0.05, 105);
  check_scenario("lg3_prepared_cat_conclusive.json", PlanTest::equivalence, 0.05, 0.8, 0.02, 106);
}
