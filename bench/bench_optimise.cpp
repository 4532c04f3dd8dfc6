// Speed of the setting optimiser (issue 6): a 5-parameter `significance` optimisation (the
// three |beta| and the directions of B and C) of the three-time protocol of the README demo
// (thermal mode, one-sided split, heating 20 quanta/s, destructive readout), budget 1e4 shots,
// 4000 objective evaluations. Target: < 1 s on one core. The counter `evals_per_s` is the
// number of objective evaluations (one prediction and one shot allocation each) per second.
#include <benchmark/benchmark.h>

#include <fstream>

#include "design/setting_optimiser.hpp"
#include "protocol/protocol_reader.hpp"

using namespace macroreal;

namespace {

void BM_Optimise_Significance5(benchmark::State& bs) {
  const std::string path = std::string(MACROREAL_SOURCE_DIR) + "/protocols/lg3_thermal.json";
  std::ifstream in(path);
  nlohmann::json original;
  in >> original;
  const Protocol protocol = read_protocol(path);
  OptimiseOptions o;
  o.objective.kind = ObjectiveKind::significance;
  o.objective.budget_shots = 1e4;
  o.free = {"A.beta", "B.beta", "C.beta", "B.angle", "C.angle"};
  o.search.max_evaluations = bs.range(0);
  long evaluations = 0;
  for (auto _ : bs) {
    const OptimisationResult r = optimise_settings(protocol, original, o);
    evaluations += r.evaluations;
    benchmark::DoNotOptimize(r.objective);
  }
  bs.counters["evals_per_s"] =
      benchmark::Counter(static_cast<double>(evaluations), benchmark::Counter::kIsRate);
  bs.counters["evaluations"] = static_cast<double>(evaluations) / bs.iterations();
}
BENCHMARK(BM_Optimise_Significance5)->Arg(4000)->Arg(20000)->Unit(benchmark::kMillisecond);

void BM_Objective_Significance(benchmark::State& bs) {
  const Protocol protocol =
      read_protocol(std::string(MACROREAL_SOURCE_DIR) + "/protocols/lg3_thermal.json");
  ObjectiveOptions o;
  o.kind = ObjectiveKind::significance;
  for (auto _ : bs) benchmark::DoNotOptimize(evaluate_design(protocol, o).objective);
  bs.SetLabel("one evaluation");
}
BENCHMARK(BM_Objective_Significance)->Unit(benchmark::kMicrosecond);

}  // namespace

BENCHMARK_MAIN();
