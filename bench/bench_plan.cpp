// `plan --verify 1000` for a three-time protocol with 1e5 shots per campaign, on 2 threads:
// the Monte Carlo power check of design/plan_verification.hpp (count-level multinomial draws
// and the one-sided LG z test per campaign). The plan's shape is scaled to 1e5 total shots.
#include <benchmark/benchmark.h>

#include "design/campaign_plan.hpp"
#include "design/plan_verification.hpp"
#include "protocol/protocol_reader.hpp"

using namespace macroreal;

static void BM_PlanVerify_Lg3_1e5Shots(benchmark::State& state) {
  const Protocol p = read_protocol(std::string(MACROREAL_SOURCE_DIR) + "/protocols/lg3_thermal.json");
  const CampaignPlan plan = plan_campaign(p, PlanOptions{});
  double total = 0.0;
  for (const auto& s : plan.sequences) total += s.shots;
  std::vector<long long> shots;
  for (const auto& s : plan.sequences) shots.push_back(static_cast<long long>(s.shots * 1e5 / total + 0.5));
  VerifyOptions v;
  v.campaigns = state.range(0);
  v.threads = 2;
  for (auto _ : state) {
    const PlanVerification r = verify_plan_at(plan, shots, v);
    benchmark::DoNotOptimize(r.rejections);
  }
  state.counters["campaigns"] = static_cast<double>(v.campaigns);
}
BENCHMARK(BM_PlanVerify_Lg3_1e5Shots)->Arg(1000)->Unit(benchmark::kMillisecond)->UseRealTime();

static void BM_Plan_Lg3(benchmark::State& state) {
  const Protocol p = read_protocol(std::string(MACROREAL_SOURCE_DIR) + "/protocols/lg3_thermal.json");
  for (auto _ : state) {
    const CampaignPlan plan = plan_campaign(p, PlanOptions{});
    benchmark::DoNotOptimize(plan.total_shots);
  }
}
BENCHMARK(BM_Plan_Lg3)->Unit(benchmark::kMillisecond);

BENCHMARK_MAIN();
