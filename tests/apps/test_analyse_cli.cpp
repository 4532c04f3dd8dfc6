// `macroreal analyse` as a program: exit codes, streams, error messages with file, line and
// column, the skip policy's reasons, JSON output, and the shipped demo output (example_runs/)
// re-run byte for byte. Runs the real executable (MACROREAL_EXE) through the shell with stdout
// and stderr captured in separate files.
#include <sys/wait.h>
#include <unistd.h>

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

namespace fs = std::filesystem;
using nlohmann::json;

namespace {

struct Run {
  int code = -1;
  std::string out, err;
};

std::string slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

fs::path temp_dir() {
  const fs::path d = fs::temp_directory_path() / ("macroreal_analyse_cli_" + std::to_string(::getpid()));
  fs::create_directories(d);
  return d;
}

// `args` is appended to the command line as written (the caller quotes).
Run run(const std::string& args, const std::string& stdin_file = "") {
  const fs::path d = temp_dir();
  const fs::path out = d / "stdout.txt", err = d / "stderr.txt";
  std::string cmd = std::string("cd '") + MACROREAL_SOURCE_DIR + "' && '" + MACROREAL_EXE + "' " + args +
                    " >'" + out.string() + "' 2>'" + err.string() + "'";
  if (!stdin_file.empty()) cmd += " <'" + stdin_file + "'";
  const int status = std::system(cmd.c_str());
  Run r;
  r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  r.out = slurp(out);
  r.err = slurp(err);
  return r;
}

const std::string kProtocol = "--protocol protocols/lg3_thermal.json";
const std::string kRuns = "example_runs/lg3_thermal_runs.csv";

// A copy of the demo table with one line replaced (1-based line number of the file).
fs::path table_with_line(int line_no, const std::string& replacement) {
  std::ifstream in(std::string(MACROREAL_SOURCE_DIR) + "/" + kRuns);
  std::string line, text;
  int n = 0;
  while (std::getline(in, line)) {
    ++n;
    text += (n == line_no ? replacement : line) + "\n";
  }
  const fs::path p = temp_dir() / "bad_runs.csv";
  std::ofstream(p, std::ios::binary) << text;
  return p;
}

int first_data_line() {
  std::ifstream in(std::string(MACROREAL_SOURCE_DIR) + "/" + kRuns);
  std::string line;
  int n = 0;
  bool header = false;
  while (std::getline(in, line)) {
    ++n;
    if (line.empty() || line[0] == '#') continue;
    if (header) return n;
    header = true;
  }
  return -1;
}

}  // namespace

TEST_CASE("analyse CLI: a good run exits 0 with a report", "[apps][analyse]") {
  const Run r = run("analyse " + kRuns + " " + kProtocol + " --bootstrap 2000");
  CHECK(r.code == 0);
  CHECK(r.err.empty());
  CHECK(r.out.find("Verdicts") != std::string::npos);
  CHECK(r.out.find("K[ABC]") != std::string::npos);
  CHECK(r.out.find("Cautions") != std::string::npos);
}

TEST_CASE("analyse CLI: --json parses and carries the section 8 fields", "[apps][analyse]") {
  const Run r = run("analyse " + kRuns + " " + kProtocol + " --bootstrap 2000 --json --seed 3");
  REQUIRE(r.code == 0);
  const json j = json::parse(r.out);
  CHECK(j["seed"] == 3);
  CHECK(j["rows"]["rejected"] == 0);
  CHECK(j["rows"]["read"] == j["rows"]["used"]);
  CHECK(j["estimates"]["K[ABC]"].contains("ci"));
  CHECK(j["tests"][0]["kind"] == "leggett-garg");
  CHECK(j["tests"][0]["model"]["K_classical_kicked"].is_number());
  CHECK(j["drift"]["checked"] == true);
  SECTION("same seed, same bytes") {
    CHECK(run("analyse " + kRuns + " " + kProtocol + " --bootstrap 2000 --json --seed 3").out == r.out);
  }
  SECTION("standard input gives the same estimates") {
    const Run s = run("analyse - " + kProtocol + " --bootstrap 2000 --json --seed 3",
                      std::string(MACROREAL_SOURCE_DIR) + "/" + kRuns);
    REQUIRE(s.code == 0);
    CHECK(json::parse(s.out)["estimates"] == j["estimates"]);
  }
}

