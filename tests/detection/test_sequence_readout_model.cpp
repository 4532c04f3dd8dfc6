// Sequence readout model and the corrected analysis (lib/detection/sequence_readout_model.hpp,
// readout_corrected_analysis.hpp; derivation in docs/readout_correction.md):
//   - algebra: columns sum to 1, the map agrees with the simulation's own forward recursion
//     (design/campaign_simulation.hpp, written independently), and forward-then-inverse returns
//     the exact model probabilities to 1e-12 for 2- and 3-time destructive and non-destructive
//     sequences;
//   - unbiasedness: campaigns simulated by the library (per shot, destructive readout, detection
//     errors, fixed seeds) at error rates 1e-3 and 1e-2, symmetric and asymmetric: the mean
//     corrected K equals the exact model K within 3.5 Monte Carlo standard errors while the raw K
//     at 1e-2 is off by more than 6 (a single-shot error of order 1e-3 for fluorescence detection
//     of trapped ions is common practice, no source);
//   - the rates' uncertainty widens the intervals (monotone), and [long] the coverage of the
//     corrected interval when the rates come from a small simulated calibration.
#include <catch2/catch.hpp>

#include <cmath>
#include <fstream>
#include <sstream>

#include <nlohmann/json.hpp>

#include "core/error.hpp"
#include "design/campaign_simulation.hpp"
#include "design/model_cells.hpp"
#include "design/simulation_variates.hpp"
#include "detection/readout_corrected_analysis.hpp"
#include "detection/readout_correction.hpp"
#include "detection/sequence_readout_model.hpp"
#include "protocol/protocol_reader.hpp"
#include "stats/estimator.hpp"
#include "stats/linear_functional.hpp"
#include "stats/random_variates.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

nlohmann::json lg3_json() {
  std::ifstream in(std::string(MACROREAL_SOURCE_DIR) + "/protocols/lg3_thermal.json");
  std::stringstream s;
  s << in.rdbuf();
  return nlohmann::json::parse(s.str());
}

// lg3_thermal with two three-step sequences added, in the given readout.
Protocol test_protocol(const std::string& readout, bool three_steps) {
  nlohmann::json j = lg3_json();
  j["readout"] = readout;
  if (three_steps) {
    j["sequences"].push_back({{"name", "ABC++"}, {"steps", {"A", "B", "C"}}, {"dark_is", {"+", "+", "+"}}});
    j["sequences"].push_back({{"name", "ABC-+"}, {"steps", {"A", "B", "C"}}, {"dark_is", {"-", "+", "-"}}});
  }
  return parse_protocol(j, "lg3_thermal.json (test variant)");
}

// Cell index of each recorded pattern of a simulated sequence.
std::vector<int> cells_of_patterns(const SequenceCounts& layout, const std::vector<ReadPattern>& patterns) {
  std::vector<int> cell;
  for (const auto& p : patterns) {
    OutcomeString o;
    for (int k = 0; k < p.length; ++k) {
      const bool bright = (p.bright_mask >> k) & 1u;
      o.push_back(bright ? -layout.dark_is[static_cast<std::size_t>(k)] : layout.dark_is[static_cast<std::size_t>(k)]);
    }
    cell.push_back(layout.cell_index(o));
  }
  return cell;
}

// Accumulates simulated shots into the model layout's cell counts; in photon-count mode each
// recorded count is thresholded here (count <= threshold reads dark).
class CountingSink : public ShotSink {
 public:
  explicit CountingSink(const SimulationPlan& plan) : counts(plan.model.layout), plan_(plan) {
    for (std::size_t s = 0; s < plan.sequences.size(); ++s)
      cell_of.push_back(cells_of_patterns(counts.sequences[s], plan.sequences[s].patterns));
  }
  void shot(const SimulatedShot& x) override {
    int cell = -1;
    if (x.pattern >= 0) {
      cell = cell_of[x.sequence][static_cast<std::size_t>(x.pattern)];
    } else {
      const SequenceCounts& seq = counts.sequences[x.sequence];
      OutcomeString o;
      for (int k = 0; k < x.length; ++k) {
        const bool bright = static_cast<double>(x.counts[static_cast<std::size_t>(k)]) > plan_.counts->threshold;
        o.push_back(bright ? -seq.dark_is[static_cast<std::size_t>(k)] : seq.dark_is[static_cast<std::size_t>(k)]);
      }
      cell = seq.cell_index(o);
    }
    counts.sequences[x.sequence].counts[static_cast<std::size_t>(cell)] += 1.0;
  }
  CampaignCounts counts;
  std::vector<std::vector<int>> cell_of;

