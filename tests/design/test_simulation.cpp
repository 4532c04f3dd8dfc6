// Campaign simulation (design/campaign_simulation.hpp): simulated tables read back by the
// statistics core's table reader reproduce the probabilities they were drawn from, within
// multinomial Monte Carlo error; readout errors are recovered; same seed => same bytes; a
// drift is seen by the drift check.
//
// Tolerance used throughout: every cell count n of N shots with probability p must lie within
// 4.5 standard deviations sqrt(N p (1 - p)) of N p (the binomial marginal of a multinomial,
// Agresti, Categorical Data Analysis (2013), section 1.2). With the ~40 cells checked per
// case the chance of a false failure is below 40 * 6.8e-6 = 3e-4, and the seeds are fixed.
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include "core/error.hpp"
#include "design/campaign_simulation.hpp"
#include "design/simulated_table_writer.hpp"
#include "protocol/protocol_reader.hpp"
#include "stats/drift_check.hpp"
#include "stats/outcome_table_reader.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

constexpr double kSigmas = 4.5;

void check_count(double n, double N, double p, const std::string& what) {
  INFO(what << ": " << n << " of " << N << ", p = " << p);
  if (p <= 0.0) {
    CHECK(n == 0.0);
    return;
  }
  const double sd = std::sqrt(N * p * (1.0 - p));
  CHECK(std::fabs(n - N * p) <= kSigmas * sd + 1e-9);
}

Protocol lg3() {
  return read_protocol(std::string(MACROREAL_SOURCE_DIR) + "/protocols/lg3_thermal.json");
}

// Three zero-displacement measurements: K_o = (1 + o e^{i phi} D(0)) / 2 at phi = 0 gives +1
// with certainty and leaves the state alone (DESIGN.md section 2: P(o) = (1 + o Re chi(0))/2,
// chi(0) = 1). With dark_is "+" every true result is dark, with "-" every one is bright.
Protocol certain_outcomes(double e_db, double e_bd, const std::string& readout = "destructive") {
  const std::string text = R"({
    "format": "macroreal-protocol/1",
    "state": {"kind": "thermal", "nbar": 0.5},
    "readout": ")" + readout + R"(",
    "measurements": {
      "P": {"beta": [0.0, 0.0], "phase_deg": 0.0, "time_s": 0.0},
      "Q": {"beta": [0.0, 0.0], "phase_deg": 0.0, "time_s": 1e-6},
      "R": {"beta": [0.0, 0.0], "phase_deg": 0.0, "time_s": 2e-6}},
    "detection": {"dark_read_bright": )" + std::to_string(e_db) +
                           R"(, "bright_read_dark": )" + std::to_string(e_bd) + R"(},
    "sequences": [
      {"name": "dark3", "steps": ["P", "Q", "R"], "dark_is": ["+", "+", "+"]},
      {"name": "bright3", "steps": ["P", "Q", "R"], "dark_is": ["-", "-", "-"]}]
  })";
  return parse_protocol_text(text, "certain.json");
}

SimulationOptions options_for(const Protocol& p, long shots, std::uint64_t seed) {
  SimulationOptions o;
  o.seed = seed;
  o.shots_per_sequence = shots;
  o.errors = {p.detection.dark_read_bright, p.detection.bright_read_dark};
  return o;
}

// The recorded string of a cell of the reader's layout, as a ReadPattern (the reader stores
// dark/bright readings as the signs they stand for, dark = dark_is).
ReadPattern pattern_of(const SequenceCounts& seq, const OutcomeString& o) {
  ReadPattern r;
  r.length = static_cast<int>(o.size());
  for (std::size_t k = 0; k < o.size(); ++k)
    if (o[k] != seq.dark_is[k]) r.bright_mask |= 1u << k;
  return r;
}

}  // namespace

