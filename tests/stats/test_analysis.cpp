// `analyse_campaign` (stats/analysis.hpp) on fixed counts: the JSON of DESIGN.md section 8,
// reproducibility, the LG verdict on campaigns built exactly at K = 1.3 and K = 1, the row
// bookkeeping under the skip policy, and the drift check against Pearson's chi-square.
#include <algorithm>
#include <cmath>
#include <map>
#include <string>

#include <boost/math/distributions/normal.hpp>
#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "protocol/protocol_reader.hpp"
#include "report/analysis_report.hpp"
#include "stats/analysis.hpp"
#include "stats/runs_input.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

// Three-time LG and NSIT A->B under destructive readout, no model (analysis only).
const char* kProtocol = R"({
  "format": "macroreal-protocol/1",
  "title": "analysis test",
  "readout": "destructive",
  "measurements": {
    "A": {"beta": [1.0, 0.0], "time_s": 0.0},
    "B": {"beta": [1.0, 0.0], "time_s": 1e-4},
    "C": {"beta": [1.0, 0.0], "time_s": 2e-4}
  },
  "sequences": [
    {"name": "AB+", "steps": ["A", "B"], "dark_is": ["+", "+"]},
    {"name": "AB-", "steps": ["A", "B"], "dark_is": ["-", "+"]},
    {"name": "BC+", "steps": ["B", "C"], "dark_is": ["+", "+"]},
    {"name": "BC-", "steps": ["B", "C"], "dark_is": ["-", "+"]},
    {"name": "AC+", "steps": ["A", "C"], "dark_is": ["+", "+"]},
    {"name": "AC-", "steps": ["A", "C"], "dark_is": ["-", "+"]},
    {"name": "B",   "steps": ["B"],      "dark_is": ["+"]}
  ],
  "tests": [
    {"kind": "leggett-garg", "order": ["A", "B", "C"]},
    {"kind": "nsit", "from": "A", "to": "B", "margin": 0.05}
  ]
})";

Protocol test_protocol() {
  ProtocolReadOptions o;
  o.generate_needed_sequences = true;
  return parse_protocol_text(kProtocol, "test.json", o);
}

// Counts equal to their expectation for uniform marginals and pair correlators c_ab, c_bc,
// c_ac: P(o_i, o_j) = (1 + o_i o_j C_ij) / 4 (DESIGN.md section 2), n shots per sequence.
// n is chosen so that every count is an integer.
CampaignCounts exact_campaign(const Protocol& p, double c_ab, double c_bc, double c_ac, double n) {
  CampaignCounts c = empty_counts(p);
  for (auto& s : c.sequences) {
    double corr = 0.0;
    if (s.steps.size() == 1) {
      s.counts[static_cast<std::size_t>(s.cell_index({+1}))] = n / 2;
      s.counts[static_cast<std::size_t>(s.cell_index({-1}))] = n / 2;
      continue;
    }
    const std::string pair = s.steps[0] + s.steps[1];
    corr = pair == "AB" ? c_ab : pair == "BC" ? c_bc : c_ac;
    const int a = s.dark_is[0];
    s.counts[static_cast<std::size_t>(s.cell_index({a, +1}))] = std::round(n * (1 + a * corr) / 4);
    s.counts[static_cast<std::size_t>(s.cell_index({a, -1}))] = std::round(n * (1 - a * corr) / 4);
    s.counts[static_cast<std::size_t>(s.cell_index({-a}))] = n / 2;
  }
  long total = 0;
  for (const auto& s : c.sequences) total += static_cast<long>(s.total());
  c.rows.read = c.rows.used = total;
  return c;
}

AnalysisOptions fast(std::uint64_t seed = 11) {
  AnalysisOptions o;
  o.replicates = 2000;
  o.seed = seed;
  return o;
}

const TestResult& method(const LeggettGargAnalysis& a, const std::string& m) {
  for (const auto& t : a.tests)
    if (t.method == m) return t;
  FAIL("no method " << m);
  return a.tests.front();
}

}  // namespace

