// `macroreal plan` as a program: exit codes, the allocation file read back by the library's
// reader, the power-curve CSV, --json keys, and progress silenced when stderr is not a terminal.
#include <algorithm>
#include <filesystem>
#include <string>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "design/allocation_file.hpp"
#include "protocol/protocol_reader.hpp"
#include "support/cli_run.hpp"

namespace fs = std::filesystem;
using nlohmann::json;

namespace {
using macroreal::test_support::slurp;
macroreal::test_support::CliRun run(const std::string& args) {
  return macroreal::test_support::run_macroreal(args, "plan_cli");
}
fs::path scratch() { return macroreal::test_support::scratch_dir("plan_cli"); }
}  // namespace

TEST_CASE("plan: allocation file, power curve and JSON", "[apps]") {
  const fs::path alloc = scratch() / "alloc.json", curve = scratch() / "curve.csv";
  const auto r = run("plan protocols/lg3_prepared_cat_conclusive.json --alpha 0.05 --power 0.8 --json -o '" +
                     alloc.string() + "' --power-curve '" + curve.string() + "' --verify 100 --seed 3");
  REQUIRE(r.code == 0);
  CHECK(r.err.empty());  // stderr is a file here: no progress
  const json j = json::parse(r.out);
  CHECK(j["test"]["kind"] == "lg");
  CHECK(j["planned_power"].get<double>() >= 0.8);
  CHECK(j["verification"]["campaigns"] == 100);
  CHECK(j["verification"]["power"]["method"] == "clopper-pearson");
  const auto protocol = macroreal::read_protocol(std::string(MACROREAL_SOURCE_DIR) +
                                                 "/protocols/lg3_prepared_cat_conclusive.json");
  const auto a = macroreal::read_allocation_file(alloc.string(), protocol);
  long long total = 0;
  for (const auto& [name, n] : a.shots) {
    CHECK(j["shots"][name] == n);
    total += n;
  }
  CHECK(total == j["total_shots"].get<long long>());
  const std::string csv = slurp(curve);
  CHECK(csv.rfind("total_shots,lab_hours,power\n", 0) == 0);
  CHECK(std::count(csv.begin(), csv.end(), '\n') == 41);
}

TEST_CASE("plan: text report, no plan possible, bad input", "[apps]") {
  const auto t = run("plan protocols/lg3_thermal.json --quiet");
  REQUIRE(t.code == 0);
  CHECK_THAT(t.out, Catch::Contains("h of lab time") && Catch::Contains("Assumptions"));
  const auto none = run("plan protocols/lg3_thermal.json --test nsit");
  CHECK(none.code == 1);
  CHECK_THAT(none.out, Catch::Contains("No plan"));
  CHECK(run("plan protocols/lg3_thermal.json --alpha 2").code == 2);
  CHECK(run("plan protocols/lg3_thermal.json --cycle-time-s abc").code == 2);
  CHECK(run("plan protocols/lg3_thermal.json --test equivalence").code == 2);
}
