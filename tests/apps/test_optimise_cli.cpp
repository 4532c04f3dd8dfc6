// `macroreal optimise` as a program: exit codes, the optimised protocol file read back by
// `predict`, the JSON keys, and a bad option named in the message.
#include <filesystem>
#include <string>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "support/cli_run.hpp"

namespace fs = std::filesystem;
using nlohmann::json;

namespace {

using Run = macroreal::test_support::CliRun;

fs::path temp_dir() { return macroreal::test_support::scratch_dir("optimise_cli"); }

Run run(const std::string& args) {
  return macroreal::test_support::run_macroreal(args, "optimise_cli");
}

}  // namespace

TEST_CASE("optimise CLI: report, optimised file and predict agree", "[apps]") {
  const fs::path out = temp_dir() / "best.json";
  const Run r = run("optimise protocols/lg3_thermal.json --objective K --free B.angle,C.angle "
                    "--max-evaluations 600 --json -o '" + out.string() + "'");
  INFO(r.err);
  REQUIRE(r.code == 0);
  const json j = json::parse(r.out);
  CHECK(j["objective"]["kind"] == "K");
  CHECK(j["tolerance"].size() == 2);
  CHECK(j["settings"].size() == 2);
  CHECK(j["search"]["evaluations"].get<long>() > 0);
  const double K = j["figures"]["K"].get<double>();
  CHECK(j["figures"]["variance_per_shot"].get<double>() > 0.0);
  // predict on the written file gives the same K (an independent path: file -> reader -> engine).
  const Run p = run("predict --json '" + out.string() + "'");
  REQUIRE(p.code == 0);
  const json pj = json::parse(p.out);
  CHECK(std::abs(pj["tests"][0]["K"].get<double>() - K) < 1e-9);
  // The optimum is at least the file's own K (1.244144, protocols/README.md).
  CHECK(K >= 1.244144 - 1e-6);
}

TEST_CASE("optimise CLI: text report and bad input", "[apps]") {
  const Run t = run("optimise protocols/lg3_thermal.json --objective significance "
                    "--free B.phase,C.phase --max-evaluations 400");
  INFO(t.err);
  REQUIRE(t.code == 0);
  CHECK(t.out.find("Tolerance") != std::string::npos);
  CHECK(t.out.find("per-shot variance") != std::string::npos);
  CHECK(t.out.find("kicked classical model") != std::string::npos);
  const Run bad = run("optimise protocols/lg3_thermal.json --free gamma");
  CHECK(bad.code == 2);
  CHECK(bad.err.find("gamma") != std::string::npos);
  CHECK(bad.out.empty());
  const Run badtest = run("optimise protocols/lg3_thermal.json --test 9");
  CHECK(badtest.code == 2);
  CHECK(badtest.err.find("--test 9") != std::string::npos);
}
