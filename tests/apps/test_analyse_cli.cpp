// `macroreal analyse` as a program: exit codes, streams, error messages with file, line and
// column, the skip policy's reasons, JSON output, and the shipped demo output (example_runs/)
// re-run byte for byte. Runs the real executable (MACROREAL_EXE) through the shell with stdout
// and stderr captured in separate files.
#include <sys/wait.h>
#include <unistd.h>

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
