// Validity studies of the inference part of the statistics core ("[long]", CTest label long):
//   * coverage of the 95 % bootstrap intervals (percentile, basic, studentised, BCa) for K and
//     S over 2000 simulated campaigns in each of 7 scenarios (small counts, probabilities near
//     0 and 1, K near 1); the DEFAULT interval must lie inside the binomial Monte Carlo band
//     95 % +- 3 sqrt(0.95 * 0.05 / 2000) in every scenario;
//   * type-I error of every LG test at the least-favourable null K = 1 exactly, which must not
//     exceed alpha = 0.05 + 3 sqrt(0.05 * 0.95 / 2000) (Monte Carlo band).
// Scenarios are defined directly by the joint probabilities P_ij(a, b) of each pair, from
// which the cells of the six destructive sequences AB+, AB-, BC+, BC-, AC+, AC- and of [B]
// follow (invented numbers). Campaign c of scenario s uses seed derive_seed(seed, s * 10^6 + c),
// so results do not depend on the number of threads. Rates are written to
// <build>/validity_coverage.csv, <build>/validity_type1.csv and <build>/validity_rates.md.
#include <cmath>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <catch2/catch.hpp>
#include <omp.h>

#include "stats/bootstrap.hpp"
#include "stats/estimator.hpp"
#include "stats/estimator_statistic.hpp"
#include "stats/leggett_garg_tests.hpp"
#include "stats/linear_functional.hpp"
#include "stats/nsit_tests.hpp"
#include "stats/random_variates.hpp"
#include "inference_fixtures.hpp"

using namespace macroreal;
using namespace macroreal::testing;

