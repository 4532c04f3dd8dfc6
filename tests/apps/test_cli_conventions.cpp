// The command-line conventions every `macroreal` command keeps (DEVELOPERS.md, "Command-line
// conventions"): --help with examples and exit codes, --version, exit codes 0 / 1 (a check
// asked for failed) / 2 (bad input), "-" for standard input and output, --json.
#include <filesystem>
#include <fstream>
#include <functional>
#include <regex>
#include <string>
#include <vector>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "support/cli_run.hpp"

namespace fs = std::filesystem;
using nlohmann::json;

namespace {

using macroreal::test_support::CliRun;
using macroreal::test_support::slurp;

CliRun run(const std::string& args, const std::string& stdin_file = "") {
  return macroreal::test_support::run_macroreal(args, "cli_conventions", stdin_file);
}
fs::path scratch() { return macroreal::test_support::scratch_dir("cli_conventions"); }
std::string src(const std::string& relative) {
  return std::string(MACROREAL_SOURCE_DIR) + "/" + relative;
}
std::string q(const fs::path& p) { return "'" + p.string() + "'"; }

const std::vector<std::string> kCommands = {"optimise", "predict", "plan",   "simulate",
                                            "analyse",  "calibrate", "reach"};

// The version the build declares, read from the top-level CMakeLists.txt's project() line.
std::string project_version() {
  const std::string text = slurp(src("CMakeLists.txt"));
  std::smatch m;
  REQUIRE(std::regex_search(text, m, std::regex(R"(project\(macroreal VERSION ([0-9.]+))")));
  return m[1];
}

}  // namespace

TEST_CASE("CLI conventions: every command answers --help with examples and exit codes",
          "[apps][cli]") {
  const CliRun top = run("--help");
  REQUIRE(top.code == 0);
  for (const auto& c : kCommands) {
    INFO("command " << c);
    CHECK_THAT(top.out, Catch::Contains(c));
    const CliRun h = run(c + " --help");
    CHECK(h.code == 0);
    CHECK_THAT(h.out, Catch::Contains("Examples:") && Catch::Contains("Exit codes:") &&
                          Catch::Contains("macroreal " + c));
  }
}

TEST_CASE("CLI conventions: --version prints the project version, also after a command",
          "[apps][cli]") {
  const std::string expected = "macroreal " + project_version();
  const CliRun top = run("--version");
  CHECK(top.code == 0);
  CHECK_THAT(top.out, Catch::StartsWith(expected));
  for (const auto& c : kCommands) {
    INFO("command " << c);
    const CliRun v = run(c + " --version");
    CHECK(v.code == 0);
    CHECK_THAT(v.out, Catch::StartsWith(expected));
  }
}

TEST_CASE("CLI conventions: bad input exits 2 naming the file, nothing on stdout", "[apps][cli]") {
  const std::string missing = (scratch() / "no_such_file.json").string();
  const std::vector<std::string> lines = {
      "optimise '" + missing + "'",
      "predict '" + missing + "'",
      "plan '" + missing + "'",
      "simulate '" + missing + "' --shots 10 --seed 1 -o -",
      "analyse '" + missing + "' --protocol protocols/lg3_thermal.json",
      "calibrate '" + missing + "'",
      "reach '" + missing + "'",
  };
  for (const auto& l : lines) {
    INFO(l);
    const CliRun r = run(l);
    CHECK(r.code == 2);
    CHECK_THAT(r.err, Catch::Contains("no_such_file.json"));
    CHECK(r.out.empty());
  }
  for (const auto& c : kCommands) {  // an unknown option is bad input too
    INFO("command " << c);
    CHECK(run(c + " --no-such-option-here").code == 2);
  }
  CHECK(run("").code == 2);  // no command at all
  // Both inputs of analyse cannot come from one standard input.
  CHECK(run("analyse - --protocol -", src("protocols/lg3_thermal.json")).code == 2);
}