TEST_CASE("analyse: JSON carries every field of DESIGN.md section 8", "[stats][analysis]") {
  const Protocol p = test_protocol();
  const AnalysisResult r = analyse_campaign(p, exact_campaign(p, 0.8, 0.8, 0.3, 4000), fast());
  const nlohmann::json j = nlohmann::json::parse(analysis_json_text(r));
  REQUIRE(j.contains("estimates"));
  REQUIRE(j["estimates"].contains("K[ABC]"));
  for (const auto& [name, e] : j["estimates"].items()) {
    INFO(name);
    CHECK(e.contains("estimate"));
    CHECK(e.contains("ci"));
    CHECK(e.contains("level"));
    CHECK(e.contains("method"));
    CHECK(e["level"].get<double>() == 0.95);
  }
  CHECK(j["estimates"]["K[ABC]"]["method"] == "bca");
  REQUIRE(j["tests"].size() == 2);
  for (const auto& t : j["tests"]) {
    CHECK(t.contains("p_value"));
    CHECK(t.contains("sigma"));
    CHECK(t.contains("method"));
    CHECK(t["methods"].size() >= 2);
  }
  std::vector<std::string> lg_methods;
  for (const auto& m : j["tests"][0]["methods"]) lg_methods.push_back(m["method"]);
  CHECK(lg_methods == std::vector<std::string>{"z-asymptotic", "hoeffding", "empirical-bernstein",
                                               "parametric-bootstrap"});
  CHECK(j["tests"][1]["methods"].back()["method"] == "tost");  // margin 0.05 from the protocol
  for (const char* k : {"read", "used", "rejected", "reasons"}) CHECK(j["rows"].contains(k));
  CHECK(j["seed"].get<std::uint64_t>() == 11);
  CHECK(j["cautions"].size() == 4);
  CHECK(j.contains("multiplicity"));
  CHECK(j["multiplicity"]["tests"].size() == 2);
}

TEST_CASE("analyse: same seed gives the same bytes, another seed other intervals", "[stats][analysis]") {
  const Protocol p = test_protocol();
  const CampaignCounts c = exact_campaign(p, 0.8, 0.8, 0.3, 400);
  const std::string a = analysis_json_text(analyse_campaign(p, c, fast(5)));
  const std::string b = analysis_json_text(analyse_campaign(p, c, fast(5)));
  CHECK(a == b);
  CHECK(analysis_text(analyse_campaign(p, c, fast(5))) == analysis_text(analyse_campaign(p, c, fast(5))));
  CHECK(a != analysis_json_text(analyse_campaign(p, c, fast(6))));
}

TEST_CASE("analyse: a campaign exactly at K = 1.3 rejects H0, at K = 1 it does not", "[stats][analysis]") {
  const Protocol p = test_protocol();
  SECTION("K = 1.3") {
    // C_AB = C_BC = 0.8, C_AC = 0.3: K = 0.8 + 0.8 - 0.3 = 1.3 (DESIGN.md section 2 definition).
    const AnalysisResult r = analyse_campaign(p, exact_campaign(p, 0.8, 0.8, 0.3, 20000), fast());
    REQUIRE(r.leggett_garg.size() == 1);
    const auto& a = r.leggett_garg[0];
    CHECK_CLOSE(a.K, 1.3, 1e-12, 1e-12);       // exact counts: the MLE is the generating value
    CHECK_CLOSE(a.K_linear, 1.3, 1e-12, 1e-12);
    // z = 0.3 / se with se ~ 0.006 at 20000 shots per sequence: p far below 1e-6.
    CHECK(method(a, "z-asymptotic").p_value < 1e-6);
    CHECK(method(a, "hoeffding").p_value < 1e-6);
    // Empirical Bernstein (Maurer & Pontil 2009, Thm 4) over 6 sequences at d = 1e-4: the
    // penalties add to about 0.2 < 0.3 (rough hand estimate, V <= 1/4 per rescaled shot).
    CHECK(method(a, "empirical-bernstein").p_value < 1e-4);
    // No replicate exceeds: p = 1 / (B + 1) (Davison & Hinkley (1997) 4.2.1).
    CHECK_CLOSE(method(a, "parametric-bootstrap").p_value, 1.0 / 2001.0, 0.0, 1e-12);
    CHECK(a.verdict.find("violated") != std::string::npos);
  }
  SECTION("K = 1") {
    const AnalysisResult r = analyse_campaign(p, exact_campaign(p, 0.8, 0.8, 0.6, 20000), fast());
    const auto& a = r.leggett_garg[0];
    CHECK_CLOSE(a.K, 1.0, 1e-12, 1e-12);
    // K^ exactly on the bound: z = 0, p = 1 - Phi(0) = 1/2 (common practice, no source).
    CHECK_CLOSE(method(a, "z-asymptotic").p_value, 0.5, 1e-9, 0.0);
    // Hoeffding's bound with (L^ - bound)_+ = 0 is exp(0) = 1 (Hoeffding 1963, Theorem 2).
    CHECK_CLOSE(method(a, "hoeffding").p_value, 1.0, 1e-12, 0.0);
    // Bootstrap p at T = 0: about 1/2; its Monte Carlo SD at B = 2000 is 0.011, so > 0.3
    // cannot fail by chance.
    CHECK(method(a, "parametric-bootstrap").p_value > 0.3);
    CHECK(a.verdict.find("no violation") != std::string::npos);
  }
}

