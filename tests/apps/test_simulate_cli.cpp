// `macroreal simulate` as a program: the shipped simulated demo tables re-made byte for byte
// from the command in their own header, -o - on stdout, --help with the assumption and an
// example, and bad input (allocation file, shots) -> exit 2 naming the file and the field.
#include <cmath>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "support/cli_run.hpp"

namespace fs = std::filesystem;
using macroreal::test_support::CliRun;
using macroreal::test_support::slurp;

namespace {

fs::path temp_dir() { return macroreal::test_support::scratch_dir("simulate_cli"); }

CliRun run(const std::string& args) {
  return macroreal::test_support::run_macroreal(args, "simulate_cli");
}

std::string write_temp(const std::string& name, const std::string& text) {
  const fs::path p = temp_dir() / name;
  std::ofstream(p, std::ios::binary) << text;
  return p.string();
}

// The "# command: macroreal simulate ..." line of a table, without "macroreal ".
std::string recorded_command(const std::string& table) {
  const std::string key = "# command: macroreal ";
  const auto at = table.find(key);
  REQUIRE(at != std::string::npos);
  const auto end = table.find('\n', at);
  return table.substr(at + key.size(), end - at - key.size());
}

}  // namespace

TEST_CASE("simulate: the shipped demo tables are re-made byte for byte", "[apps][simulate]") {
  for (const char* name : {"simulated_lg3_runs.csv", "simulated_lg3_counts_drift.csv"}) {
    INFO(name);
    const std::string shipped = slurp(fs::path(MACROREAL_SOURCE_DIR) / "example_runs" / name);
    REQUIRE(!shipped.empty());
    const std::string out = (temp_dir() / name).string();
    const CliRun r = run(recorded_command(shipped) + " -o '" + out + "'");
    INFO(r.err);
    REQUIRE(r.code == 0);
    CHECK(slurp(out) == shipped);
  }
}

TEST_CASE("simulate: -o - writes the same table to stdout, --json summarises", "[apps][simulate]") {
  const std::string args = "simulate protocols/lg3_thermal.json --shots 200 --seed 5";
  const CliRun to_stdout = run(args + " -o -");
  REQUIRE(to_stdout.code == 0);
  const std::string file = (temp_dir() / "t.csv").string();
  const CliRun to_file = run(args + " --json -o '" + file + "'");
  REQUIRE(to_file.code == 0);
  CHECK(slurp(file) == to_stdout.out);
  const auto j = nlohmann::json::parse(to_file.out);
  CHECK(j["rows"] == 200 * 7);  // 3 listed + 4 generated sequences of the LG and NSIT tests
  CHECK(j["rows_per_sequence"]["AB+"] == 200);
  CHECK(j["assumptions"].size() >= 4);
}

TEST_CASE("simulate: --help states the ruined-state assumption and gives an example",
          "[apps][simulate]") {
  const CliRun r = run("simulate --help");
  CHECK(r.code == 0);
  CHECK(r.out.find("fair coin") != std::string::npos);
  CHECK(r.out.find("Examples:") != std::string::npos);
  CHECK(r.out.find("macroreal simulate protocols/lg3_thermal.json") != std::string::npos);
}

TEST_CASE("simulate: an allocation file drives the shots, bad ones exit 2 naming file and field",
          "[apps][simulate]") {
  const std::string good = write_temp(
      "good.json", R"({"format": "macroreal-allocation/1", "shots": {"AB+": 30, "B": 12},
                      "total": 42})");
  CliRun r = run("simulate protocols/lg3_thermal.json --allocation '" + good +
                 "' --seed 1 --json -o '" + (temp_dir() / "a.csv").string() + "'");
  INFO(r.err);
  REQUIRE(r.code == 0);
  const auto j = nlohmann::json::parse(r.out);
  CHECK(j["rows"] == 42);
  CHECK(j["rows_per_sequence"]["AB-"] == 0);

  const std::string unknown = write_temp(
      "unknown.json", R"({"format": "macroreal-allocation/1", "shots": {"AB+": 30, "XYZ": 5}})");
  r = run("simulate protocols/lg3_thermal.json --allocation '" + unknown + "' --seed 1 -o -");
  CHECK(r.code == 2);
  CHECK(r.out.empty());
  CHECK(r.err.find(unknown) != std::string::npos);
  CHECK(r.err.find("shots.XYZ") != std::string::npos);
  CHECK(r.err.find("unknown sequence") != std::string::npos);

  const std::string negative = write_temp(
      "negative.json", R"({"format": "macroreal-allocation/1", "shots": {"AB+": -4}})");
  r = run("simulate protocols/lg3_thermal.json --allocation '" + negative + "' --seed 1 -o -");
  CHECK(r.code == 2);
  CHECK(r.err.find(negative) != std::string::npos);
  CHECK(r.err.find("shots.AB+") != std::string::npos);
  CHECK(r.err.find("non-negative integer") != std::string::npos);

  const std::string format = write_temp("format.json", R"({"shots": {"AB+": 4}})");
  r = run("simulate protocols/lg3_thermal.json --allocation '" + format + "' --seed 1 -o -");
  CHECK(r.code == 2);
  CHECK(r.err.find("format") != std::string::npos);
}