TEST_CASE("simulated table read back by the table reader reproduces the model's cells",
          "[design][simulation]") {
  const Protocol protocol = lg3();
  SimulationOptions o = options_for(protocol, 20000, 20261202);
  o.errors = {};  // no detection errors: the recorded cells are the model's cells
  const SimulationPlan plan = plan_simulation(protocol, o);
  const std::string text = simulated_table_text(plan, {"test table"});
  const OutcomeTableRead read = parse_outcome_table(text, "sim.csv", protocol);
  CHECK(read.counts.rows.read == static_cast<long>(plan.total_shots));
  CHECK(read.counts.rows.rejected == 0);
  REQUIRE(read.counts.sequences.size() == plan.model.layout.sequences.size());
  double chi2 = 0.0;
  int df = 0;
  for (std::size_t s = 0; s < read.counts.sequences.size(); ++s) {
    const SequenceCounts& seq = read.counts.sequences[s];
    const double N = seq.total();
    CHECK(N == 20000.0);
    for (std::size_t j = 0; j < seq.cells.size(); ++j) {
      const double p = plan.model.probabilities[s][j];
      check_count(seq.counts[j], N, p, seq.name + " " + to_string(seq.cells[j]));
      if (p > 0) chi2 += std::pow(seq.counts[j] - N * p, 2) / (N * p);
    }
    df += static_cast<int>(seq.cells.size()) - 1;
  }
  // Pearson's statistic over all sequences, df = sum (J - 1) (Agresti 2013, section 1.5):
  // mean df, sd sqrt(2 df); 4.5 sd above the mean is a p-value far below 1e-4.
  INFO("chi2 = " << chi2 << ", df = " << df);
  CHECK(chi2 <= df + kSigmas * std::sqrt(2.0 * df));

  // One probability straight from DESIGN.md section 2 instead of the engine: B alone,
  // thermal nbar 0.3, heating 20 quanta/s for 100 us: P(+) = (1 + cos(phi) chi) / 2 with
  // chi = exp(-(nbar + 1/2 + ndot t) |beta|^2), |beta| = 2.4, phi = 15 deg.
  const double chi = std::exp(-(0.3 + 0.5 + 20.0 * 100e-6) * 2.4 * 2.4);
  const double p_plus = 0.5 * (1.0 + std::cos(15.0 * M_PI / 180.0) * chi);
  const SequenceCounts* b = read.counts.find("B");
  REQUIRE(b);
  check_count(b->counts[static_cast<std::size_t>(b->cell_index({+1}))], b->total(), p_plus,
              "B + (closed form)");
}

TEST_CASE("readout errors are recovered and the ruined-state rule holds", "[design][simulation]") {
  const double e1 = 0.02, e2 = 0.05;  // dark_read_bright, bright_read_dark
  const Protocol protocol = certain_outcomes(e1, e2);
  const long N = 200000;
  const SimulationPlan plan = plan_simulation(protocol, options_for(protocol, N, 99));
  const std::string text = simulated_table_text(plan, {});
  const OutcomeTableRead read = parse_outcome_table(text, "errors.csv", protocol);
  // Hand formulas for the recorded strings (the model of the header comment of
  // campaign_simulation.hpp, written out here independently):
  // all true dark: the first misread ends the shot, geometric in e1;
  // all true bright: read bright at once (1 - e2), or misread dark (e2) and go on with fair
  // coins: each later step reads dark with h = (1 - e1)/2 + e2/2.
  const double h = 0.5 * (1.0 - e1) + 0.5 * e2;
  struct Expect {
    const char* seq;
    ReadPattern r;
    double p;
  };
  const std::vector<Expect> expect = {
      {"dark3", {1, 0b1}, e1},
      {"dark3", {2, 0b10}, (1 - e1) * e1},
      {"dark3", {3, 0b100}, (1 - e1) * (1 - e1) * e1},
      {"dark3", {3, 0}, std::pow(1 - e1, 3)},
      {"bright3", {1, 0b1}, 1 - e2},
      {"bright3", {2, 0b10}, e2 * (1 - h)},
      {"bright3", {3, 0b100}, e2 * h * (1 - h)},
      {"bright3", {3, 0}, e2 * h * h},
  };
  for (const auto& e : expect) {
    const SequenceCounts* seq = read.counts.find(e.seq);
    REQUIRE(seq);
    double n = -1;
    for (std::size_t j = 0; j < seq->cells.size(); ++j) {
      const ReadPattern r = pattern_of(*seq, seq->cells[j]);
      if (r.length == e.r.length && r.bright_mask == e.r.bright_mask) n = seq->counts[j];
    }
    REQUIRE(n >= 0);
    check_count(n, static_cast<double>(N), e.p, std::string(e.seq) + " pattern");
  }
  // The error rates as a user would estimate them from the first step.
  const SequenceCounts* dark = read.counts.find("dark3");
  const SequenceCounts* bright = read.counts.find("bright3");
  const double e1_hat = dark->counts[static_cast<std::size_t>(dark->cell_index({-1}))] / N;
  const double e2_hat = 1.0 - bright->counts[static_cast<std::size_t>(bright->cell_index({+1}))] / N;
  CHECK_CLOSE(e1_hat, e1, kSigmas * std::sqrt(e1 * (1 - e1) / N), 0.0);
  CHECK_CLOSE(e2_hat, e2, kSigmas * std::sqrt(e2 * (1 - e2) / N), 0.0);
}

