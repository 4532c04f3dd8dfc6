// `macroreal predict` as a program: exit codes, streams, JSON keys of DESIGN.md section 8.
// Runs the real executable (MACROREAL_EXE) through the shell with stdout and stderr captured
// in separate files.
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "support/cli_run.hpp"

namespace fs = std::filesystem;
using nlohmann::json;

namespace {

using Run = macroreal::test_support::CliRun;
using macroreal::test_support::slurp;

fs::path temp_dir() { return macroreal::test_support::scratch_dir("predict_cli"); }

// `args` is appended to the command line as written (the caller quotes).
Run run(const std::string& args, const std::string& stdin_file = "") {
  return macroreal::test_support::run_macroreal(args, "predict_cli", stdin_file, temp_dir());
}

std::string shipped(const char* name) {
  return std::string(MACROREAL_SOURCE_DIR) + "/protocols/" + name;
}

fs::path write_bad(const std::string& name, const json& doc) {
  const fs::path p = temp_dir() / name;
  std::ofstream(p) << doc.dump(2);
  return p;
}

json thermal_doc() {
  std::ifstream in(shipped("lg3_thermal.json"));
  return json::parse(in);
}

}  // namespace

TEST_CASE("predict CLI: text report of the shipped demo", "[apps]") {
  const Run r = run("predict '" + shipped("lg3_thermal.json") + "'");
  INFO(r.err);
  CHECK(r.code == 0);
  CHECK(r.err.empty());
  CHECK(r.out.find("Leggett-Garg A B C") != std::string::npos);
  CHECK(r.out.find("classical kicked") != std::string::npos);
  CHECK(r.out.find("verdict:") != std::string::npos);
  CHECK(r.out.find("Cautions") != std::string::npos);
  // Deterministic: a second run gives the same bytes.
  CHECK(run("predict '" + shipped("lg3_thermal.json") + "'").out == r.out);
}

TEST_CASE("predict CLI: --json has the keys of DESIGN.md section 8", "[apps]") {
  const Run r = run("predict --json '" + shipped("lg3_thermal.json") + "'");
  INFO(r.err);
  REQUIRE(r.code == 0);
  const json j = json::parse(r.out);
  REQUIRE(j["probabilities"].is_array());
  REQUIRE_FALSE(j["probabilities"].empty());
  for (const auto& p : j["probabilities"]) {
    CHECK(p.contains("sequence"));
    CHECK(p["steps"].is_array());
    CHECK(p["outcomes"].is_string());
    CHECK(p["p"].is_number());
  }
  REQUIRE(j["tests"].size() == 2);
  const json& lg = j["tests"][0];
  CHECK(lg["kind"] == "leggett-garg");
  CHECK(lg["order"] == json::array({"A", "B", "C"}));
  CHECK(lg["K"].is_number());
  for (const char* pair : {"AB", "BC", "AC"}) CHECK(lg["correlators"][pair].is_number());
  CHECK(lg["K_classical"].is_number());
  CHECK(lg["K_classical_kicked"].is_number());
  CHECK(lg["explained_by_classical_model"].is_boolean());
  const json& ns = j["tests"][1];
  CHECK(ns["kind"] == "nsit");
  CHECK(ns["from"] == "A");
  CHECK(ns["to"] == "B");
  CHECK(ns["S"].is_number());
  CHECK(j["engine"]["name"] == "weyl");
}

TEST_CASE("predict CLI: the cat protocol gives null classical values", "[apps]") {
  const Run r = run("predict --json '" + shipped("lg3_prepared_cat_conclusive.json") + "'");
  REQUIRE(r.code == 0);
  const json j = json::parse(r.out);
  CHECK(j["tests"][0]["K_classical"].is_null());
  CHECK(j["tests"][0]["K_classical_kicked"].is_null());
}

TEST_CASE("predict CLI: standard input and -o", "[apps]") {
  const Run piped = run("predict --json -", shipped("lg3_thermal.json"));
  INFO(piped.err);
  REQUIRE(piped.code == 0);
  CHECK(json::parse(piped.out)["protocol"] == "<stdin>");

  const fs::path out = temp_dir() / "prediction.json";
  const Run to_file = run("predict --json -o '" + out.string() + "' '" +
                          shipped("lg3_thermal.json") + "'");
  REQUIRE(to_file.code == 0);
  CHECK(to_file.out.empty());
  CHECK(json::parse(slurp(out))["tests"].size() == 2);
}

TEST_CASE("predict CLI: bad input exits 2 with the file and path on stderr, nothing on stdout",
          "[apps]") {
  SECTION("contrast out of range") {
    json d = thermal_doc();
    d["measurements"]["A"]["contrast"] = 1.2;
    const fs::path p = write_bad("bad_contrast.json", d);
    for (const char* flag : {"", "--json "}) {
      const Run r = run(std::string("predict ") + flag + "'" + p.string() + "'");
      CHECK(r.code == 2);
      CHECK(r.out.empty());
      CHECK(r.err.find(p.string()) != std::string::npos);
      CHECK(r.err.find("measurements.A.contrast") != std::string::npos);
      CHECK(r.err.find("contrast = 1.2, but must be in [0, 1]") != std::string::npos);
    }
  }
  SECTION("dark_is sign") {
    json d = thermal_doc();
    d["sequences"][1]["dark_is"][0] = "dark";
    const fs::path p = write_bad("bad_dark.json", d);
    const Run r = run("predict '" + p.string() + "'");
    CHECK(r.code == 2);
    CHECK(r.out.empty());
    CHECK(r.err.find("sequences[1].dark_is[0]") != std::string::npos);
  }
  SECTION("JSON syntax error") {
    const fs::path p = temp_dir() / "broken.json";
    std::ofstream(p) << "{\"format\": \"macroreal-protocol/1\",\n \"title\": ]";
    const Run r = run("predict '" + p.string() + "'");
    CHECK(r.code == 2);
    CHECK(r.out.empty());
    CHECK(r.err.find("line 2") != std::string::npos);
  }
  SECTION("missing state, missing file, density matrix") {
    json d = thermal_doc();
    d.erase("state");
    Run r = run("predict '" + write_bad("no_state.json", d).string() + "'");
    CHECK(r.code == 2);
    CHECK(r.out.empty());
    CHECK(r.err.find("state") != std::string::npos);
    r = run("predict /nonexistent/protocol.json");
    CHECK(r.code == 2);
    CHECK(r.err.find("/nonexistent/protocol.json") != std::string::npos);
    d = thermal_doc();
    d["state"] = {{"kind", "density_matrix"}, {"file", "no_such_rho.json"}};
    r = run("predict '" + write_bad("rho.json", d).string() + "'");
    CHECK(r.code == 2);
    CHECK(r.out.empty());
    CHECK(r.err.find("state.file") != std::string::npos);
    CHECK(r.err.find("no_such_rho.json") != std::string::npos);
    CHECK(r.err.find("cannot open") != std::string::npos);
  }
  SECTION("unknown engine") {
    const Run r = run("predict --engine magic '" + shipped("lg3_thermal.json") + "'");
    CHECK(r.code == 2);
    CHECK(r.out.empty());
  }
  SECTION("help names the example") {
    const Run r = run("predict --help");
    CHECK(r.code == 0);
    CHECK(r.out.find("macroreal predict protocols/lg3_thermal.json") != std::string::npos);
  }
}