TEST_CASE("analyse: binomial and Newcombe intervals where a quantity is a proportion", "[stats][analysis]") {
  const Protocol p = test_protocol();
  const AnalysisResult r = analyse_campaign(p, exact_campaign(p, 0.8, 0.8, 0.3, 20000), fast());
  const QuantityEstimate* q = nullptr;
  for (const auto& e : r.estimates)
    if (e.name == "P[AB:++]") q = &e;
  REQUIRE(q != nullptr);
  const IntervalEstimate* w = nullptr;
  for (const auto& iv : q->intervals)
    if (iv.method == "wilson") w = &iv;
  REQUIRE(w != nullptr);
  // Wilson, JASA 22:209 (1927): centre (p + z^2/2n)/(1 + z^2/n), half-width
  // z/(1 + z^2/n) sqrt(p(1-p)/n + z^2/4n^2); "++" occurs only in AB+: 9000 of 20000.
  const double z = boost::math::quantile(boost::math::normal(), 0.975);
  const double n = 20000, ph = 9000 / n;
  const double centre = (ph + z * z / (2 * n)) / (1 + z * z / n);
  const double half = z / (1 + z * z / n) * std::sqrt(ph * (1 - ph) / n + z * z / (4 * n * n));
  CHECK_CLOSE(w->lo, centre - half, 1e-12, 1e-10);
  CHECK_CLOSE(w->hi, centre + half, 1e-12, 1e-10);
  // Destructive readout: S is not a difference of two binomial proportions, so no Newcombe
  // interval and Barnard's test carries the reason.
  for (const auto& e : r.estimates)
    if (e.name == "S[A->B]")
      for (const auto& iv : e.intervals) CHECK(iv.method != "newcombe-hybrid-score");
  CHECK(std::isnan(r.nsit[0].tests[1].p_value));
  CHECK(!r.nsit[0].tests[1].note.empty());
}

TEST_CASE("analyse: skip policy rows add up", "[stats][analysis]") {
  const Protocol p = test_protocol();
  std::string table = "# test table\nsequence,shot,time_s,r1,r2\n";
  long good = 0;
  for (int i = 0; i < 40; ++i) {
    for (const char* s : {"AB+", "AB-", "BC+", "BC-", "AC+", "AC-"}) {
      table += std::string(s) + "," + std::to_string(i) + "," + std::to_string(0.01 * i) + "," +
               (i % 3 == 0 ? "bright," : (i % 2 ? "dark,dark" : "dark,bright")) + "\n";
      ++good;
    }
    table += "B," + std::to_string(i) + "," + std::to_string(0.01 * i) + "," + (i % 2 ? "dark" : "bright") + "\n";
    ++good;
  }
  table += "XY+,0,0.0,dark,dark\n";     // unknown sequence
  table += "AB+,1,0.0,dark,dark\n";     // duplicated shot
  table += "AB+,99,0.0,maybe,dark\n";   // malformed result
  table += "AB+,100,0.0,bright,dark\n"; // result after the shot ended
  OutcomeTableOptions o;
  o.bad_rows = BadRowPolicy::skip;
  const RunsInput in = parse_runs_text(table, "t.csv", p, o);
  AnalysisOptions ao = fast();
  ao.drift = in.drift;
  const AnalysisResult r = analyse_campaign(p, in.read.counts, ao);
  CHECK(r.rows.read == good + 4);
  CHECK(r.rows.used == good);
  CHECK(r.rows.rejected == 4);
  long reasons = 0;
  for (const auto& [k, v] : r.rows.reasons) reasons += v;
  CHECK(reasons == r.rows.rejected);
  double shots = 0;
  for (const auto& s : r.sequences) shots += s.shots;
  CHECK(shots == static_cast<double>(r.rows.used));
  const nlohmann::json j = nlohmann::json::parse(analysis_json_text(r));
  CHECK(j["rows"]["rejected"] == 4);
  CHECK(j["rows"]["reasons"].size() == 4);
  CHECK(r.drift.checked);
}