TEST_CASE("non-destructive readout flips each step's reading independently",
          "[design][simulation]") {
  std::string text = R"({
    "format": "macroreal-protocol/1",
    "state": {"kind": "thermal", "nbar": 0.1},
    "readout": "nondestructive",
    "measurements": {
      "A": {"beta": [1.0, 0.0], "phase_deg": 0.0, "time_s": 0.0},
      "B": {"beta_polar": [1.0, 60.0], "phase_deg": 30.0, "time_s": 1e-4},
      "C": {"beta_polar": [1.0, 120.0], "phase_deg": 0.0, "time_s": 2e-4}},
    "detection": {"dark_read_bright": 0.03, "bright_read_dark": 0.08},
    "sequences": [{"name": "ABC", "steps": ["A", "B", "C"], "dark_is": ["+", "-", "+"]}]
  })";
  const Protocol protocol = parse_protocol_text(text, "nd.json");
  const long N = 100000;
  const SimulationPlan plan = plan_simulation(protocol, options_for(protocol, N, 5));
  const OutcomeTableRead read =
      parse_outcome_table(simulated_table_text(plan, {}), "nd.csv", protocol);
  const SequenceCounts* seq = read.counts.find("ABC");
  REQUIRE(seq);
  REQUIRE(seq->cells.size() == 8);
  const std::size_t si = 0;
  REQUIRE(plan.model.layout.sequences[si].name == "ABC");
  // Brute force over (true string, reading): P(read r) = sum_t P(t) prod_k P(r_k | t_k).
  const double e1 = 0.03, e2 = 0.08;
  for (std::size_t j = 0; j < seq->cells.size(); ++j) {
    const OutcomeString& read_signs = seq->cells[j];
    double p = 0.0;
    const SequenceCounts& layout = plan.model.layout.sequences[si];
    for (std::size_t t = 0; t < layout.cells.size(); ++t) {
      double w = plan.model.probabilities[si][t];
      for (std::size_t k = 0; k < 3; ++k) {
        const bool true_dark = layout.cells[t][k] == layout.dark_is[k];
        const bool read_dark = read_signs[k] == seq->dark_is[k];
        w *= true_dark ? (read_dark ? 1 - e1 : e1) : (read_dark ? e2 : 1 - e2);
      }
      p += w;
    }
    check_count(seq->counts[j], static_cast<double>(N), p, "ABC " + to_string(read_signs));
  }
}

TEST_CASE("photon counts: Poisson counts read with the threshold give the tail error rates",
          "[design][simulation]") {
  const Protocol protocol = certain_outcomes(0.0, 0.0);
  SimulationOptions o = options_for(protocol, 100000, 31);
  o.counts = PhotonCountModel{0.5, 8.0, 2.0};
  const SimulationPlan plan = plan_simulation(protocol, o);
  OutcomeTableOptions read_options;
  read_options.threshold = 2.0;
  const OutcomeTableRead read =
      parse_outcome_table(simulated_table_text(plan, {}), "counts.csv", protocol, read_options);
  // Poisson tails by direct summation of e^-m m^k / k! (Johnson, Kemp & Kotz, Univariate
  // Discrete Distributions (2005), eq. 4.1).
  auto cdf2 = [](double m) { return std::exp(-m) * (1.0 + m + m * m / 2.0); };
  const double e1 = 1.0 - cdf2(0.5), e2 = cdf2(8.0);
  CHECK_CLOSE(plan.errors.dark_read_bright, e1, 1e-12, 0.0);
  CHECK_CLOSE(plan.errors.bright_read_dark, e2, 1e-12, 0.0);
  const SequenceCounts* dark = read.counts.find("dark3");
  const SequenceCounts* bright = read.counts.find("bright3");
  REQUIRE(dark);
  REQUIRE(bright);
  REQUIRE(dark->cell_index({-1}) >= 0);
  check_count(dark->counts[static_cast<std::size_t>(dark->cell_index({-1}))], 1e5, e1,
              "dark3 first reading bright");
  // bright3 (dark is "-"): a first reading bright ends the shot as the one-step string "+".
  REQUIRE(bright->cell_index({+1}) >= 0);
  check_count(1e5 - bright->counts[static_cast<std::size_t>(bright->cell_index({+1}))], 1e5, e2,
              "bright3 first reading dark");
}

