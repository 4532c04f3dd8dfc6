// Speed of the Fock engine: a three-time Leggett-Garg K_3 (three pair correlators) with
// Markovian dephasing at a fixed cutoff of 80 levels (thermal nbar 0.3, |beta| = 2 at
// 0/60/120 degrees, times 0/100/200 us, dephasing 200/s, symmetric split). The same K_3 in
// QuTiP mesolve: bench/qutip_k3_dephasing_timing.py.
#include <benchmark/benchmark.h>

#include "fock/fock_engine.hpp"
#include "phase_space/temporal_tests.hpp"

using namespace macroreal;

namespace {

MeasurementSequence k3_dephasing_protocol() {
  MeasurementSequence seq;
  const double angle_deg[3] = {0.0, 60.0, 120.0};
  const double time_s[3] = {0.0, 100e-6, 200e-6};
  const char* label[3] = {"A", "B", "C"};
  for (int j = 0; j < 3; ++j) {
    TimedMeasurement m;
    m.label = label[j];
    m.measurement.beta = std::polar(2.0, angle_deg[j] * kDegree);
    m.measurement.split = Split::symmetric;
    m.time_s = time_s[j];
    seq.steps.push_back(m);
  }
  seq.noise.dephasing_rate_per_s = 200.0;
  return seq;
}

// One K_3 at cutoff 80, without (Arg 0) and with (Arg 1) the 25 % truncation re-check.
void BM_FockEngine_K3Dephasing(benchmark::State& bs) {
  FockEngineOptions opt;
  opt.cutoff = 80;
  opt.check_truncation = bs.range(0) != 0;
  const FockEngine eng(make_thermal(0.3), opt);
  const auto seq = k3_dephasing_protocol();
  benchmark::DoNotOptimize(leggett_garg3(eng, seq).K);  // tabulates the state once
  for (auto _ : bs) {
    const auto r = leggett_garg3(eng, seq);
    benchmark::DoNotOptimize(r.K);
  }
  bs.SetLabel(opt.check_truncation ? "per K_3, cutoff 80 + check at 100" : "per K_3, cutoff 80");
}
BENCHMARK(BM_FockEngine_K3Dephasing)->Arg(0)->Arg(1)->Unit(benchmark::kMillisecond);

// The same with damping and heating added (diagonal-block Lindblad propagators).
void BM_FockEngine_K3DampingDephasing(benchmark::State& bs) {
  FockEngineOptions opt;
  opt.cutoff = 80;
  opt.check_truncation = false;
  const FockEngine eng(make_thermal(0.3), opt);
  auto seq = k3_dephasing_protocol();
  seq.noise.damping_rate_per_s = 500.0;
  seq.noise.bath_nbar = 0.3;
  seq.noise.heating_quanta_per_s = 20.0;
  benchmark::DoNotOptimize(leggett_garg3(eng, seq).K);
  for (auto _ : bs) {
    const auto r = leggett_garg3(eng, seq);
    benchmark::DoNotOptimize(r.K);
  }
}
BENCHMARK(BM_FockEngine_K3DampingDephasing)->Unit(benchmark::kMillisecond);

}  // namespace

BENCHMARK_MAIN();