namespace {

constexpr long kCampaigns = 2000;
constexpr std::uint64_t kSeed = 0x76616c6964ULL;

struct Scenario {
  std::string name;
  double ab[4], bc[4], ac[4];  // P(++), P(+-), P(-+), P(--) of each pair
  double b_alone;              // P_B(+) in runs of [B]
  double shots;                // per sequence
};

double corr(const double p[4]) { return p[0] - p[1] - p[2] + p[3]; }
double true_k(const Scenario& s) { return corr(s.ab) + corr(s.bc) - corr(s.ac); }
double true_s(const Scenario& s) {
  const double v = s.b_alone - s.ab[0] - s.ab[2];
  return std::abs(v) < 1e-12 ? 0.0 : v;  // exact zeros print as 0
}

// Cell probabilities in the layout of nsit_lg_campaign(): B, AB+, AB-, BC+, BC-, AC+, AC-.
CellCounts cell_probabilities(const Scenario& s) {
  auto pair = [](const double p[4]) {
    return std::vector<std::vector<double>>{{p[0], p[1], p[2] + p[3]},   // dark +: "++", "+-", "-"
                                            {p[2], p[3], p[0] + p[1]}};  // dark -: "-+", "--", "+"
  };
  CellCounts c{{s.b_alone, 1.0 - s.b_alone}};
  for (const double* p : {s.ab, s.bc, s.ac})
    for (auto& row : pair(p)) c.push_back(row);
  return c;
}

CampaignCounts nsit_lg_campaign(const CellCounts& counts) {
  CampaignCounts c;
  c.readout = Readout::destructive;
  c.sequences.push_back(make_sequence("B", {"B"}, {+1}, counts[0]));
  const char* names[6] = {"AB+", "AB-", "BC+", "BC-", "AC+", "AC-"};
  const std::vector<std::string> steps[6] = {{"A", "B"}, {"A", "B"}, {"B", "C"},
                                             {"B", "C"}, {"A", "C"}, {"A", "C"}};
  for (int s = 0; s < 6; ++s)
    c.sequences.push_back(make_sequence(names[s], steps[s], {s % 2 == 0 ? +1 : -1, +1},
                                        counts[static_cast<std::size_t>(s + 1)]));
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
  TestSpec lg;
  lg.kind = TestSpec::Kind::leggett_garg;
  lg.order = {"A", "B", "C"};
  TestSpec ns;
  ns.kind = TestSpec::Kind::nsit;
  ns.from = "A";
  ns.to = "B";
  p.tests = {lg, ns};
  return p;
}

CellCounts shots_like(const Scenario& s) {
  CellCounts c = cell_probabilities(s);
  for (auto& row : c) {
    std::fill(row.begin(), row.end(), 0.0);
    row[0] = s.shots;
  }
  return c;
}

const std::vector<Scenario> kCoverage = {
    // name, AB, BC, AC, P_B(+) alone, shots per sequence (all invented)
    {"generic n=50", {0.40, 0.10, 0.08, 0.42}, {0.41, 0.07, 0.10, 0.42}, {0.25, 0.25, 0.22, 0.28}, 0.45, 50},
    {"K=1 n=50", {0.40, 0.10, 0.10, 0.40}, {0.40, 0.10, 0.10, 0.40}, {0.30, 0.20, 0.20, 0.30}, 0.50, 50},
    {"near 0/1 cells n=50", {0.49, 0.01, 0.01, 0.49}, {0.48, 0.02, 0.01, 0.49}, {0.45, 0.05, 0.03, 0.47}, 0.49, 50},
    {"skewed P(A)=0.9 n=50", {0.80, 0.10, 0.02, 0.08}, {0.75, 0.07, 0.03, 0.15}, {0.70, 0.20, 0.03, 0.07}, 0.80, 50},
    {"near 0/1 cells n=200", {0.49, 0.01, 0.01, 0.49}, {0.48, 0.02, 0.01, 0.49}, {0.45, 0.05, 0.03, 0.47}, 0.97, 200},
    {"generic n=1000", {0.40, 0.10, 0.08, 0.42}, {0.41, 0.07, 0.10, 0.42}, {0.25, 0.25, 0.22, 0.28}, 0.45, 1000},
    {"small n=30", {0.35, 0.15, 0.12, 0.38}, {0.36, 0.12, 0.15, 0.37}, {0.20, 0.30, 0.25, 0.25}, 0.40, 30},
};

// K = 1 exactly in each (checked in the test).
const std::vector<Scenario> kNull = {
    {"K=1 n=50", {0.40, 0.10, 0.10, 0.40}, {0.40, 0.10, 0.10, 0.40}, {0.30, 0.20, 0.20, 0.30}, 0.50, 50},
    {"K=1 near 0/1 n=50", {0.49, 0.01, 0.01, 0.49}, {0.48, 0.02, 0.01, 0.49}, {0.47, 0.03, 0.02, 0.48}, 0.50, 50},
    {"K=1 skewed n=50", {0.80, 0.10, 0.02, 0.08}, {0.75, 0.07, 0.03, 0.15}, {0.71, 0.19, 0.03, 0.07}, 0.82, 50},
    {"K=1 skewed n=500", {0.80, 0.10, 0.02, 0.08}, {0.75, 0.07, 0.03, 0.15}, {0.71, 0.19, 0.03, 0.07}, 0.82, 500},
    {"K=1 n=2000", {0.40, 0.10, 0.10, 0.40}, {0.40, 0.10, 0.10, 0.40}, {0.30, 0.20, 0.20, 0.30}, 0.50, 2000},
};

const IntervalMethod kMethods[5] = {IntervalMethod::percentile, IntervalMethod::basic,
                                    IntervalMethod::studentized, IntervalMethod::bca,
                                    IntervalMethod::envelope};
constexpr int kM = 5;
const double kSmoothing[2] = {0.0, 0.5};  // ordinary and smoothed resampling (bootstrap.hpp)
constexpr int kV = 2;

std::string out_path(const std::string& file) { return std::string(MACROREAL_BINARY_DIR) + "/" + file; }

}  // namespace

