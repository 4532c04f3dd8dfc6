// Speed of the stratified bootstrap: B = 10^4 replicates with BCa for K of a destructive
// three-time LG campaign, 6 sequences x 10^5 shots (target <= 50 ms). Counts invented.
#include <benchmark/benchmark.h>

#include "stats/bootstrap.hpp"
#include "stats/estimator.hpp"
#include "stats/estimator_statistic.hpp"
#include "stats/linear_functional.hpp"

using namespace macroreal;

namespace {

CampaignCounts campaign(double shots) {
  CampaignCounts c;
  c.readout = Readout::destructive;
  const char* names[6] = {"AB+", "AB-", "BC+", "BC-", "AC+", "AC-"};
  const std::vector<std::string> steps[6] = {{"A", "B"}, {"A", "B"}, {"B", "C"},
                                             {"B", "C"}, {"A", "C"}, {"A", "C"}};
  const double frac[6][3] = {{0.40, 0.10, 0.50}, {0.08, 0.42, 0.50}, {0.41, 0.09, 0.50},
                             {0.10, 0.40, 0.50}, {0.22, 0.28, 0.50}, {0.27, 0.23, 0.50}};
  for (int s = 0; s < 6; ++s) {
    SequenceCounts q;
    q.name = names[s];
    q.steps = steps[s];
    q.dark_is = {s % 2 == 0 ? +1 : -1, +1};
    q.cells = cell_layout(2, q.dark_is, c.readout);
    for (double f : frac[s]) q.counts.push_back(std::floor(f * shots));
    c.sequences.push_back(q);
  }
  return c;
}

Protocol protocol_of(const CampaignCounts& c) {
  Protocol p;
  p.readout = c.readout;
  for (const auto& s : c.sequences) {
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
  return p;
}

BootstrapOptions bca_only(int threads) {
  BootstrapOptions o;
  o.replicates = 10000;
  o.percentile = o.basic = o.studentized = false;
  o.bca = true;
  o.threads = threads;
  return o;
}

}  // namespace

// Pooled MLE K (estimator.hpp), the product path; Arg = threads.
static void BM_Bootstrap_BCaK3(benchmark::State& state) {
  const CampaignCounts c = campaign(1e5);
  const Protocol p = protocol_of(c);
  const CampaignEstimator est(p, c);
  const CountStatistic stat = estimator_statistic(est, {"K[ABC]"});
  const CellCounts counts = CampaignEstimator::counts_of(c);
  const BootstrapOptions o = bca_only(static_cast<int>(state.range(0)));
  for (auto _ : state) {
    auto r = stratified_bootstrap(counts, stat, o);
    benchmark::DoNotOptimize(r.quantities[0].bca.lo);
  }
}
BENCHMARK(BM_Bootstrap_BCaK3)->Arg(1)->Arg(2)->Unit(benchmark::kMillisecond);

// Non-pooled linear K (linear_functional.hpp).
static void BM_Bootstrap_BCaK3Linear(benchmark::State& state) {
  const CampaignCounts c = campaign(1e5);
  const CountStatistic stat = linear_statistic(lg_functional(c, {"A", "B", "C"}));
  CellCounts counts;
  for (const auto& s : c.sequences) counts.push_back(s.counts);
  const BootstrapOptions o = bca_only(static_cast<int>(state.range(0)));
  for (auto _ : state) {
    auto r = stratified_bootstrap(counts, stat, o);
    benchmark::DoNotOptimize(r.quantities[0].bca.lo);
  }
}
BENCHMARK(BM_Bootstrap_BCaK3Linear)->Arg(1)->Arg(2)->Unit(benchmark::kMillisecond);

// All four intervals with the studentised one (delta-method SE per replicate).
static void BM_Bootstrap_AllIntervalsK3(benchmark::State& state) {
  const CampaignCounts c = campaign(1e5);
  const Protocol p = protocol_of(c);
  const CampaignEstimator est(p, c);
  const CountStatistic stat = estimator_statistic(est, {"K[ABC]"});
  const CellCounts counts = CampaignEstimator::counts_of(c);
  BootstrapOptions o;
  o.replicates = 10000;
  o.threads = 1;
  for (auto _ : state) {
    auto r = stratified_bootstrap(counts, stat, o);
    benchmark::DoNotOptimize(r.quantities[0].studentized.lo);
  }
}
BENCHMARK(BM_Bootstrap_AllIntervalsK3)->Unit(benchmark::kMillisecond);

BENCHMARK_MAIN();