TEST_CASE("same seed gives the same bytes, the header records seed, checksum, assumptions",
          "[design][simulation]") {
  const Protocol protocol = lg3();
  SimulationOptions o = options_for(protocol, 3000, 7);
  o.step_time_s = 2e-4;
  const SimulationPlan plan = plan_simulation(protocol, o);
  SimulatedTableContext ctx;
  ctx.command = "macroreal simulate protocols/lg3_thermal.json --shots 3000 --seed 7";
  ctx.protocol_label = "protocols/lg3_thermal.json";
  ctx.protocol_checksum = fnv1a64("abc");
  const auto comments = simulated_table_comments(plan, ctx);
  const std::string a = simulated_table_text(plan, comments);
  const std::string b = simulated_table_text(plan_simulation(protocol, o), comments);
  CHECK(a == b);
  o.seed = 8;
  CHECK(simulated_table_text(plan_simulation(protocol, o), comments) != a);
  // The FILE* writer with a small buffer gives the same bytes as the in-memory one.
  std::FILE* f = std::tmpfile();
  REQUIRE(f);
  {
    SimulatedTableWriter w(f, "tmp", plan, comments, 4096);
    simulate_campaign(plan, w);
  }
  std::rewind(f);
  std::string from_file;
  char buf[65536];
  for (std::size_t got; (got = std::fread(buf, 1, sizeof buf, f)) > 0;) from_file.append(buf, got);
  std::fclose(f);
  CHECK(from_file == a);
  // FNV-1a 64 of "a" (Fowler-Noll-Vo reference test vectors: 0xaf63dc4c8601ec8c).
  CHECK(fnv1a64("a") == 0xaf63dc4c8601ec8cULL);
  CHECK(a.find("# seed: 7 ") != std::string::npos);
  CHECK(a.find("# command: macroreal simulate") != std::string::npos);
  CHECK(a.find("FNV-1a 64 of its bytes: ") != std::string::npos);
  CHECK(a.find("fair coin") != std::string::npos);
  CHECK(a.find("\nsequence,shot,time_s,r1,r2\n") != std::string::npos);
}

TEST_CASE("schedule: sequences interleaved evenly, times from cycle and step time",
          "[design][simulation]") {
  const Protocol protocol = lg3();
  SimulationOptions o = options_for(protocol, 0, 1);
  o.allocation = {{"B", 2}, {"AB+", 4}};
  o.allocation_only = true;
  o.cycle_time_s = 1e-3;
  o.step_time_s = 2.5e-4;
  const SimulationPlan plan = plan_simulation(protocol, o);
  const std::string text = simulated_table_text(plan, {});
  std::vector<std::string> rows;
  std::size_t pos = text.find("sequence,shot,time_s");
  pos = text.find('\n', pos) + 1;
  while (pos < text.size()) {
    const std::size_t e = text.find('\n', pos);
    const std::string line = text.substr(pos, e - pos);
    rows.push_back(line.substr(0, line.find(',', line.find(',', line.find(',') + 1) + 1)));
    pos = e + 1;
  }
  // By hand: AB+ shots at fractions 1/8, 3/8, 5/8, 7/8; B at 1/4, 3/4; durations
  // 1 ms + 2 x 0.25 ms = 1.5 ms (AB+) and 1.25 ms (B).
  const std::vector<std::string> expect = {"AB+,0,0.000", "B,0,0.0015",    "AB+,1,0.00275",
                                           "AB+,2,0.00425", "B,1,0.00575", "AB+,3,0.007"};
  CHECK(rows == expect);
  CHECK(plan.total_ns == 8500000u);
}