TEST_CASE("Validity: coverage of the 95% bootstrap intervals for K and S", "[stats][long]") {
  const double band = 3.0 * std::sqrt(0.95 * 0.05 / kCampaigns);
  const BootstrapOptions defaults;
  std::ofstream csv(out_path("validity_coverage.csv"));
  csv << "scenario,shots,quantity,true_value,smoothing,method,coverage,undefined,campaigns\n";
  std::ostringstream md;
  md << "| scenario | quantity | true | smoothing | percentile | basic | studentized | BCa | envelope | undefined |\n"
     << "|---|---|---|---|---|---|---|---|---|---|\n";
  for (std::size_t si = 0; si < kCoverage.size(); ++si) {
    const Scenario& sc = kCoverage[si];
    const CellCounts prob = cell_probabilities(sc);
    const CellCounts like = shots_like(sc);
    const CampaignCounts layout = nsit_lg_campaign(like);
    const Protocol proto = protocol_of(layout);
    const CampaignEstimator est(proto, layout);
    const CountStatistic stat = estimator_statistic(est, {"K[ABC]", "S[A->B]"});
    const double truth[2] = {true_k(sc), true_s(sc)};
    // covered[((v * 2 + q) * kM + m) * kCampaigns + c]: 1 covered, 0 not, -1 undefined (not covered)
    std::vector<int> covered(static_cast<std::size_t>(kV * 2 * kM * kCampaigns), 0);
    auto at = [&](int v, int q, int m, long c) -> int& {
      return covered[((static_cast<std::size_t>(v) * 2 + static_cast<std::size_t>(q)) * kM +
                      static_cast<std::size_t>(m)) * kCampaigns + static_cast<std::size_t>(c)];
    };
#pragma omp parallel for schedule(dynamic, 8)
    for (long c = 0; c < kCampaigns; ++c) {
      RandomEngine g(derive_seed(kSeed, si * 1000000 + static_cast<std::uint64_t>(c)));
      CellCounts counts = like;
      simulate_counts(g, prob, like, counts);
      for (int v = 0; v < kV; ++v) {
        BootstrapOptions o;
        o.replicates = 999;
        o.smoothing = kSmoothing[v];
        o.seed = derive_seed(kSeed ^ 0xb007, si * 1000000 + static_cast<std::uint64_t>(c));
        o.threads = 1;
        const BootstrapResult r = stratified_bootstrap(counts, stat, o);
        for (int q = 0; q < 2; ++q)
          for (int m = 0; m < kM; ++m) {
            const Interval& iv = r.quantities[static_cast<std::size_t>(q)].interval(kMethods[m]);
            at(v, q, m, c) = iv.valid ? ((iv.lo <= truth[q] && truth[q] <= iv.hi) ? 1 : 0) : -1;
          }
      }
    }
    for (int v = 0; v < kV; ++v)
      for (int q = 0; q < 2; ++q) {
        const char* qname = q == 0 ? "K" : "S";
        md << "| " << sc.name << " | " << qname << " | " << truth[q] << " | " << kSmoothing[v];
        long undefined = 0;
        for (int m = 0; m < kM; ++m) {
          long cov = 0, undef = 0;
          for (long c = 0; c < kCampaigns; ++c) {
            cov += at(v, q, m, c) == 1;
            undef += at(v, q, m, c) == -1;
          }
          undefined = std::max(undefined, undef);
          const double rate = static_cast<double>(cov) / kCampaigns;
          csv << '"' << sc.name << "\"," << sc.shots << ',' << qname << ',' << truth[q] << ','
              << kSmoothing[v] << ',' << to_string(kMethods[m]) << ',' << rate << ',' << undef << ','
              << kCampaigns << '\n';
          md << " | " << rate;
          WARN(sc.name << " " << qname << " smoothing " << kSmoothing[v] << " " << to_string(kMethods[m])
                       << ": coverage " << rate << " (undefined " << undef << ")");
          if (kMethods[m] == defaults.default_method && kSmoothing[v] == defaults.smoothing) {
            INFO("default interval " << to_string(kMethods[m]) << " smoothing " << kSmoothing[v]
                                     << ", scenario " << sc.name << ", " << qname);
            // Band: binomial Monte Carlo error of 2000 campaigns, 3 standard errors.
            CHECK(rate >= 0.95 - band);
            CHECK(rate <= 0.95 + band);
          }
        }
        md << " | " << undefined << " |\n";
      }
  }
  std::ofstream(out_path("validity_rates.md")) << "## Coverage of 95% intervals (" << kCampaigns
                                               << " campaigns per scenario, B = 999)\n\n" << md.str();
}