 private:
  const SimulationPlan& plan_;
};

// Poisson means that give the wanted error rates at threshold 1 (count <= 1 reads dark):
// P(X > 1 | dark mean) = e1, P(X <= 1 | bright mean) = e2, by bisection on poisson_cdf.
PhotonCountModel count_model_for(const MisassignmentRates& e) {
  auto solve = [](auto f, double lo, double hi) {
    for (int i = 0; i < 200; ++i) {
      const double mid = 0.5 * (lo + hi);
      (f(mid) > 0 ? hi : lo) = mid;
    }
    return 0.5 * (lo + hi);
  };
  PhotonCountModel m;
  m.threshold = 1;
  m.dark_rate = solve([&](double l) { return (1 - poisson_cdf(1, l)) - e.dark_read_bright; }, 0.0, 5.0);
  m.bright_rate = solve([&](double l) { return e.bright_read_dark - poisson_cdf(1, l); }, 1.0, 60.0);
  return m;
}

double k_of(const ModelCells& m) {
  for (const auto& t : m.prediction.tests)
    if (t.lg) return t.lg->K;
  FAIL("no LG test in the prediction");
  return 0;
}

struct BiasStudy {
  double exact = 0, mean_raw = 0, mean_corrected = 0, mean_corrected_linear = 0;
  double se_corrected = 0, se_corrected_linear = 0, se_raw = 0;
};

// R campaigns of `shots` per sequence simulated by the library in photon-count mode (per shot
// and step: the true result, a Poisson count, the threshold, a ruined state after a misread
// bright: an implementation of the readout independent of readout_map); pooled K raw and
// corrected, and the non-pooled (linear, exactly unbiased) K corrected. `target` is met up to
// the bisection; the rates in force are the Poisson tails the plan reports.
BiasStudy bias_study(const MisassignmentRates& target, long shots, int campaigns, std::uint64_t seed) {
  const Protocol p = test_protocol("destructive", false);
  SimulationOptions so;
  so.shots_per_sequence = shots;
  so.counts = count_model_for(target);
  SimulationPlan plan = plan_simulation(p, so);
  const MisassignmentRates rates{plan.errors.dark_read_bright, plan.errors.bright_read_dark};
  CHECK_CLOSE(rates.dark_read_bright, target.dark_read_bright, 0, 1e-6);
  CHECK_CLOSE(rates.bright_read_dark, target.bright_read_dark, 0, 1e-6);
  const CampaignEstimator est(p, plan.model.layout);
  const int ki = est.index_of("K[ABC]");
  REQUIRE(ki >= 0);
  const LinearFunctional lin = lg_functional(plan.model.layout, {"A", "B", "C"});
  BiasStudy b;
  b.exact = k_of(plan.model);
  double s_raw = 0, s2_raw = 0, s_c = 0, s2_c = 0, s_l = 0, s2_l = 0;
  std::vector<double> out;
  for (int r = 0; r < campaigns; ++r) {
    plan.seed = derive_seed(seed, static_cast<std::uint64_t>(r));
    CountingSink sink(plan);
    simulate_campaign(plan, sink);
    const CellCounts observed = CampaignEstimator::counts_of(sink.counts);
    est.evaluate(observed, out);
    const double raw = out[static_cast<std::size_t>(ki)];
    const CellCounts corrected = corrected_counts(sink.counts, observed, rates);
    est.evaluate(corrected, out);
    const double cor = out[static_cast<std::size_t>(ki)];
    const double linear = lin.estimate(corrected);
    s_raw += raw, s2_raw += raw * raw, s_c += cor, s2_c += cor * cor, s_l += linear, s2_l += linear * linear;
  }
  const double R = campaigns;
  auto se = [R](double s, double s2) { return std::sqrt((s2 - s * s / R) / (R - 1) / R); };
  b.mean_raw = s_raw / R, b.mean_corrected = s_c / R, b.mean_corrected_linear = s_l / R;
  b.se_raw = se(s_raw, s2_raw), b.se_corrected = se(s_c, s2_c), b.se_corrected_linear = se(s_l, s2_l);
  return b;
}

