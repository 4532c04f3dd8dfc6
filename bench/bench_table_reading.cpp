// Speed of the outcome table reader against `wc -l` on the same file, and of one evaluation
// of the campaign estimator (the bootstrap's inner call).
//
// BM_OutcomeTable_Read10M generates (once, outside the timed loop) a deterministic
// 10^7-row destructive three-step table in /tmp, then runs read_outcome_table with its
// default of 2 threads, read_outcome_table with 1 thread and `wc -l` (std::system, one
// thread) on the same file in the same run, alternating, 5 times each, and reports the file
// size, the median throughputs in MB/s and their ratios to `wc -l`, by wall clock and by CPU
// time (getrusage; the CPU time of the 2-thread reader is the sum over both threads, so its
// CPU ratio is a per-core figure, while the wall-clock ratio is the throughput seen by a
// user, 2 threads against 1).
#include <algorithm>
#include <chrono>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <string>
#include <utility>
#include <vector>

#include <sys/resource.h>

#include <benchmark/benchmark.h>

#include "stats/estimator.hpp"
#include "stats/outcome_table_reader.hpp"

using namespace macroreal;

namespace {

SequenceSpec seq(std::string name, std::vector<std::string> steps, std::vector<int> dark_is) {
  SequenceSpec s;
  s.name = std::move(name);
  s.steps = std::move(steps);
  s.dark_is = std::move(dark_is);
  return s;
}

Protocol three_step_protocol() {
  Protocol p;
  p.readout = Readout::destructive;
  p.sequences = {seq("ABC++", {"A", "B", "C"}, {+1, +1, +1}), seq("ABC+-", {"A", "B", "C"}, {+1, -1, +1}),
                 seq("ABC-+", {"A", "B", "C"}, {-1, +1, +1}), seq("ABC--", {"A", "B", "C"}, {-1, -1, +1})};
  return p;
}

const std::string kPath = "/tmp/macroreal-bench-table-10M.csv";
constexpr long kRows = 10000000;

// Writes the table with a fixed 64-bit LCG (Knuth's MMIX constants), so the bytes are the
// same on every run. Invented data.
void generate_table() {
  std::FILE* f = std::fopen(kPath.c_str(), "wb");
  if (!f) std::abort();
  std::fputs("# invented benchmark table\nsequence,shot,time_s,r1,r2,r3\n", f);
  const char* names[4] = {"ABC++", "ABC+-", "ABC-+", "ABC--"};
  const char* results[4] = {"bright,,", "dark,bright,", "dark,dark,bright", "dark,dark,dark"};
  std::uint64_t x = 42;
  long shot[4] = {0, 0, 0, 0};
  char line[128];
  for (long i = 0; i < kRows; ++i) {
    x = x * 6364136223846793005ull + 1442695040888963407ull;
    const int s = static_cast<int>(i % 4), r = static_cast<int>((x >> 33) % 4);
    const int n = std::snprintf(line, sizeof line, "%s,%ld,%.6f,%s\n", names[s], shot[s]++,
                                2.5e-3 * static_cast<double>(i), results[r]);
    std::fwrite(line, 1, static_cast<std::size_t>(n), f);
  }
  std::fclose(f);
}

void ensure_table() {
  static bool done = false;
  if (done) return;
  generate_table();
  done = true;
}

double cpu_seconds(int who) {
  rusage u{};
  getrusage(who, &u);
  return static_cast<double>(u.ru_utime.tv_sec + u.ru_stime.tv_sec) +
         1e-6 * static_cast<double>(u.ru_utime.tv_usec + u.ru_stime.tv_usec);
}

double median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  const std::size_t n = v.size();
  return n % 2 == 1 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
}

constexpr int kRuns = 5;  // runs of each side; the median is reported

// Median of kRuns runs of `wc -l`: wall seconds and CPU seconds of the child processes
// (the machine may be shared, so CPU time is the fairer comparison).
std::pair<double, double> seconds_of_wc(const std::string& cmd) {
  std::vector<double> wall, cpu;
  for (int k = 0; k < kRuns; ++k) {
    const double c0 = cpu_seconds(RUSAGE_CHILDREN);
    const auto t0 = std::chrono::steady_clock::now();
    if (std::system(cmd.c_str()) != 0) return {-1.0, -1.0};
    const auto t1 = std::chrono::steady_clock::now();
    wall.push_back(std::chrono::duration<double>(t1 - t0).count());
    cpu.push_back(cpu_seconds(RUSAGE_CHILDREN) - c0);
  }
  return {median(wall), median(cpu)};
}