TEST_CASE("Validity: type-I error of the LG tests at K = 1", "[stats][long]") {
  const double alpha = 0.05, band = 3.0 * std::sqrt(alpha * (1 - alpha) / kCampaigns);
  const char* names[5] = {"z-asymptotic (pooled MLE)", "z-asymptotic (linear)", "hoeffding",
                          "empirical-bernstein", "parametric-bootstrap"};
  std::ofstream csv(out_path("validity_type1.csv"));
  csv << "scenario,shots,method,rejection_rate,campaigns\n";
  std::ostringstream md;
  md << "\n## Type-I error at K = 1 (alpha = 0.05, " << kCampaigns << " campaigns)\n\n"
     << "| scenario |";
  for (const char* n : names) md << ' ' << n << " |";
  md << "\n|---|---|---|---|---|---|\n";
  for (std::size_t si = 0; si < kNull.size(); ++si) {
    const Scenario& sc = kNull[si];
    REQUIRE(std::abs(true_k(sc) - 1.0) < 1e-12);
    const CellCounts prob = cell_probabilities(sc);
    const CellCounts like = shots_like(sc);
    const CampaignCounts layout = nsit_lg_campaign(like);
    const Protocol proto = protocol_of(layout);
    const CampaignEstimator est(proto, layout);
    const int ki = est.index_of("K[ABC]");
    REQUIRE(ki >= 0);
    const LinearFunctional k = lg_functional(layout, {"A", "B", "C"});
    std::vector<int> reject(5 * kCampaigns, 0);
#pragma omp parallel for schedule(dynamic, 8)
    for (long c = 0; c < kCampaigns; ++c) {
      RandomEngine g(derive_seed(kSeed + 1, si * 1000000 + static_cast<std::uint64_t>(c)));
      CellCounts counts = like;
      simulate_counts(g, prob, like, counts);
      std::vector<double> v;
      est.evaluate(counts, v);
      const double kp = v[static_cast<std::size_t>(ki)];
      const double sep = est.delta_method_se(counts)[static_cast<std::size_t>(ki)];
      const std::size_t o = static_cast<std::size_t>(c);
      // Undefined pooled estimate or SE: no rejection (the analysis reports no test).
      if (std::isfinite(kp) && std::isfinite(sep)) reject[0 * kCampaigns + o] = lg_z_test(kp, sep, 1.0).p_value < alpha;
      const double kl = k.estimate(counts);
      const double sel = linear_statistic(k).std_errors ? [&] {
        std::vector<double> s(1);
        linear_statistic(k).std_errors(counts, s);
        return s[0];
      }() : 0.0;
      reject[1 * kCampaigns + o] = lg_z_test(kl, sel, 1.0).p_value < alpha;
      reject[2 * kCampaigns + o] = lg_hoeffding_test(counts, k, 1.0).p_value < alpha;
      reject[3 * kCampaigns + o] = lg_empirical_bernstein_test(counts, k, 1.0).p_value < alpha;
      ParametricBootstrapOptions po;
      po.replicates = 999;
      po.seed = derive_seed(kSeed ^ 0x9b, si * 1000000 + static_cast<std::uint64_t>(c));
      po.threads = 1;
      reject[4 * kCampaigns + o] = lg_parametric_bootstrap_test(counts, k, 1.0, po).p_value <= alpha;
    }
    md << "| " << sc.name << " |";
    for (int m = 0; m < 5; ++m) {
      long r = 0;
      for (long c = 0; c < kCampaigns; ++c) r += reject[static_cast<std::size_t>(m) * kCampaigns + static_cast<std::size_t>(c)];
      const double rate = static_cast<double>(r) / kCampaigns;
      csv << '"' << sc.name << "\"," << sc.shots << ',' << names[m] << ',' << rate << ',' << kCampaigns << '\n';
      md << ' ' << rate << " |";
      WARN(sc.name << " " << names[m] << ": type-I rate " << rate);
      INFO("scenario " << sc.name << ", test " << names[m]);
      CHECK(rate <= alpha + band);
    }
    md << '\n';
  }
  std::ofstream(out_path("validity_rates.md"), std::ios::app) << md.str();
}