void check_unbiased(const MisassignmentRates& rates, long shots, int campaigns, std::uint64_t seed) {
  const BiasStudy b = bias_study(rates, shots, campaigns, seed);
  INFO("e1 " << rates.dark_read_bright << " e2 " << rates.bright_read_dark << ", R = " << campaigns << " campaigns of "
             << shots << " shots per sequence: exact K " << b.exact << ", mean raw " << b.mean_raw << " (SE "
             << b.se_raw << "), mean corrected " << b.mean_corrected << " (SE " << b.se_corrected
             << "), mean corrected non-pooled " << b.mean_corrected_linear << " (SE " << b.se_corrected_linear << ")");
  // Tolerance: 3.5 Monte Carlo standard errors of the mean over R campaigns (SE = sample sd / sqrt(R)).
  CHECK(std::fabs(b.mean_corrected - b.exact) < 3.5 * b.se_corrected);
  CHECK(std::fabs(b.mean_corrected_linear - b.exact) < 3.5 * b.se_corrected_linear);
  // The correction matters: at 1e-2 the raw K is off by more than 6 of its Monte Carlo SEs.
  if (std::max(rates.dark_read_bright, rates.bright_read_dark) >= 1e-2)
    CHECK(std::fabs(b.mean_raw - b.exact) > 6.0 * b.se_raw);
}

}  // namespace

TEST_CASE("readout map: columns sum to 1 and match the simulation's forward recursion", "[detection]") {
  for (const char* readout : {"destructive", "nondestructive"})
    for (bool three : {false, true}) {
      const Protocol p = test_protocol(readout, three);
      const ModelCells m = model_cells(p);
      for (const MisassignmentRates rates : {MisassignmentRates{1e-2, 3e-2}, MisassignmentRates{0.2, 0.05}}) {
        for (std::size_t s = 0; s < m.layout.sequences.size(); ++s) {
          const SequenceCounts& seq = m.layout.sequences[s];
          const Eigen::MatrixXd M = readout_map(seq, m.layout.readout, rates);
          for (Eigen::Index j = 0; j < M.cols(); ++j) CHECK_CLOSE(M.col(j).sum(), 1.0, 1e-14, 0);
          // Independent implementation: the simulation's two-state (intact / ruined) recursion
          // with fair coins after a misread bright.
          std::vector<ReadPattern> patterns;
          const std::vector<double> sim = recorded_pattern_probabilities(
              seq, m.probabilities[s], m.layout.readout, {rates.dark_read_bright, rates.bright_read_dark}, &patterns);
          const std::vector<int> cell = cells_of_patterns(seq, patterns);
          const std::vector<double> ours = recorded_from_true(seq, m.layout.readout, m.probabilities[s], rates);
          REQUIRE(sim.size() == ours.size());
          for (std::size_t i = 0; i < sim.size(); ++i) {
            INFO(readout << " " << seq.name << " pattern " << i);
            REQUIRE(cell[i] >= 0);
            CHECK_CLOSE(ours[static_cast<std::size_t>(cell[i])], sim[i], 1e-15, 1e-12);
          }
        }
      }
    }
}

TEST_CASE("readout map: forward then inverse returns the exact model probabilities", "[detection]") {
  for (const char* readout : {"destructive", "nondestructive"})
    for (bool three : {false, true}) {
      const Protocol p = test_protocol(readout, three);
      const ModelCells m = model_cells(p);
      bool saw_three = false;
      for (const MisassignmentRates rates :
           {MisassignmentRates{1e-3, 1e-3}, MisassignmentRates{1e-2, 2.5e-3}, MisassignmentRates{0.1, 0.3}})
        for (const double r : {0.5, 0.0, 0.8})
          for (std::size_t s = 0; s < m.layout.sequences.size(); ++s) {
            const SequenceCounts& seq = m.layout.sequences[s];
            saw_three = saw_three || seq.steps.size() == 3;
            const auto q = recorded_from_true(seq, m.layout.readout, m.probabilities[s], rates, {r});
            const auto back = true_from_recorded(seq, m.layout.readout, q, rates, {r});
            for (std::size_t j = 0; j < back.size(); ++j) {
              INFO(readout << " " << seq.name << " cell " << j << " r " << r);
              CHECK_CLOSE(back[j], m.probabilities[s][j], 1e-12, 0);
            }
          }
      CHECK(saw_three == three);
    }
}

