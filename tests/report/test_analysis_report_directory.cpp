// The report directory of `analyse --report` (lib/report/analysis_report_directory.hpp):
// report.md carries the command, seed, B and level, the SHA-256 of every input equal to
// Python's hashlib.sha256 (standard library) of the same file, the rows read / used /
// rejected with the reasons, every estimate's interval and method, the tests, and every
// caution and limitation of the result; results.tex is a booktabs table whose environments
// and braces balance and whose text has the LaTeX specials escaped. The .tex is checked
// structurally here, not compiled (no TeX installation is assumed).
#include <catch2/catch.hpp>

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>
#include <unistd.h>

#include "analysis_fixtures.hpp"
#include "core/error.hpp"
#include "report/analysis_report_directory.hpp"

using namespace macroreal;
using namespace macroreal::test_support;
namespace fs = std::filesystem;

namespace {

std::string slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

fs::path scratch() {
  const fs::path d = fs::temp_directory_path() / ("macroreal_report_dir_test_" + std::to_string(::getpid()));
  fs::create_directories(d);
  return d;
}

std::string python_sha256(const std::string& path) {
  const std::string cmd = std::string(MACROREAL_PYTHON) +
                          " -c \"import hashlib,sys; print(hashlib.sha256(open(sys.argv[1],'rb').read()).hexdigest())\" '" +
                          path + "'";
  FILE* p = ::popen(cmd.c_str(), "r");
  if (!p) return "";
  std::string out;
  char buf[256];
  while (std::fgets(buf, sizeof buf, p)) out += buf;
  if (::pclose(p) != 0) return "";
  while (!out.empty() && out.back() == '\n') out.pop_back();
  return out;
}

bool contains(const std::string& text, const std::string& part) { return text.find(part) != std::string::npos; }

// Counts of \begin{x} and \end{x} per environment name, and the brace depth outside escapes.
void check_latex_structure(const std::string& tex) {
  std::map<std::string, int> depth;
  int braces = 0;
  for (std::size_t i = 0; i < tex.size(); ++i) {
    if (tex[i] == '%' && (i == 0 || tex[i - 1] != '\\')) {  // comment to the end of the line
      while (i < tex.size() && tex[i] != '\n') ++i;
      continue;
    }
    if (tex[i] == '\\' && i + 1 < tex.size() && (tex[i + 1] == '{' || tex[i + 1] == '}' || tex[i + 1] == '\\' ||
                                                 tex[i + 1] == '%' || tex[i + 1] == '&' || tex[i + 1] == '_' ||
                                                 tex[i + 1] == '#' || tex[i + 1] == '$')) {
      ++i;
      continue;
    }
    for (const char* kw : {"\\begin{", "\\end{"}) {
      const std::string k = kw;
      if (tex.compare(i, k.size(), k) == 0) {
        const auto close = tex.find('}', i + k.size());
        REQUIRE(close != std::string::npos);
        depth[tex.substr(i + k.size(), close - i - k.size())] += k == "\\begin{" ? 1 : -1;
      }
    }
    if (tex[i] == '{') ++braces;
    if (tex[i] == '}') --braces;
    CHECK(braces >= 0);
  }
  CHECK(braces == 0);
  for (const auto& [env, d] : depth) {
    INFO("environment " << env);
    CHECK(d == 0);
  }
  CHECK(depth.count("tabular") == 1);
}

}  // namespace