TEST_CASE("CLI conventions: analyse --check exits 1 when a test asked for does not reach the level",
          "[apps][cli]") {
  // The invented thermal demo: K = 1.244 is far above 1 (LG rejected), but NSIT A->B is 0 in
  // the model that drew the table (example_runs/README.md), so checking it fails.
  const std::string base =
      "analyse example_runs/lg3_thermal_runs.csv --protocol protocols/lg3_thermal.json "
      "--bootstrap 200";
  const CliRun plain = run(base);
  CHECK(plain.code == 0);  // without --check the verdict does not touch the exit code
  const CliRun all = run(base + " --check all");
  CHECK(all.code == 1);
  CHECK(all.out == plain.out);  // the report is the same
  CHECK_THAT(all.err, Catch::Contains("check failed") && Catch::Contains("NSIT A->B"));
  const CliRun nsit = run(base + " --check 'NSIT A->B'");
  CHECK(nsit.code == 1);
  const CliRun lg = run(base + " --check lg");
  CHECK(lg.code == 0);
  CHECK_THAT(lg.err, Catch::Contains("check passed: LG ABC"));
  CHECK(run(base + " --check 'LG ABC'").code == 0);
  // A positional after --check stays a positional.
  CHECK(run("analyse --check lg example_runs/lg3_thermal_runs.csv --protocol "
            "protocols/lg3_thermal.json --bootstrap 200")
            .code == 0);
  const CliRun unknown = run(base + " --check 'NSIT C->A'");
  CHECK(unknown.code == 2);
  CHECK_THAT(unknown.err, Catch::Contains("NSIT C->A") && Catch::Contains("LG ABC"));
}

TEST_CASE("CLI conventions: reach --check exits 1 when no conclusive test fits in the time",
          "[apps][cli]") {
  json d = json::parse(slurp(src("example_runs/demo/device.json")));
  const CliRun ok = run("reach example_runs/demo/device.json --check");
  CHECK(ok.code == 0);
  // The same device with one minute of lab time: no conclusive test fits.
  d["measurement_time_available_h"] = 1.0 / 60.0;
  const fs::path short_time = scratch() / "short_time_device.json";
  std::ofstream(short_time) << d.dump(2);
  const CliRun plain = run("reach " + q(short_time));
  CHECK(plain.code == 0);
  const CliRun checked = run("reach " + q(short_time) + " --check");
  CHECK(checked.code == 1);
  CHECK(checked.out == plain.out);
  CHECK_THAT(checked.err, Catch::Contains("no conclusive test"));
  CHECK(run("reach example_runs/devices/membrane_map.json --map bath_temperature_k,quality_factor "
            "--check")
            .code == 2);
}

TEST_CASE("CLI conventions: plan exits 1 when no number of shots reaches the power",
          "[apps][cli]") {
  // lg3_thermal predicts S = 0 for NSIT A->B: no campaign can detect it.
  const CliRun r = run("plan protocols/lg3_thermal.json --test nsit");
  CHECK(r.code == 1);
}