TEST_CASE("readout map: a one-step sequence is the final-step confusion-matrix inversion", "[detection]") {
  // The one-step case must reduce to readout_correction.hpp's (P_obs - e2) / (1 - e1 - e2).
  const Protocol p = test_protocol("destructive", false);
  const ModelCells m = model_cells(p);
  const SequenceCounts* b = m.layout.find("B");
  REQUIRE(b != nullptr);
  const int dark = b->cell_index(OutcomeString{b->dark_is[0]});
  REQUIRE(dark >= 0);
  for (const MisassignmentRates rates : {MisassignmentRates{1e-3, 4e-3}, MisassignmentRates{0.05, 0.2}}) {
    const std::vector<double> observed = {0.37, 0.63};
    const auto back = true_from_recorded(*b, Readout::destructive, observed, rates);
    CHECK_CLOSE(back[static_cast<std::size_t>(dark)],
                corrected_dark_probability(observed[static_cast<std::size_t>(dark)], rates.dark_read_bright,
                                           rates.bright_read_dark),
                1e-14, 0);
  }
}

TEST_CASE("readout map: bad rates and continuations are refused with the rule", "[detection]") {
  const Protocol p = test_protocol("destructive", false);
  const ModelCells m = model_cells(p);
  CHECK_THROWS_WITH(readout_map(m.layout.sequences[0], Readout::destructive, {0.6, 0.5}),
                    Catch::Contains("must be below 1"));
  CHECK_THROWS_WITH(readout_map(m.layout.sequences[0], Readout::destructive, {-0.1, 0.0}),
                    Catch::Contains("dark_read_bright = -0.1"));
  CHECK(parse_misread_continuation("fair").dark_probability == 0.5);
  CHECK(parse_misread_continuation("dark=0.25").dark_probability == 0.25);
  CHECK(to_string(MisreadContinuation{0.25}) == "dark=0.25");
  CHECK_THROWS_WITH(parse_misread_continuation("dark=1.5"), Catch::Contains("'dark=1.5'"));
  CHECK_THROWS_WITH(parse_misread_continuation("coin"), Catch::Contains("must be 'fair' or 'dark=P'"));
}

TEST_CASE("readout correction: corrected K unbiased on simulated destructive campaigns (light)", "[detection]") {
  // R = 150 campaigns of 2000 shots per sequence (7 sequences) per scenario: Monte Carlo SE of
  // the mean K about 0.002.
  check_unbiased({1e-2, 1e-2}, 2000, 150, 501);
  check_unbiased({2.5e-3, 1e-2}, 2000, 150, 502);
  check_unbiased({1e-3, 1e-3}, 2000, 150, 503);
}

TEST_CASE("readout correction: corrected K unbiased on simulated destructive campaigns (heavy)", "[detection][long]") {
  // R = 2000 campaigns of 5000 shots per sequence per scenario: Monte Carlo SE of the mean K
  // about 5e-4, so the raw bias at 1e-3 (about 0.0045) shows too (it is not asserted).
  check_unbiased({1e-2, 1e-2}, 5000, 2000, 601);
  check_unbiased({2.5e-3, 1e-2}, 5000, 2000, 602);
  check_unbiased({1e-3, 1e-3}, 5000, 2000, 603);
  check_unbiased({2.5e-4, 1e-3}, 5000, 2000, 604);
}

