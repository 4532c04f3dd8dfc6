// `macroreal reach` as a program: exit codes, the JSON keys, bad device files, map shards and
// merge giving the same bytes as one run.
#include <filesystem>
#include <fstream>
#include <string>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "support/cli_run.hpp"

namespace fs = std::filesystem;

namespace {

using Run = macroreal::test_support::CliRun;

fs::path dir() { return macroreal::test_support::scratch_dir("reach_cli"); }
Run run(const std::string& args) {
  return macroreal::test_support::run_macroreal((args.rfind("reach", 0) == 0 ? "" : "reach ") + args,
                                                "reach_cli");
}
std::string demo(const char* n) { return "example_runs/devices/" + std::string(n); }

}  // namespace

TEST_CASE("reach: JSON verdict for the invented membrane demo", "[apps][reach]") {
  const Run r = run(demo("membrane_transmon.json") + " --json");
  REQUIRE(r.code == 0);
  const auto j = nlohmann::json::parse(r.out);
  REQUIRE(j["routes"].size() == 2);
  CHECK(j["routes"][0]["route"] == "thermal input");
  CHECK(j["routes"][0]["can_be_conclusive"] == false);  // symmetric split on a Gaussian input
  CHECK(j["routes"][0]["K"].get<double>() <= 1.0 + 1e-9);
  CHECK(j.contains("elasticities"));
  CHECK(j["elasticities"].size() >= 5);
  CHECK(j.contains("verdict"));
  CHECK(j["test"] == "lg");
}

TEST_CASE("reach: text report, help example, bad files exit 2 naming the field", "[apps][reach]") {
  const Run t = run(demo("trapped_ion_mode.json") + " --test nsit");
  REQUIRE(t.code == 0);
  CHECK(t.out.find("Limiting factor") != std::string::npos);
  CHECK(t.out.find("Assumptions") != std::string::npos);
  const Run h = run("reach --help");
  CHECK(h.out.find("Examples:") != std::string::npos);
  const fs::path bad = dir() / "bad.json";
  std::ofstream(bad) << R"({"format": "macroreal-device/1", "quality_factor": -3})";
  const Run b = run("reach '" + bad.string() + "'");
  CHECK(b.code == 2);
  CHECK(b.err.find("quality_factor") != std::string::npos);
  CHECK(b.out.empty());
}

TEST_CASE("reach: map shards merged give the bytes of one run", "[apps][reach]") {
  const std::string m = demo("membrane_map.json") + " --map bath_temperature_k,coupling_g_over_2pi_hz";
  const fs::path whole = dir() / "whole.csv";
  REQUIRE(run("reach " + m + " --threads 2 -o '" + whole.string() + "'").code == 0);
  std::string parts;
  for (int k = 1; k <= 2; ++k) {
    const fs::path p = dir() / ("part" + std::to_string(k) + ".csv");
    REQUIRE(run("reach " + m + " --threads 1 --shard " + std::to_string(k) + "/2 -o '" +
                p.string() + "'").code == 0);
    parts += " '" + p.string() + "'";
  }
  const Run merged = run("reach --merge" + parts);
  REQUIRE(merged.code == 0);
  CHECK(merged.out == macroreal::test_support::slurp(whole));
  CHECK(merged.out.find("hours_to_conclusive,feasible,boundary") != std::string::npos);
}

TEST_CASE("reach: --map --figures writes the map figure, --figures alone is refused",
          "[apps][reach]") {
  const fs::path figs = dir() / "figs";
  const Run r = run("reach " + demo("trapped_ion_map.json") +
                    " --map occupation_after_cooling,coupling_g_over_2pi_hz --threads 2 --figures '" +
                    figs.string() + "'");
  REQUIRE(r.code == 0);
  CHECK(r.out.find("hours_to_conclusive,feasible,boundary") != std::string::npos);
  CHECK(fs::file_size(figs / "reach_map.svg") > 1000);
  CHECK(fs::file_size(figs / "reach_map.png") > 1000);
  // A map with no conclusive point: the CSV, no figure, a note on stderr, success.
  const fs::path none = dir() / "none";
  const Run empty = run("reach " + demo("membrane_map.json") +
                        " --map bath_temperature_k,coupling_g_over_2pi_hz --figures '" +
                        none.string() + "'");
  CHECK(empty.code == 0);
  CHECK(empty.err.find("No figure written") != std::string::npos);
  CHECK_FALSE(fs::exists(none / "reach_map.png"));
  const Run bad = run("reach " + demo("trapped_ion_mode.json") + " --figures '" + figs.string() + "'");
  CHECK(bad.code == 2);
  CHECK(bad.err.find("--figures") != std::string::npos);
}

TEST_CASE("reach: the shipped demo outputs are reproduced byte for byte", "[apps][reach]") {
  // Regression and reproducibility check of our own output (example_runs/devices/README.md):
  // the command is the first line of each shipped file ("$ macroreal ...").
  for (const char* f : {"reach_trapped_ion.txt", "reach_trapped_ion_map.txt"}) {
    const std::string shipped = macroreal::test_support::slurp(
        fs::path(MACROREAL_SOURCE_DIR) / "example_runs/devices" / f);
    const std::string first = shipped.substr(0, shipped.find('\n'));
    INFO(f);
    REQUIRE(first.rfind("$ macroreal ", 0) == 0);
    const Run r = run(first.substr(std::string("$ macroreal ").size()));
    REQUIRE(r.code == 0);
    CHECK(first + "\n" + r.out == shipped);
  }
}
