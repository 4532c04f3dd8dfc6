// Speed of the Weyl engine: a three-time Leggett-Garg K_3 (three pair correlators) on a
// thermal mode with heating, the protocol of the invented demo in DESIGN.md §8.
#include <benchmark/benchmark.h>

#include "phase_space/temporal_tests.hpp"
#include "phase_space/weyl_engine.hpp"

using namespace macroreal;

namespace {

MeasurementSequence k3_protocol(Split split) {
  MeasurementSequence seq;
  const double angle_deg[3] = {0.0, 60.0, 120.0};
  const double time_s[3] = {0.0, 100e-6, 200e-6};
  const char* label[3] = {"A", "B", "C"};
  for (int j = 0; j < 3; ++j) {
    TimedMeasurement m;
    m.label = label[j];
    m.measurement.beta = std::polar(2.0, angle_deg[j] * kDegree);
    m.measurement.split = split;
    m.time_s = time_s[j];
    seq.steps.push_back(m);
  }
  seq.noise.heating_quanta_per_s = 20.0;
  return seq;
}

void BM_WeylEngine_K3Thermal(benchmark::State& bs) {
  const WeylEngine eng(make_thermal(0.3));
  const auto seq = k3_protocol(Split::symmetric);
  for (auto _ : bs) {
    const auto r = leggett_garg3(eng, seq);
    benchmark::DoNotOptimize(r.K);
  }
  bs.SetLabel("ns per K_3");
}
BENCHMARK(BM_WeylEngine_K3Thermal);

void BM_WeylEngine_K3Fock(benchmark::State& bs) {
  const WeylEngine eng(make_fock(static_cast<int>(bs.range(0))));
  const auto seq = k3_protocol(Split::symmetric);
  for (auto _ : bs) {
    const auto r = leggett_garg3(eng, seq);
    benchmark::DoNotOptimize(r.K);
  }
}
BENCHMARK(BM_WeylEngine_K3Fock)->Arg(1)->Arg(20)->Arg(200);

void BM_WeylEngine_K3ThermalDephasing(benchmark::State& bs) {
  const WeylEngine eng(make_thermal(0.3));
  auto seq = k3_protocol(Split::symmetric);
  seq.noise.dephasing_rate_per_s = 1000.0;
  for (auto _ : bs) {
    const auto r = leggett_garg3(eng, seq);
    benchmark::DoNotOptimize(r.K);
  }
}
BENCHMARK(BM_WeylEngine_K3ThermalDephasing);

}  // namespace

BENCHMARK_MAIN();