TEST_CASE("analyse: drift check is Pearson's chi-square of the two halves", "[stats][analysis]") {
  const Protocol p = test_protocol();
  // Sequence B: first half 30 "+" and 10 "-", second half 10 "+" and 30 "-".
  // 2 x 2 Pearson chi-square N (ad - bc)^2 / (r1 r2 c1 c2) = 80 * 800^2 / 40^4 = 20
  // (Agresti 2013, 3.2), df 1, p = 7.744216431044088e-06 (scipy.stats.chi2.sf(20, 1)).
  std::string table = "sequence,shot,time_s,r1\n";
  for (int i = 0; i < 80; ++i) {
    const bool first = i < 40;
    const bool plus = first ? (i % 4 != 0) : (i % 4 == 0);
    table += "B," + std::to_string(i) + "," + std::to_string(i) + "," + (plus ? "dark" : "bright") + "\n";
  }
  const RunsInput in = parse_runs_text(table, "drift.csv", p, {});
  REQUIRE(in.drift.checked);
  REQUIRE(in.drift.sequences.size() == 1);
  CHECK(in.drift.sequences[0].first_half == 40);
  CHECK_CLOSE(in.drift.chi_square, 20.0, 1e-12, 1e-12);
  CHECK(in.drift.df == 1);
  CHECK_CLOSE(in.drift.p_value, 7.744216431044088e-06, 0.0, 1e-9);
  SECTION("counts JSON: not checked") {
    const RunsInput c = parse_runs_text(R"({"format": "macroreal-counts/1", "counts": {"B": {"dark": 3, "bright": 4}}})",
                                        "c.json", p, {});
    CHECK(c.format == RunsFormat::counts);
    CHECK(!c.drift.checked);
    CHECK(c.read.counts.find("B")->total() == 7);
  }
}

namespace {

// Two LG orders (ABC, BCD) and the NSIT controls of ABC; generated sequences fill the rest.
const char* kTwoTests = R"({
  "format": "macroreal-protocol/1",
  "readout": "destructive",
  "measurements": {
    "A": {"beta": [1.0, 0.0], "time_s": 0.0},
    "B": {"beta": [1.0, 0.0], "time_s": 1e-4},
    "C": {"beta": [1.0, 0.0], "time_s": 2e-4},
    "D": {"beta": [1.0, 0.0], "time_s": 3e-4}
  },
  "tests": [
    {"kind": "leggett-garg", "order": ["A", "B", "C"]},
    {"kind": "leggett-garg", "order": ["B", "C", "D"]},
    {"kind": "nsit", "from": "A", "to": "B"},
    {"kind": "nsit", "from": "B", "to": "C"},
    {"kind": "nsit", "from": "A", "to": "C"}
  ]
})";