TEST_CASE("simulate: bad command lines exit 2 with the option named", "[apps][simulate]") {
  CliRun r = run("simulate protocols/lg3_thermal.json --shots -5 --seed 1 -o -");
  CHECK(r.code == 2);
  CHECK(r.err.find("--shots") != std::string::npos);
  r = run("simulate protocols/lg3_thermal.json --seed 1 -o -");
  CHECK(r.code == 2);
  CHECK(r.err.find("--allocation") != std::string::npos);
  r = run("simulate protocols/lg3_thermal.json --shots 5 --seed 1 --drift heating:1:2 -o -");
  CHECK(r.code == 2);
  CHECK(r.err.find("unknown noise parameter 'heating'") != std::string::npos);
  r = run("simulate protocols/lg3_thermal.json --shots 5 --seed 1 --counts -o -");
  CHECK(r.code == 2);
  CHECK(r.err.find("--dark-rate") != std::string::npos);
}

namespace {

// The data rows of a table (everything but the # comment lines).
std::string data_rows(const std::string& table) {
  std::string out, line;
  std::istringstream in(table);
  while (std::getline(in, line))
    if (line.empty() || line[0] != '#') out += line + "\n";
  return out;
}

}  // namespace

TEST_CASE("simulate: a calibration file sets the photon-count rates, threshold and error rates",
          "[apps][simulate]") {
  // The calibration file's numbers (example_runs/calibration.json) typed out as options must give
  // the same data rows: the file is read and its values are the ones used.
  const std::string base = "simulate protocols/lg3_thermal.json --shots 4000 --seed 11 --counts ";
  const CliRun from_file = run(base + "--calibration example_runs/calibration.json -o -");
  REQUIRE(from_file.code == 0);
  CHECK(from_file.out.find("calibration example_runs/calibration.json") != std::string::npos);
  const CliRun typed = run(base +
                           "--dark-rate 0.11527436068228764 --bright-rate 9.506092723498426 "
                           "--threshold 2 --dark-read-bright 0.00023421168127465926 "
                           "--bright-read-dark 0.004143103130723084 -o -");
  REQUIRE(typed.code == 0);
  CHECK(data_rows(from_file.out) == data_rows(typed.out));
  // Counts read bright (> 2) come from Poisson(9.506) given X > 2: E[X | X > 2] = 9.538
  // (Johnson, Kemp & Kotz, Univariate Discrete Distributions, 3rd ed. (2005), ch. 4: the
  // truncated Poisson mean, evaluated here by hand), plus at most 2.3e-4 * 9.5 from dark
  // shots above the threshold. Tolerance: 5 standard errors sqrt(9.5 / n).
  double sum = 0.0;
  long n = 0;
  std::istringstream in(data_rows(from_file.out));
  std::string line;
  std::getline(in, line);  // header
  while (std::getline(in, line)) {
    std::istringstream cells(line);
    std::string cell;
    int column = 0;
    while (std::getline(cells, cell, ',')) {
      if (column++ >= 3 && !cell.empty()) {
        const long count = std::stol(cell);
        REQUIRE(count >= 0);
        if (count > 2) {
          sum += static_cast<double>(count);
          ++n;
        }
      }
    }
  }
  REQUIRE(n > 1000);
  CHECK(std::abs(sum / n - 9.538) < 5.0 * std::sqrt(9.5 / n) + 0.003);
  // A calibration file that is not one exits 2 naming the file.
  const std::string bad = write_temp("bad_calibration.json", "{\"format\": \"something-else\"}");
  const CliRun r = run(base + "--calibration '" + bad + "' -o -");
  CHECK(r.code == 2);
  CHECK(r.err.find("bad_calibration.json") != std::string::npos);
}