TEST_CASE("a linear drift of the heating rate is seen by the drift check", "[design][simulation]") {
  // Symmetric split, |beta| = 1, thermal nbar 0.1, B at 100 us: P(+) = (1 + chi)/2 with
  // chi = exp(-(0.6 + ndot 1e-4)): 0.774 at ndot = 0, 0.667 at ndot = 5000 (DESIGN.md section 2).
  const std::string text = R"({
    "format": "macroreal-protocol/1",
    "state": {"kind": "thermal", "nbar": 0.1},
    "readout": "destructive",
    "measurements": {"B": {"beta": [1.0, 0.0], "phase_deg": 0.0, "time_s": 1e-4}},
    "noise": {"heating_quanta_per_s": 0.0},
    "sequences": [{"name": "B", "steps": ["B"], "dark_is": ["+"]}]
  })";
  const Protocol protocol = parse_protocol_text(text, "drift.json");
  SimulationOptions o = options_for(protocol, 20000, 12);
  const auto drift_p = [&](const SimulationOptions& opt) {
    const SimulationPlan plan = plan_simulation(protocol, opt);
    const std::string table = simulated_table_text(plan, {});
    const OutcomeTableRead first = parse_outcome_table(table, "d.csv", protocol);
    return drift_check_text(table, "d.csv", protocol, {}, first);
  };
  const DriftCheck stationary = drift_p(o);
  o.drift = NoiseDrift{"heating_quanta_per_s", 0.0, 5000.0};
  o.drift_blocks = 10;
  const SimulationPlan plan = plan_simulation(protocol, o);
  REQUIRE(plan.blocks.size() == 10);
  CHECK_CLOSE(plan.blocks[0].value, 250.0, 1e-9, 0.0);   // midpoint of the first tenth
  CHECK_CLOSE(plan.blocks[9].value, 4750.0, 1e-9, 0.0);
  // Closed form at the first block's midpoint value.
  CHECK_CLOSE(plan.blocks[0].tables[0].pattern_probability[1],
              0.5 * (1.0 + std::exp(-(0.1 + 0.5 + 250.0 * 1e-4))), 1e-12, 0.0);
  const DriftCheck drifting = drift_p(o);
  REQUIRE(stationary.checked);
  REQUIRE(drifting.checked);
  // Half means of P(+): 0.742 (ndot 1250) and 0.689 (ndot 3750), 10000 shots each: a
  // difference of 0.053 with sd 0.0063, z about 8 (p about 1e-16). The
  // stationary table must not be flagged at 1e-3 (fixed seed).
  INFO("p stationary " << stationary.p_value << ", p drifting " << drifting.p_value);
  CHECK(stationary.p_value > 1e-3);
  CHECK(drifting.p_value < 1e-6);
}

TEST_CASE("bad simulation options are refused with the option named", "[design][simulation]") {
  const Protocol protocol = lg3();
  SimulationOptions o = options_for(protocol, -1, 1);
  CHECK_THROWS_WITH(plan_simulation(protocol, o), Catch::Contains("shots = -1"));
  o = options_for(protocol, 10, 1);
  o.allocation = {{"XYZ", 3}};
  CHECK_THROWS_WITH(plan_simulation(protocol, o), Catch::Contains("unknown sequence 'XYZ'"));
  o = options_for(protocol, 10, 1);
  o.errors.bright_read_dark = 1.5;
  CHECK_THROWS_WITH(plan_simulation(protocol, o), Catch::Contains("bright_read_dark = 1.5"));
  o = options_for(protocol, 10, 1);
  o.cycle_time_s = 0.0;
  CHECK_THROWS_AS(plan_simulation(protocol, o), DomainError);
  o = options_for(protocol, 10, 1);
  o.drift = NoiseDrift{"heating", 1.0, 2.0};
  CHECK_THROWS_WITH(plan_simulation(protocol, o), Catch::Contains("unknown noise parameter 'heating'"));
}