TEST_CASE("readout correction: the rates' uncertainty widens the intervals", "[detection]") {
  const Protocol p = test_protocol("destructive", false);
  SimulationOptions so;
  so.shots_per_sequence = 20000;
  so.errors = {1e-2, 1e-2};
  so.seed = 77;
  const SimulationPlan plan = plan_simulation(p, so);
  CountingSink sink(plan);
  simulate_campaign(plan, sink);
  std::vector<double> widths, ses;
  for (const double se : {0.0, 3e-3, 6e-3}) {
    ReadoutCorrectionOptions o;
    o.rates.point = {1e-2, 1e-2};
    o.rates.dark_read_bright_se = o.rates.bright_read_dark_se = se;
    o.replicates = 1000;
    o.seed = 9;
    const ReadoutCorrectedAnalysis a = readout_corrected_analysis(p, sink.counts, o);
    const CorrectedEstimate* k = nullptr;
    for (const auto& e : a.estimates)
      if (e.name == "K[ABC]") k = &e;
    REQUIRE(k != nullptr);
    REQUIRE(k->ci.valid);
    REQUIRE(k->ci_rates_fixed.valid);
    INFO("se " << se << ": K " << k->estimate << " ci [" << k->ci.lo << ", " << k->ci.hi << "], rates fixed ["
               << k->ci_rates_fixed.lo << ", " << k->ci_rates_fixed.hi << "], se " << k->std_error << " (shots "
               << k->std_error_shots << ")");
    if (se == 0.0) {
      CHECK(k->ci.lo == k->ci_rates_fixed.lo);  // exact rates: the same interval
      CHECK(k->std_error == Approx(k->std_error_shots).epsilon(1e-9));
    } else {
      CHECK(k->std_error > k->std_error_shots);
    }
    widths.push_back(k->ci.hi - k->ci.lo);
    ses.push_back(k->std_error);
  }
  // Shot SE of K is about 0.0115 here; a rate se of 3e-3 (6e-3) on both rates adds about 0.0085
  // (0.017) in quadrature (delta method), so the width should grow by about 24 % (41 %), well
  // above the bootstrap noise of an interval width at B = 1000 (a few per cent).
  CHECK(ses[1] > ses[0]);
  CHECK(ses[2] > ses[1]);
  CHECK(widths[1] > 1.1 * widths[0]);
  CHECK(widths[2] > 1.2 * widths[1]);
  // The delta-method SE with the rates matches the interval width roughly (normal reading).
  CHECK_CLOSE(widths[2] / (2 * 1.959964 * ses[2]), 1.0, 0.15, 0);
}

TEST_CASE("readout correction: interval coverage with rates from a small calibration", "[detection][long]") {
  // 500 campaigns, 20000 shots per sequence, true rates 1e-2 / 1e-2; each campaign's rates come
  // from its own simulated calibration of 1000 dark and 1000 bright reference shots (binomial
  // estimate, se = sqrt(e (1 - e) / 1000) ~ 3e-3), so their error matters next to the shots'.
  // Nominal 95 %; Monte Carlo band 3 sqrt(0.95 0.05 / 500) = +-2.9 %.
  const Protocol p = test_protocol("destructive", false);
  SimulationOptions so;
  so.shots_per_sequence = 20000;
  so.errors = {1e-2, 1e-2};
  SimulationPlan plan = plan_simulation(p, so);
  const double exact = k_of(plan.model);
  const int campaigns = 500;
  const long cal = 1000;
  int covered = 0, covered_fixed = 0;
  RandomEngine g(derive_seed(4242, 0));
  for (int r = 0; r < campaigns; ++r) {
    plan.seed = derive_seed(4242, 1 + static_cast<std::uint64_t>(r));
    CountingSink sink(plan);
    simulate_campaign(plan, sink);
    ReadoutCorrectionOptions o;
    const double e1 = static_cast<double>(binomial(g, cal, 1e-2)) / cal;
    const double e2 = static_cast<double>(binomial(g, cal, 1e-2)) / cal;
    o.rates.point = {e1, e2};
    o.rates.dark_read_bright_se = std::sqrt(e1 * (1 - e1) / cal);
    o.rates.bright_read_dark_se = std::sqrt(e2 * (1 - e2) / cal);
    o.replicates = 999;
    o.seed = static_cast<std::uint64_t>(r);
    const ReadoutCorrectedAnalysis a = readout_corrected_analysis(p, sink.counts, o);
    for (const auto& e : a.estimates)
      if (e.name == "K[ABC]") {
        covered += e.ci.valid && e.ci.lo <= exact && exact <= e.ci.hi;
        covered_fixed += e.ci_rates_fixed.valid && e.ci_rates_fixed.lo <= exact && exact <= e.ci_rates_fixed.hi;
      }
  }
  const double cov = static_cast<double>(covered) / campaigns, cov_fixed = static_cast<double>(covered_fixed) / campaigns;
  INFO("coverage with the rates redrawn " << cov << ", with the rates fixed " << cov_fixed);
  CHECK(std::fabs(cov - 0.95) < 0.029);
  CHECK(cov_fixed < cov);
}