TEST_CASE("analyse CLI: a bad row exits 2 naming file, line and column, stdout empty", "[apps][analyse]") {
  const int line = first_data_line();
  REQUIRE(line > 0);
  const fs::path bad = table_with_line(line, "AB+,0,0.0,dark,maybe");
  const Run r = run("analyse '" + bad.string() + "' " + kProtocol + " --bootstrap 2000");
  CHECK(r.code == 2);
  CHECK(r.out.empty());
  CHECK(r.err.find(bad.string()) != std::string::npos);
  CHECK(r.err.find("line " + std::to_string(line)) != std::string::npos);
  CHECK(r.err.find("column") != std::string::npos);
  CHECK(r.err.find("r2") != std::string::npos);
  SECTION("--on-bad-row skip reports the reason") {
    const Run s = run("analyse '" + bad.string() + "' " + kProtocol + " --bootstrap 2000 --on-bad-row skip --json");
    REQUIRE(s.code == 0);
    const json j = json::parse(s.out);
    CHECK(j["rows"]["rejected"] == 1);
    CHECK(j["rows"]["reasons"]["malformed result"] == 1);
    CHECK(j["rows"]["read"].get<long>() == j["rows"]["used"].get<long>() + 1);
    const Run t = run("analyse '" + bad.string() + "' " + kProtocol + " --bootstrap 2000 --on-bad-row skip");
    CHECK(t.out.find("1 rejected: malformed result") != std::string::npos);
  }
}

TEST_CASE("analyse CLI: a missing protocol field exits 2", "[apps][analyse]") {
  const Run r = run("analyse " + kRuns + " --protocol nonexistent.json");
  CHECK(r.code == 2);
  CHECK(r.out.empty());
  CHECK(r.err.find("nonexistent.json") != std::string::npos);
}

TEST_CASE("analyse CLI: the counts JSON example is detected and analysed", "[apps][analyse]") {
  const Run r = run("analyse example_runs/lg3_thermal_counts.json " + kProtocol + " --bootstrap 2000 --json");
  REQUIRE(r.code == 0);
  const json j = json::parse(r.out);
  CHECK(j["drift"]["checked"] == false);
  CHECK(j["estimates"]["K[ABC]"]["estimate"].is_number());
}

TEST_CASE("analyse CLI: the shipped demo output is reproduced byte for byte", "[apps][analyse]") {
  // The command is the first line of the shipped file ("$ macroreal ...").
  const std::string shipped = slurp(fs::path(MACROREAL_SOURCE_DIR) / "example_runs/lg3_thermal_analysis.txt");
  const std::string first = shipped.substr(0, shipped.find('\n'));
  REQUIRE(first.rfind("$ macroreal ", 0) == 0);
  const Run r = run(first.substr(std::string("$ macroreal ").size()));
  REQUIRE(r.code == 0);
  CHECK(first + "\n" + r.out == shipped);
}

namespace {

// The PNG decoded by tests/support/png_summary.py (Python standard library only), or null.
json png_summary(const fs::path& png) {
  const std::string cmd = std::string(MACROREAL_PYTHON) + " '" + MACROREAL_SOURCE_DIR +
                          "/tests/support/png_summary.py' '" + png.string() + "'";
  FILE* p = ::popen(cmd.c_str(), "r");
  if (!p) return nullptr;
  std::string out;
  char buf[512];
  while (std::fgets(buf, sizeof buf, p)) out += buf;
  if (::pclose(p) != 0 || out.empty()) return nullptr;
  return json::parse(out);
}

void check_figure_files(const fs::path& dir, const std::string& stem) {
  INFO(dir / stem);
  const std::string svg = slurp(dir / (stem + ".svg"));
  CHECK(svg.find("<svg") != std::string::npos);
  CHECK(svg.rfind("</svg>") != std::string::npos);
  const fs::path png = dir / (stem + ".png");
  const std::string bytes = slurp(png);
  REQUIRE(bytes.size() > 8);
  CHECK(bytes.compare(0, 8, std::string("\x89PNG\r\n\x1a\n", 8)) == 0);
  const json s = png_summary(png);
  if (s.is_null()) {
    WARN("python3 not available: PNG decoding skipped");
    return;
  }
  CHECK(s["width"] == 800);  // figure.hpp's default FigureSize
  CHECK(s["height"] == 600);
  CHECK(s["non_background_fraction"].get<double>() > 0.01);  // axes, text, data: not blank
  CHECK(s["colours"].get<int>() >= 3);
}

}  // namespace