TEST_CASE("CLI conventions: - reads standard input where a command reads a file",
          "[apps][cli]") {
  // Each pair: the command on the file and the same command with "-" and the file on stdin.
  // Reports name their input, so "<stdin>" replaces the path before the comparison.
  struct Case {
    std::string with_file, with_stdin, file;
  };
  const std::string thermal = "protocols/lg3_thermal.json";
  const std::vector<Case> cases = {
      {"predict " + thermal + " --json", "predict - --json", thermal},
      {"plan " + thermal + " --json", "plan - --json", thermal},
      {"optimise " + thermal + " --max-evaluations 300 --json",
       "optimise - --max-evaluations 300 --json", thermal},
      {"simulate " + thermal + " --shots 20 --seed 3 -o -", "simulate - --shots 20 --seed 3 -o -",
       thermal},
      {"analyse example_runs/lg3_thermal_counts.json --protocol " + thermal + " --bootstrap 200 --json",
       "analyse - --counts --protocol " + thermal + " --bootstrap 200 --json",
       "example_runs/lg3_thermal_counts.json"},
      {"analyse example_runs/lg3_thermal_counts.json --protocol " + thermal + " --bootstrap 200 --json",
       "analyse example_runs/lg3_thermal_counts.json --protocol - --bootstrap 200 --json", thermal},
      {"calibrate example_runs/calibration_counts.csv --bootstrap 100 --json",
       "calibrate - --bootstrap 100 --json", "example_runs/calibration_counts.csv"},
      {"reach example_runs/demo/device.json --json", "reach - --json", "example_runs/demo/device.json"},
  };
  for (const auto& c : cases) {
    INFO(c.with_stdin);
    const CliRun f = run(c.with_file);
    const CliRun s = run(c.with_stdin, src(c.file));
    REQUIRE(f.code == 0);
    REQUIRE(s.code == 0);
    REQUIRE(!s.out.empty());
    std::string expected = f.out;
    for (std::size_t at; (at = expected.find(c.file)) != std::string::npos;)
      expected.replace(at, c.file.size(), "<stdin>");
    std::string got = s.out;
    if (c.with_stdin.rfind("simulate", 0) == 0) {
      // The table's # lines hold the checksum of the same bytes and the command; the rows
      // must be identical.
      const auto rows = [](const std::string& t) { return t.substr(t.find("\nsequence,")); };
      CHECK(rows(got) == rows(f.out));
    } else if (got != expected) {
      // Some reports print the input label in a field of their own: compare the JSON
      // objects with every string equal to the label or "<stdin>" blanked.
      std::function<void(json&)> blank = [&](json& j) {
        if (j.is_string() && (j == c.file || j == "<stdin>" || j == "-")) j = "";
        for (auto& v : j) blank(v);
      };
      json a = json::parse(f.out), b = json::parse(got);
      blank(a);
      blank(b);
      CHECK(a == b);
    }
  }
}

TEST_CASE("CLI conventions: -o - writes to standard output what -o FILE writes to the file",
          "[apps][cli]") {
  const std::string thermal = "protocols/lg3_thermal.json";
  const std::vector<std::pair<std::string, std::string>> cases = {
      {"predict " + thermal, "predict"},
      {"simulate " + thermal + " --shots 20 --seed 3", "simulate"},
      {"analyse example_runs/lg3_thermal_counts.json --protocol " + thermal + " --bootstrap 200",
       "analyse"},
      {"calibrate example_runs/calibration_counts.csv --bootstrap 100", "calibrate"},
      {"reach example_runs/demo/device.json", "reach"},
      {"plan " + thermal, "plan"},
      {"optimise " + thermal + " --max-evaluations 300", "optimise"},
  };
  for (const auto& [args, name] : cases) {
    INFO(args);
    const fs::path file = scratch() / (name + "_out.txt");
    const CliRun to_file = run(args + " -o " + q(file));
    const CliRun to_stdout = run(args + " -o -");
    REQUIRE(to_file.code == 0);
    REQUIRE(to_stdout.code == 0);
    CHECK(to_stdout.out == slurp(file));
    if (name == "plan" || name == "optimise")  // their -o is a second file: the report moves
      CHECK(to_stdout.err.find(name == "plan" ? "Assumptions" : "K") != std::string::npos);
  }
}

TEST_CASE("CLI conventions: --json prints one JSON object on every command", "[apps][cli]") {
  const std::string thermal = "protocols/lg3_thermal.json";
  const fs::path table = scratch() / "json_runs.csv";
  const std::vector<std::string> lines = {
      "optimise " + thermal + " --max-evaluations 300 --json",
      "predict " + thermal + " --json",
      "plan " + thermal + " --json",
      "simulate " + thermal + " --shots 20 --seed 3 --json -o " + q(table),
      "analyse example_runs/lg3_thermal_counts.json --protocol " + thermal + " --bootstrap 200 --json",
      "calibrate example_runs/calibration_counts.csv --bootstrap 100 --json",
      "reach example_runs/demo/device.json --json",
  };
  for (const auto& l : lines) {
    INFO(l);
    const CliRun r = run(l);
    REQUIRE(r.code == 0);
    json j;
    REQUIRE_NOTHROW(j = json::parse(r.out));
    CHECK(j.is_object());
  }
}