// The reader and `wc -l` alternate run by run, so both see the same machine load.
void BM_OutcomeTable_Read10M(benchmark::State& state) {
  ensure_table();
  const auto protocol = three_step_protocol();
  const double bytes = static_cast<double>(std::filesystem::file_size(kPath));
  const std::string cmd = "wc -l " + kPath + " > /dev/null";
  std::vector<double> wall, cpu, wall1, cpu1, wc_wall, wc_cpu;
  OutcomeTableOptions one_thread;
  one_thread.threads = 1;
  // One read with the given options: wall and CPU seconds (RUSAGE_SELF counts all threads).
  auto timed_read = [&](const OutcomeTableOptions& o, std::vector<double>& w, std::vector<double>& c) {
    const double c0 = cpu_seconds(RUSAGE_SELF);
    const auto t0 = std::chrono::steady_clock::now();
    auto r = read_outcome_table(kPath, protocol, o);
    const auto t1 = std::chrono::steady_clock::now();
    c.push_back(cpu_seconds(RUSAGE_SELF) - c0);
    w.push_back(std::chrono::duration<double>(t1 - t0).count());
    benchmark::DoNotOptimize(r.counts.rows.used);
    if (r.counts.rows.used != kRows) state.SkipWithError("wrong row count");
  };
  for (auto _ : state) {
    for (int k = 0; k < kRuns; ++k) {
      timed_read(OutcomeTableOptions{}, wall, cpu);
      state.PauseTiming();
      timed_read(one_thread, wall1, cpu1);
      const auto [w, c] = seconds_of_wc(cmd);
      state.ResumeTiming();
      wc_wall.push_back(w);
      wc_cpu.push_back(c);
    }
  }
  const double rw = median(wall), rc = median(cpu), ww = median(wc_wall), wcpu = median(wc_cpu);
  const double rw1 = median(wall1), rc1 = median(cpu1);
  state.SetBytesProcessed(static_cast<std::int64_t>(bytes) * state.iterations() * kRuns);
  state.counters["reader_MBps_wall"] = bytes / rw / 1e6;
  state.counters["reader_MBps_cpu"] = bytes / rc / 1e6;
  state.counters["reader_1thread_MBps_wall"] = bytes / rw1 / 1e6;
  state.counters["reader_1thread_MBps_cpu"] = bytes / rc1 / 1e6;
  state.counters["wc_l_MBps_wall"] = ww > 0 ? bytes / ww / 1e6 : 0.0;
  state.counters["wc_l_MBps_cpu"] = wcpu > 0 ? bytes / wcpu / 1e6 : 0.0;
  state.counters["ratio_wall"] = ww > 0 ? ww / rw : 0.0;
  state.counters["ratio_cpu"] = wcpu > 0 ? wcpu / rc : 0.0;
  state.counters["ratio_1thread_wall"] = ww > 0 ? ww / rw1 : 0.0;
  state.counters["ratio_1thread_cpu"] = wcpu > 0 ? wcpu / rc1 : 0.0;
  std::printf("file %s: %.1f MB (%ld rows); medians of %zu runs of each side\n", kPath.c_str(),
              bytes / 1e6, kRows, wall.size());
  std::printf("wall: reader, 2 threads %.0f MB/s; wc -l (1 thread) %.0f MB/s; ratio %.3f (target >= 0.25)\n",
              bytes / rw / 1e6, bytes / ww / 1e6, ww / rw);
  std::printf("wall: reader, 1 thread  %.0f MB/s; ratio %.3f\n", bytes / rw1 / 1e6, ww / rw1);
  std::printf("cpu:  reader, 2 threads %.0f MB/s (CPU time of both threads); wc -l %.0f MB/s; ratio %.3f\n",
              bytes / rc / 1e6, bytes / wcpu / 1e6, wcpu / rc);
  std::printf("cpu:  reader, 1 thread  %.0f MB/s; ratio %.3f\n", bytes / rc1 / 1e6, wcpu / rc1);
}
BENCHMARK(BM_OutcomeTable_Read10M)->Unit(benchmark::kMillisecond)->Iterations(1);

// One evaluation for a three-time LG campaign plus an NSIT control: 6 two-step sequences
// and one single-step sequence.
void BM_Estimator_Evaluate(benchmark::State& state) {
  Protocol p;
  p.readout = Readout::destructive;
  p.sequences = {seq("AB+", {"A", "B"}, {1, 1}), seq("AB-", {"A", "B"}, {-1, 1}),
                 seq("BC+", {"B", "C"}, {1, 1}), seq("BC-", {"B", "C"}, {-1, 1}),
                 seq("AC+", {"A", "C"}, {1, 1}), seq("AC-", {"A", "C"}, {-1, 1})};
  TestSpec lg;
  lg.kind = TestSpec::Kind::leggett_garg;
  lg.order = {"A", "B", "C"};
  p.tests = {lg};
  auto c = empty_counts(p);
  for (auto& s : c.sequences)
    for (std::size_t j = 0; j < s.counts.size(); ++j) s.counts[j] = 100.0 + 37.0 * static_cast<double>(j);
  const CampaignEstimator est(p, c);
  const auto counts = CampaignEstimator::counts_of(c);
  std::vector<double> out;
  est.evaluate(counts, out);
  for (auto _ : state) {
    est.evaluate(counts, out);
    benchmark::DoNotOptimize(out.data());
  }
}
BENCHMARK(BM_Estimator_Evaluate);

}  // namespace

BENCHMARK_MAIN();