TEST_CASE("analysis report: report.md records command, seed, checksums, rows and every caution", "[report][analysis_report]") {
  const std::string protocol_path = source_path("protocols/lg3_thermal.json");
  const std::string runs_path = source_path("example_runs/lg3_thermal_runs.csv");
  const Protocol p = analysis_protocol("protocols/lg3_thermal.json");
  const RunsInput runs = read_runs_file(runs_path, p, {});
  AnalysisOptions o = quick_options(4242);
  o.drift = runs.drift;
  const AnalysisResult r = analyse_campaign(p, runs.read.counts, o);
  const AnalysisFigures figs = analysis_figures(p, runs.read.counts, r);
  ReportProvenance prov;
  prov.command_line = "macroreal analyse example_runs/lg3_thermal_runs.csv --protocol protocols/lg3_thermal.json --seed 4242";
  prov.version = "9.9.9-test";
  prov.inputs = {{"runs", runs_path}, {"protocol", protocol_path}};
  const fs::path dir = scratch() / "report";
  const ReportFiles files = write_analysis_report(r, figs, prov, dir.string());
  const std::string md = slurp(files.markdown);

  CHECK(contains(md, "```\n" + prov.command_line + "\n```"));
  CHECK(contains(md, "version 9.9.9-test"));
  CHECK(contains(md, "| seed | 4242 |"));
  CHECK(contains(md, "| bootstrap replicates B | 1000 |"));
  CHECK(contains(md, "| confidence level | 0.9500"));
  for (const auto& path : {runs_path, protocol_path}) {
    const std::string reference = python_sha256(path);
    if (reference.empty()) {
      WARN("python3 not available: hashlib comparison skipped");
      continue;
    }
    CHECK(contains(md, "`" + reference + "`"));
  }
  CHECK(contains(md, "| read | " + std::to_string(r.rows.read) + " |"));
  CHECK(contains(md, "| used | " + std::to_string(r.rows.used) + " |"));
  CHECK(contains(md, "| rejected | " + std::to_string(r.rows.rejected) + " |"));
  REQUIRE(r.cautions.size() >= 4);
  for (const auto& c : r.cautions) CHECK(contains(md, "- " + c + "\n"));
  for (const auto& c : r.not_established) CHECK(contains(md, "- " + c + "\n"));
  for (const auto& q : r.estimates) CHECK(contains(md, "| `" + q.name + "` |"));
  for (const auto& a : r.leggett_garg) {
    CHECK(contains(md, "### " + a.label));
    CHECK(contains(md, a.verdict));
  }
  CHECK(contains(md, "## Multiplicity"));
  CHECK(contains(md, "Invasiveness bound"));
  // Figures embedded by relative path, and the files are there.
  REQUIRE_FALSE(figs.figures.empty());
  for (const auto& f : figs.figures) {
    CHECK(contains(md, "](figures/" + f.stem + ".png)"));
    CHECK(fs::exists(dir / "figures" / (f.stem + ".png")));
    CHECK(fs::exists(dir / "figures" / (f.stem + ".svg")));
  }
  // No time stamps: the same result writes the same bytes.
  CHECK(analysis_report_markdown(r, figs, prov, checksum_inputs(prov.inputs)) == md);
  CHECK(analysis_results_latex(r) == slurp(files.latex));
}

TEST_CASE("analysis report: rejected rows are listed with their reasons", "[report][analysis_report]") {
  const Protocol p = analysis_protocol("protocols/lg3_thermal.json");
  std::string text = slurp(source_path("example_runs/lg3_thermal_runs.csv"));
  text += "NOPE,99999,1.0,dark,\nAB+,99998,1.0,grey,dark\n";
  const fs::path table = scratch() / "with_bad_rows.csv";
  { std::ofstream(table, std::ios::binary) << text; }
  OutcomeTableOptions skip;
  skip.bad_rows = BadRowPolicy::skip;
  const RunsInput runs = read_runs_file(table.string(), p, skip);
  REQUIRE(runs.read.counts.rows.rejected == 2);
  const AnalysisResult r = analyse_campaign(p, runs.read.counts, quick_options());
  ReportProvenance prov;
  prov.command_line = "macroreal analyse with_bad_rows.csv";
  prov.version = "test";
  prov.inputs = {{"runs", table.string()}, {"runs again from stdin", "-"}};
  const std::string md = analysis_report_markdown(r, AnalysisFigures{}, prov, checksum_inputs(prov.inputs));
  CHECK(contains(md, "| rejected | 2 |"));
  for (const auto& [reason, n] : r.rows.reasons) CHECK(contains(md, "| " + reason + " | " + std::to_string(n) + " |"));
  CHECK(r.rows.reasons.size() == 2);
  CHECK(contains(md, "read from standard input: no checksum"));
  CHECK(contains(md, "No figure was drawn."));
  CHECK_THROWS_AS(checksum_inputs({{"runs", "/nonexistent/macroreal_none.csv"}}), InputError);
}