TEST_CASE("analyse CLI: --report twice with the same seed writes the same report.md and results.tex", "[apps][analyse][report]") {
  const fs::path dir = temp_dir() / "report_bundle";
  const std::string cmd = "analyse " + kRuns + " " + kProtocol + " --bootstrap 1000 --seed 17 --report '" +
                          dir.string() + "'";
  const Run a = run(cmd);
  REQUIRE(a.code == 0);
  const std::string md1 = slurp(dir / "report.md"), tex1 = slurp(dir / "results.tex");
  REQUIRE_FALSE(md1.empty());
  REQUIRE_FALSE(tex1.empty());
  // The command line as run, the seed and B are recorded.
  CHECK(md1.find(" analyse " + kRuns + " " + kProtocol + " --bootstrap 1000 --seed 17 --report ") != std::string::npos);
  CHECK(md1.find("| seed | 17 |") != std::string::npos);
  CHECK(md1.find("| bootstrap replicates B | 1000 |") != std::string::npos);
  CHECK(md1.find("](figures/lg_estimates.png)") != std::string::npos);
  const Run b = run(cmd);
  REQUIRE(b.code == 0);
  CHECK(b.out == a.out);  // the text report on stdout is unchanged by --report
  CHECK(slurp(dir / "report.md") == md1);
  CHECK(slurp(dir / "results.tex") == tex1);
  check_figure_files(dir / "figures", "lg_estimates");
  check_figure_files(dir / "figures", "bootstrap_K_ABC");
}

TEST_CASE("analyse CLI: --figures on a simulated NSIT scan writes valid, non-blank figures", "[apps][analyse][report]") {
  const fs::path d = temp_dir() / "scan";
  fs::create_directories(d);
  const Run sim = run("simulate protocols/nsit_orientation_scan_cat.json --shots 400 --seed 3 -o '" +
                      (d / "runs.csv").string() + "'");
  REQUIRE(sim.code == 0);
  const fs::path figs = d / "figures";
  const Run r = run("analyse '" + (d / "runs.csv").string() +
                    "' --protocol protocols/nsit_orientation_scan_cat.json --bootstrap 1000 --seed 2 --figures '" +
                    figs.string() + "'");
  REQUIRE(r.code == 0);
  for (const char* stem : {"nsit_estimates", "nsit_scan_histogram", "bootstrap_S_A0-B", "bootstrap_S_A5-B"})
    check_figure_files(figs, stem);
  CHECK_FALSE(fs::exists(figs / "lg_estimates.svg"));  // no LG test in the file
}

// Photon-count tables with a calibration file, and --correct-readout (issue 5). The counts
// table is the shipped simulated one (invented data, threshold 2 in its simulation).
TEST_CASE("analyse CLI: --calibration thresholds photon counts and says where the threshold came from",
          "[apps][analyse][detection]") {
  const std::string counts = "example_runs/simulated_lg3_counts_drift.csv";
  const Run r = run("analyse " + counts + " " + kProtocol + " --bootstrap 200 --calibration example_runs/calibration.json");
  REQUIRE(r.code == 0);
  CHECK(r.out.find("photon-count results read with threshold 2") != std::string::npos);
  CHECK(r.out.find("Readout-corrected") == std::string::npos);  // not asked for
  const Run j = run("analyse " + counts + " " + kProtocol +
                    " --bootstrap 200 --calibration example_runs/calibration.json --json");
  REQUIRE(j.code == 0);
  CHECK(json::parse(j.out)["count_threshold"].get<std::string>().find(
            "reads dark), from the calibration file example_runs/calibration.json") != std::string::npos);
  // --threshold overrides and says so. (A different value would re-read this destructive table
  // into shots that go on after a bright result, which the reader rejects; the same value
  // shows the override.)
  const Run o = run("analyse " + counts + " " + kProtocol +
                    " --bootstrap 200 --calibration example_runs/calibration.json --threshold 2 --json");
  REQUIRE(o.code == 0);
  const std::string note = json::parse(o.out)["count_threshold"].get<std::string>();
  CHECK(note.find("from --threshold (overrides the calibration file example_runs/calibration.json's 2)") !=
        std::string::npos);
}

