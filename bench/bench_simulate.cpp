// Speed of campaign simulation (design/campaign_simulation.hpp): 10^7 shots of a three-time
// destructive-readout campaign (protocols/lg3_thermal.json's measurements with the four
// three-step configurations ABC, plus the pairs its LG and NSIT tests need), target <= 2 s on
// one core. Two figures: the draws alone (a sink that only counts) and the CSV writer into
// /dev/null. The plan (model evaluation, tables) is built once, outside the timed loop.
#include <cstdio>
#include <string>

#include <benchmark/benchmark.h>

#include "design/campaign_simulation.hpp"
#include "design/simulated_table_writer.hpp"
#include "protocol/protocol_reader.hpp"

using namespace macroreal;

namespace {

constexpr long kTotalShots = 10000000;

Protocol three_time_protocol() {
  const std::string text = R"json({
    "format": "macroreal-protocol/1",
    "title": "three-time destructive campaign (benchmark)",
    "state": {"kind": "thermal", "nbar": 0.3},
    "readout": "destructive",
    "measurements": {
      "A": {"beta": [2.4, 0.0], "phase_deg": 0.0, "split": "one-sided", "time_s": 0.0},
      "B": {"beta_polar": [2.4, 180.0], "phase_deg": 15.0, "split": "one-sided", "time_s": 100e-6},
      "C": {"beta_polar": [2.4, 350.0], "phase_deg": 270.0, "split": "one-sided", "time_s": 200e-6}},
    "noise": {"heating_quanta_per_s": 20.0},
    "detection": {"dark_read_bright": 1e-3, "bright_read_dark": 1e-3},
    "sequences": [
      {"name": "ABC++", "steps": ["A", "B", "C"], "dark_is": ["+", "+", "+"]},
      {"name": "ABC+-", "steps": ["A", "B", "C"], "dark_is": ["+", "-", "+"]},
      {"name": "ABC-+", "steps": ["A", "B", "C"], "dark_is": ["-", "+", "+"]},
      {"name": "ABC--", "steps": ["A", "B", "C"], "dark_is": ["-", "-", "+"]}],
    "tests": [{"kind": "leggett-garg", "order": ["A", "B", "C"]},
              {"kind": "nsit", "from": "A", "to": "B"}]
  })json";
  return parse_protocol_text(text, "bench.json");
}

SimulationPlan bench_plan(bool counts) {
  const Protocol p = three_time_protocol();
  SimulationOptions o;
  o.seed = 1;
  o.shots_per_sequence = kTotalShots / static_cast<long>(p.sequences.size());
  o.errors = {1e-3, 1e-3};
  o.step_time_s = 1e-4;
  if (counts) o.counts = PhotonCountModel{0.2, 12.0, 2.0};
  return plan_simulation(p, o);
}

class CountingSink : public ShotSink {
 public:
  void shot(const SimulatedShot& s) override { sum_ += s.time_ns + static_cast<unsigned>(s.pattern); }
  std::uint64_t sum_ = 0;
};

void BM_Simulate_DrawOnly(benchmark::State& state) {
  const SimulationPlan plan = bench_plan(false);
  for (auto _ : state) {
    CountingSink sink;
    const SimulationSummary s = simulate_campaign(plan, sink);
    benchmark::DoNotOptimize(sink.sum_);
    benchmark::DoNotOptimize(s.rows);
  }
  state.counters["shots"] = static_cast<double>(plan.total_shots);
  state.SetItemsProcessed(state.iterations() * static_cast<long>(plan.total_shots));
}

void BM_Simulate_CsvDevNull(benchmark::State& state, bool counts) {
  const SimulationPlan plan = bench_plan(counts);
  const auto comments = simulated_table_comments(plan, {});
  for (auto _ : state) {
    std::FILE* f = std::fopen("/dev/null", "wb");
    if (!f) {
      state.SkipWithError("cannot open /dev/null");
      return;
    }
    SimulatedTableWriter w(f, "/dev/null", plan, comments);
    const SimulationSummary s = simulate_campaign(plan, w);
    std::fclose(f);
    benchmark::DoNotOptimize(s.rows);
  }
  state.counters["shots"] = static_cast<double>(plan.total_shots);
  state.SetItemsProcessed(state.iterations() * static_cast<long>(plan.total_shots));
}

void BM_Simulate_CsvDevNull_Results(benchmark::State& state) { BM_Simulate_CsvDevNull(state, false); }
void BM_Simulate_CsvDevNull_PhotonCounts(benchmark::State& state) { BM_Simulate_CsvDevNull(state, true); }

}  // namespace

BENCHMARK(BM_Simulate_DrawOnly)->Unit(benchmark::kMillisecond)->Iterations(3);
BENCHMARK(BM_Simulate_CsvDevNull_Results)->Unit(benchmark::kMillisecond)->Iterations(3);
BENCHMARK(BM_Simulate_CsvDevNull_PhotonCounts)->Unit(benchmark::kMillisecond)->Iterations(1);

BENCHMARK_MAIN();
