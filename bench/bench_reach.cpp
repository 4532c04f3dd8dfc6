// Speed of `macroreal reach --map`: a 50 x 50 grid of time-to-conclusive (Leggett-Garg, the
// post-selected route optimised at every point) over the occupation after cooling and the
// coupling of the invented trapped-ion map demo (example_runs/devices/trapped_ion_map.json,
// which has a feasibility boundary; the membrane map is infeasible everywhere), on 2 threads;
// target <= 60 s (issue 8). The map warm-starts each point from its row neighbour (reach_map.hpp); the reference in the same run is the
// previous method, every point searched independently (MapOptions::warm_start = false), on
// 10 x 10 (x 25 for the 50 x 50 estimate). Also one point alone with the single-run search.
#include <benchmark/benchmark.h>

#include <cmath>

#include "device/device_spec.hpp"
#include "device/feasibility.hpp"
#include "device/reach_map.hpp"

using namespace macroreal;

namespace {

DeviceSpec grid_spec(int n) {
  DeviceSpec spec = read_device(std::string(MACROREAL_SOURCE_DIR) +
                                "/example_runs/devices/trapped_ion_map.json");
  auto& t = spec.ranges.at("occupation_after_cooling").values;
  auto& g = spec.ranges.at("coupling_g_over_2pi_hz").values;
  const double t0 = t.front(), t1 = t.back(), g0 = g.front(), g1 = g.back();
  t.resize(static_cast<std::size_t>(n));
  g.resize(static_cast<std::size_t>(n));
  for (int i = 0; i < n; ++i) {
    const double u = static_cast<double>(i) / (n - 1);
    t[static_cast<std::size_t>(i)] = t0 * std::pow(t1 / t0, u);
    g[static_cast<std::size_t>(i)] = g0 * std::pow(g1 / g0, u);
  }
  return spec;
}

void BM_Reach_OnePoint(benchmark::State& bs) {
  const DeviceSpec spec = read_device(std::string(MACROREAL_SOURCE_DIR) +
                                      "/example_runs/devices/trapped_ion_mode.json");
  ReachOptions opt;
  opt.evaluate_thermal_route = false;
  for (auto _ : bs) benchmark::DoNotOptimize(time_to_conclusive(spec.base, opt));
  bs.SetLabel("one point, LG, post-selected route");
}
BENCHMARK(BM_Reach_OnePoint)->Unit(benchmark::kMillisecond);

void BM_Reach_Map(benchmark::State& bs) {
  const int n = static_cast<int>(bs.range(0));
  const DeviceSpec spec = grid_spec(n);
  MapOptions mo;
  mo.threads = 2;
  for (auto _ : bs) {
    const ReachMap m = reach_map(spec, "occupation_after_cooling", "coupling_g_over_2pi_hz", mo);
    benchmark::DoNotOptimize(m.points.data());
  }
  bs.SetLabel(std::to_string(n) + " x " + std::to_string(n) + " map, 2 threads");
}
BENCHMARK(BM_Reach_Map)->Arg(10)->Arg(50)->Unit(benchmark::kSecond)->Iterations(1);

void BM_Reach_Map_Independent(benchmark::State& bs) {
  const int n = static_cast<int>(bs.range(0));
  const DeviceSpec spec = grid_spec(n);
  MapOptions mo;
  mo.threads = 2;
  mo.warm_start = false;
  for (auto _ : bs) {
    const ReachMap m = reach_map(spec, "occupation_after_cooling", "coupling_g_over_2pi_hz", mo);
    benchmark::DoNotOptimize(m.points.data());
  }
  bs.SetLabel(std::to_string(n) + " x " + std::to_string(n) +
              " map, 2 threads, every point searched independently (reference)");
}
BENCHMARK(BM_Reach_Map_Independent)->Arg(10)->Unit(benchmark::kSecond)->Iterations(1);

}  // namespace

BENCHMARK_MAIN();