// Uniform marginals, P(o_i, o_j) = (1 + o_i o_j C_ij) / 4, exact counts.
CampaignCounts exact_pairs(const Protocol& p, const std::map<std::string, double>& corr, double n) {
  CampaignCounts c = empty_counts(p);
  for (auto& s : c.sequences) {
    if (s.steps.size() == 1) {
      s.counts[static_cast<std::size_t>(s.cell_index({+1}))] = n / 2;
      s.counts[static_cast<std::size_t>(s.cell_index({-1}))] = n / 2;
      continue;
    }
    const double k = corr.at(s.steps[0] + s.steps[1]);
    const int a = s.dark_is[0];
    s.counts[static_cast<std::size_t>(s.cell_index({a, +1}))] = std::round(n * (1 + a * k) / 4);
    s.counts[static_cast<std::size_t>(s.cell_index({a, -1}))] = std::round(n * (1 - a * k) / 4);
    s.counts[static_cast<std::size_t>(s.cell_index({-a}))] = n / 2;
  }
  return c;
}

}  // namespace

TEST_CASE("analyse: several tests give Holm, BH, max-statistic and the invasiveness bound", "[stats][analysis]") {
  ProtocolReadOptions o;
  o.generate_needed_sequences = true;
  const Protocol p = parse_protocol_text(kTwoTests, "two.json", o);
  // K[ABC] = 0.8 + 0.8 - 0.3 = 1.3; K[BCD] = 0.8 + 0.5 - 0.3 = 1.0.
  const std::map<std::string, double> corr = {{"AB", 0.8}, {"BC", 0.8}, {"AC", 0.3},
                                              {"CD", 0.5}, {"BD", 0.3}};
  const AnalysisResult r = analyse_campaign(p, exact_pairs(p, corr, 20000), fast());
  REQUIRE(r.leggett_garg.size() == 2);
  REQUIRE(r.multiplicity.entries.size() == 5);
  // Holm (Scand. J. Stat. 6:65 (1979)) and BH (JRSS B 57:289 (1995)) by hand from the raw p.
  std::vector<double> ps;
  for (const auto& e : r.multiplicity.entries) ps.push_back(e.p_value);
  std::vector<std::size_t> idx(ps.size());
  for (std::size_t i = 0; i < idx.size(); ++i) idx[i] = i;
  std::sort(idx.begin(), idx.end(), [&](std::size_t a, std::size_t b) { return ps[a] < ps[b]; });
  const double m = static_cast<double>(ps.size());
  double run = 0.0;
  for (std::size_t k = 0; k < idx.size(); ++k) {
    run = std::max(run, std::min(1.0, (m - static_cast<double>(k)) * ps[idx[k]]));
    CHECK_CLOSE(r.multiplicity.entries[idx[k]].holm, run, 1e-15, 0.0);
  }
  double down = 1.0;
  for (std::size_t k = idx.size(); k-- > 0;) {
    down = std::min(down, std::min(1.0, m * ps[idx[k]] / static_cast<double>(k + 1)));
    CHECK_CLOSE(r.multiplicity.entries[idx[k]].benjamini_hochberg, down, 1e-15, 0.0);
  }
  REQUIRE(r.multiplicity.max_statistic.has_value());
  CHECK(r.multiplicity.max_statistic->adjusted_p.size() == 2);
  CHECK(r.multiplicity.max_statistic_labels == std::vector<std::string>{"LG ABC", "LG BCD"});
  CHECK(r.multiplicity.max_statistic->largest == 0);
  // Invasiveness (invasiveness.hpp): bound = n - 2 + 2 sum |S^| over A->B, B->C, A->C; the
  // exact uniform marginals give S^ = 0 for each, so the bound is 1.
  REQUIRE(r.leggett_garg[0].invasiveness.has_value());
  const auto& b = *r.leggett_garg[0].invasiveness;
  double sum = 0.0;
  for (const auto& n : r.nsit) sum += std::fabs(n.S);
  CHECK_CLOSE(b.bound, 1.0 + 2.0 * sum, 1e-12, 0.0);
  CHECK_CLOSE(sum, 0.0, 1e-12, 0.0);
  CHECK(b.exceeds == (b.k_lower > b.bound_upper));
  CHECK(b.exceeds);  // K lower limit ~1.29 against 1 + 2 * 3 * z * se(S) ~ 1.1
  // BCD has no NSIT control C->D or B->D: the bound is unavailable with a reason.
  CHECK(!r.leggett_garg[1].invasiveness.has_value());
  CHECK(r.leggett_garg[1].invasiveness_unavailable.find("NSIT") != std::string::npos);
}
