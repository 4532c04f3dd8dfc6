// Speed of the photon-count calibration (lib/detection/calibration.hpp) on the invented demo
// counts (example_runs/calibration_counts.csv, 6000 shots): the fit alone, and the whole
// calibration with B bootstrap replicates; and the decay-model fit (Nelder-Mead).
#include <benchmark/benchmark.h>

#include "detection/calibration.hpp"
#include "detection/calibration_counts.hpp"

namespace {

const macroreal::CountHistograms& demo(bool decay) {
  static const auto plain = macroreal::read_calibration_counts(std::string(MACROREAL_SOURCE_DIR) +
                                                               "/example_runs/calibration_counts.csv");
  static const auto decaying = macroreal::read_calibration_counts(std::string(MACROREAL_SOURCE_DIR) +
                                                                  "/example_runs/calibration_counts_decay.csv");
  return decay ? decaying : plain;
}

void BM_Calibrate_FitEM(benchmark::State& state) {
  const auto& h = demo(false);
  for (auto _ : state) benchmark::DoNotOptimize(macroreal::fit_mixture(h));
}
BENCHMARK(BM_Calibrate_FitEM)->Unit(benchmark::kMicrosecond);

void BM_Calibrate_FitDecay(benchmark::State& state) {
  const auto& h = demo(true);
  macroreal::MixtureFitOptions o;
  o.pump_per_window = 0.06;
  for (auto _ : state) benchmark::DoNotOptimize(macroreal::fit_mixture(h, o));
}
BENCHMARK(BM_Calibrate_FitDecay)->Unit(benchmark::kMillisecond);

void BM_Calibrate_Bootstrap(benchmark::State& state) {
  const auto& h = demo(false);
  macroreal::CalibrationOptions o;
  o.bootstrap_replicates = static_cast<int>(state.range(0));
  for (auto _ : state) benchmark::DoNotOptimize(macroreal::calibrate_counts(h, o));
}
BENCHMARK(BM_Calibrate_Bootstrap)->Arg(200)->Arg(1000)->Unit(benchmark::kMillisecond);

}  // namespace
BENCHMARK_MAIN();