TEST_CASE("analyse CLI: --correct-readout reports raw and corrected K with the assumptions",
          "[apps][analyse][detection]") {
  const std::string counts = "example_runs/simulated_lg3_counts_drift.csv";
  const std::string cmd = "analyse " + counts + " " + kProtocol +
                          " --bootstrap 300 --seed 4 --calibration example_runs/calibration.json --correct-readout";
  const Run t = run(cmd);
  REQUIRE(t.code == 0);
  CHECK(t.out.find("Readout-corrected estimates") != std::string::npos);
  CHECK(t.out.find("continuation fair") != std::string::npos);
  CHECK(t.out.find("not clipped") != std::string::npos);
  const Run r = run(cmd + " --json");
  REQUIRE(r.code == 0);
  const json j = json::parse(r.out);
  const json& c = j["readout_corrected"];
  CHECK(c["rates"]["dark_read_bright"]["estimate"].get<double>() == Approx(0.00023421168127465926));
  CHECK(c["rates"]["bright_read_dark"]["se"].get<double>() > 0);
  const json& k = c["estimates"]["K[ABC]"];
  CHECK(k["raw"].get<double>() == j["estimates"]["K[ABC]"]["estimate"].get<double>());  // raw kept as is
  CHECK(k["estimate"].get<double>() != k["raw"].get<double>());
  CHECK(k["ci"].size() == 2);
  CHECK(k["ci_rates_fixed"].size() == 2);
  CHECK(k["std_error"].get<double>() >= k["std_error_shots_only"].get<double>());
  CHECK(c["tests"][0]["kind"] == "leggett-garg");
  CHECK(c["tests"][0]["method"] == "z-asymptotic");
  CHECK(c["assumptions"].size() >= 4);
  CHECK(c["misread_continuation"] == "fair");
  const Run d = run(cmd + " --json --misread-continuation dark=0.3");
  REQUIRE(d.code == 0);
  CHECK(json::parse(d.out)["readout_corrected"]["misread_continuation"] == "dark=0.3");
  SECTION("rates from the protocol's detection model, on a dark/bright table") {
    const Run p = run("analyse " + kRuns + " " + kProtocol + " --bootstrap 200 --correct-readout --json");
    REQUIRE(p.code == 0);
    const json q = json::parse(p.out)["readout_corrected"];
    CHECK(q["rates_source"].get<std::string>().find("the protocol's detection model") != std::string::npos);
    CHECK(q["rates"]["dark_read_bright"]["se"].get<double>() == 0);
  }
}

TEST_CASE("analyse CLI: bad combinations of the readout options exit 2 with a clear message",
          "[apps][analyse][detection]") {
  const std::string counts = "example_runs/simulated_lg3_counts_drift.csv";
  const std::string cal = " --calibration example_runs/calibration.json";
  auto expect_2 = [](const Run& r, const std::string& words) {
    CHECK(r.code == 2);
    CHECK(r.out.empty());
    INFO(r.err);
    CHECK(r.err.find(words) != std::string::npos);
  };
  expect_2(run("analyse " + kRuns + " " + kProtocol + " --bootstrap 200 --misread-continuation fair"),
           "--misread-continuation fair needs --correct-readout");
  expect_2(run("analyse " + kRuns + " " + kProtocol + " --bootstrap 200" + cal),
           "is not used: the runs have no photon counts");
  expect_2(run("analyse " + counts + " " + kProtocol + " --bootstrap 200 --correct-readout --threshold 3" + cal),
           "hold at its threshold 2 only");
  expect_2(run("analyse " + counts + " " + kProtocol + " --bootstrap 200 --correct-readout" + cal +
               " --misread-continuation dark=2"),
           "must be 'fair' or 'dark=P'");
  expect_2(run("analyse " + kRuns + " " + kProtocol + " --bootstrap 200 --calibration no_such_file.json"),
           "no_such_file.json");
  // A protocol without detection errors gives the correction nothing to invert.
  json p = json::parse(slurp(std::string(MACROREAL_SOURCE_DIR) + "/protocols/lg3_thermal.json"));
  p.erase("detection");
  const fs::path pf = temp_dir() / "no_detection.json";
  std::ofstream(pf, std::ios::binary) << p.dump(2);
  expect_2(run("analyse " + kRuns + " --protocol '" + pf.string() + "' --bootstrap 200 --correct-readout"),
           "--correct-readout needs error rates");
}