TEST_CASE("analysis report: results.tex is a balanced booktabs table with escaped text", "[report][analysis_report]") {
  CHECK(latex_escape("a_b & 50% #1 $x$ {y} ~^ \\ S[A->B] <|>") ==
        "a\\_b \\& 50\\% \\#1 \\$x\\$ \\{y\\} \\textasciitilde{}\\textasciicircum{} \\textbackslash{} "
        "S[A$\\rightarrow$B] \\textless{}\\textbar{}\\textgreater{}");
  for (const char* proto : {"protocols/lg3_thermal.json", "protocols/nsit_orientation_scan_cat.json"}) {
    INFO(proto);
    const Protocol p = analysis_protocol(proto);
    const CampaignCounts counts = simulated_counts(p, 300.0, 5);
    const AnalysisResult r = analyse_campaign(p, counts, quick_options());
    const std::string tex = analysis_results_latex(r);
    check_latex_structure(tex);
    for (const char* rule : {"\\toprule", "\\midrule", "\\bottomrule"}) CHECK(contains(tex, rule));
    CHECK(contains(tex, "\\begin{tabular}{llllrrl}"));
    // Every row has 7 cells: 6 unescaped '&' before the closing "\\".
    std::istringstream lines(tex);
    std::string line;
    int rows = 0;
    while (std::getline(lines, line)) {
      if (line.size() < 2 || line.compare(line.size() - 2, 2, "\\\\") != 0) continue;
      int amps = 0;
      for (std::size_t i = 0; i < line.size(); ++i)
        if (line[i] == '&' && (i == 0 || line[i - 1] != '\\')) ++amps;
      INFO(line);
      CHECK(amps == 6);
      ++rows;
    }
    // The header, one row per test method of every LG and NSIT test, one per correlator / average.
    std::size_t expected = 1;
    for (const auto& a : r.leggett_garg) expected += std::max<std::size_t>(1, a.tests.size());
    for (const auto& a : r.nsit) expected += std::max<std::size_t>(1, a.tests.size());
    for (const auto& q : r.estimates)
      if (q.kind == QuantityKind::correlator || q.kind == QuantityKind::single_average) ++expected;
    CHECK(static_cast<std::size_t>(rows) == expected);
    // No raw "->" or '_' from a name survives outside math mode.
    CHECK_FALSE(contains(tex, "->"));
  }
}

TEST_CASE("analysis report: readout-corrected results appear beside the raw ones", "[report][analysis_report]") {
  const Protocol p = analysis_protocol("protocols/lg3_thermal.json");
  const CampaignCounts counts = simulated_counts(p, 300.0, 9);
  AnalysisResult r = analyse_campaign(p, counts, quick_options());
  const std::string raw_md = analysis_report_markdown(r, AnalysisFigures{}, {}, {});
  CHECK(contains(raw_md, "Not applied: every estimate"));
  // A corrected part as the detection module attaches it (values invented for the layout).
  ReadoutCorrectedAnalysis c;
  c.dark_read_bright = 0.0123;
  c.bright_read_dark = 0.0456;
  c.rates_source = "calibration file cal.json";
  c.uncertainty = "rates redrawn per replicate";
  c.continuation = "fair";
  c.default_interval = "bca";
  c.replicates = 1000;
  c.seed = 7;
  CorrectedEstimate e;
  e.name = "K[ABC]";
  e.kind = QuantityKind::lg_k;
  e.raw = r.leggett_garg[0].K;
  e.estimate = 1.3579;
  e.std_error = 0.0246;
  e.ci = {"bca", 1.3111, 1.4012, true};
  c.estimates.push_back(e);
  CorrectedTest t;
  t.label = "LG ABC";
  t.quantity = "K[ABC]";
  t.raw = e.raw;
  t.estimate = e.estimate;
  t.std_error = e.std_error;
  t.bound = 1.0;
  TestResult z;
  z.method = "z-asymptotic";
  z.statistic = 14.5;
  z.p_value = 1e-12;
  z.sigma = 7.03;
  t.tests.push_back(z);
  c.leggett_garg.push_back(t);
  r.readout_corrected = c;
  const std::string md = analysis_report_markdown(r, AnalysisFigures{}, {}, {});
  CHECK_FALSE(contains(md, "Not applied: every estimate"));
  char raw[32];
  std::snprintf(raw, sizeof raw, "%.4f", e.raw);
  CHECK(contains(md, "| `K[ABC]` | " + std::string(raw) + " | 1.3579 | 0.0246 | [1.3111, 1.4012] (bca) |"));
  CHECK(contains(md, "calibration file cal.json"));
  // The raw estimate is still reported in the estimates table.
  CHECK(contains(md, "`K[ABC]` = "));
  const std::string tex = analysis_results_latex(r);
  check_latex_structure(tex);
  CHECK(contains(tex, "K[ABC] (readout-corrected) & $1.3579$ & $[1.3111, 1.4012]$ & bca & $1.00\\times 10^{-12}$"));
}
