// `macroreal predict` and the engine choice (default auto): which engine ran and why, in the
// text and JSON output; tabulated density-matrix states read relative to the protocol file;
// bad matrix files exit 2 with the matrix file's own message.
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "support/cli_run.hpp"
#include "support/compare.hpp"

namespace fs = std::filesystem;
using nlohmann::json;

namespace {

using Run = macroreal::test_support::CliRun;
using macroreal::test_support::slurp;

fs::path temp_dir() { return macroreal::test_support::scratch_dir("predict_engine"); }

// Runs from `cwd` (the temporary directory unless given) so that relative matrix paths are
// resolved against the protocol's folder, not the working directory.
Run run(const std::string& args, const fs::path& cwd = {}) {
  return macroreal::test_support::run_macroreal(args, "predict_engine", "",
                                                cwd.empty() ? temp_dir() : cwd);
}

std::string shipped(const char* name) {
  return std::string(MACROREAL_SOURCE_DIR) + "/protocols/" + name;
}

json shipped_doc(const char* name) {
  std::ifstream in(shipped(name));
  return json::parse(in);
}

fs::path write_file(const fs::path& p, const std::string& text) {
  fs::create_directories(p.parent_path());
  std::ofstream(p, std::ios::binary) << text;
  return p;
}

double probability_of(const json& j, const std::string& sequence, const std::string& outcomes) {
  for (const auto& p : j["probabilities"])
    if (p["sequence"] == sequence && p["outcomes"] == outcomes) return p["p"].get<double>();
  FAIL("no probability for " << sequence << " " << outcomes);
  return 0.0;
}

}  // namespace

TEST_CASE("predict CLI: a tabulated density matrix runs on the Fock engine automatically",
          "[apps][engine]") {
  const std::string file = shipped("lg3_tomography_fock1.json");
  const Run text = run("predict '" + file + "'");
  INFO(text.err);
  REQUIRE(text.code == 0);
  CHECK(text.out.find("engine    fock") != std::string::npos);
  CHECK(text.out.find("chosen automatically: the state is a tabulated density matrix") !=
        std::string::npos);
  CHECK(text.out.find("fock1_tomography.csv") != std::string::npos);

  const Run r = run("predict --json '" + file + "'");
  REQUIRE(r.code == 0);
  const json j = json::parse(r.out);
  CHECK(j["engine"]["name"] == "fock");
  CHECK(j["engine"]["requested"] == "auto");
  CHECK(j["engine"]["choice_reason"].get<std::string>().find("density matrix") !=
        std::string::npos);
  // B measured alone: P(+) = 1/2 [1 + Re(e^{i phi} chi(beta))] (DESIGN.md section 2), with
  // heating over t: chi -> chi exp(-ndot t |beta|^2). For rho = sum_n p_n |n><n| + c (|0><1| +
  // |1><0|): chi(beta) = e^{-|beta|^2/2} [sum_n p_n L_n(|beta|^2) + c (beta - conj(beta))],
  // from <n|D(beta)|n> = e^{-|b|^2/2} L_n(|b|^2), <1|D|0> = beta e^{-|b|^2/2},
  // <0|D|1> = -conj(beta) e^{-|b|^2/2} (Cahill & Glauber, Phys. Rev. 177, 1857 (1969)).
  // The file: p = (0.05, 0.92, 0.03), c = 0.02; B: beta = i (|beta| = 1 at 90 deg),
  // phi = 270 deg, t = 50 us, ndot = 20/s. L_0(1) = 1, L_1(1) = 0, L_2(1) = -1/2.
  // The diagonal part sum_n p_n L_n(1) = 0.035 is real and drops out with e^{i phi} = -i:
  // Re(-i (0.035 + 2 i c)) = 2 c.
  const double coh_im = 0.02 * 2.0;
  const double expected = 0.5 * (1.0 + std::exp(-0.5) * std::exp(-20.0 * 50e-6) * coh_im);
  CHECK_CLOSE(probability_of(j, "B", "+"), expected, 1e-12, 1e-12);

  // The Weyl engine evaluates the same state through chi: both engines agree.
  const Run w = run("predict --json --engine weyl '" + file + "'");
  REQUIRE(w.code == 0);
  const json jw = json::parse(w.out);
  CHECK(jw["engine"]["name"] == "weyl");
  CHECK(jw["engine"]["requested"] == "weyl");
  CHECK_CLOSE(jw["tests"][0]["K"].get<double>(), j["tests"][0]["K"].get<double>(), 1e-10, 0);
}

TEST_CASE("predict CLI: density-matrix files are read relative to the protocol, also in "
          "prepared.from, in JSON and CSV",
          "[apps][engine]") {
  const fs::path dir = temp_dir() / "relative";
  // The same invented matrix in both formats (fock/density_matrix_state.hpp).
  write_file(dir / "rho.csv", "0,0,0.05\n0,1,0.02\n1,0,0.02\n1,1,0.92\n2,2,0.03\n");
  write_file(dir / "rho.json",
             R"({"format": "macroreal-density-matrix/1", "dimension": 3,
                 "real": [[0.05, 0.02, 0], [0.02, 0.92, 0], [0, 0, 0.03]]})");
  json d = shipped_doc("lg3_tomography_fock1.json");
  d["state"]["file"] = "rho.csv";
  write_file(dir / "p_csv.json", d.dump());
  d["state"]["file"] = "rho.json";
  write_file(dir / "p_json.json", d.dump());
  // Run from the system temporary directory, not the protocol's folder.
  const fs::path elsewhere = fs::temp_directory_path();
  const Run a = run("predict --json '" + (dir / "p_csv.json").string() + "'", elsewhere);
  const Run b = run("predict --json '" + (dir / "p_json.json").string() + "'", elsewhere);
  INFO(a.err << b.err);
  REQUIRE(a.code == 0);
  REQUIRE(b.code == 0);
  const json ja = json::parse(a.out), jb = json::parse(b.out);
  CHECK(ja["tests"][0]["K"].get<double>() == jb["tests"][0]["K"].get<double>());

  // prepared.from: a tabulated state sent through a post-selected measurement.
  json prep = shipped_doc("lg3_tomography_fock1.json");
  prep["state"] = {{"kind", "prepared"},
                   {"from", {{"kind", "density_matrix"}, {"file", "rho.csv"}}},
                   {"steps", json::array({{{"beta", {1.0, 0.0}}}})},
                   {"outcomes", "+"}};
  write_file(dir / "p_prepared.json", prep.dump());
  const Run c = run("predict --json '" + (dir / "p_prepared.json").string() + "'", elsewhere);
  INFO(c.err);
  REQUIRE(c.code == 0);
  const json jc = json::parse(c.out);
  CHECK(jc["engine"]["choice_reason"].is_string());
  CHECK(jc["tests"][0]["K"].is_number());
  // A bad matrix inside prepared.from names that path.
  write_file(dir / "negative.csv", "0,0,1.1\n1,1,-0.1\n");
  prep["state"]["from"]["file"] = "negative.csv";
  write_file(dir / "p_prepared_bad.json", prep.dump());
  const Run e = run("predict '" + (dir / "p_prepared_bad.json").string() + "'", elsewhere);
  CHECK(e.code == 2);
  CHECK(e.err.find("state.from.file") != std::string::npos);
}

TEST_CASE("predict CLI: bad density-matrix files exit 2 with the matrix file's message",
          "[apps][engine]") {
  const fs::path dir = temp_dir() / "bad";
  json d = shipped_doc("lg3_tomography_fock1.json");
  const auto check_bad = [&](const std::string& name, const std::string& matrix,
                             const std::string& expected) {
    write_file(dir / name, matrix);
    d["state"]["file"] = name;
    const fs::path proto = write_file(dir / ("protocol_" + name + ".json"), d.dump());
    const Run r = run("predict '" + proto.string() + "'");
    INFO(name << ": " << r.err);
    CHECK(r.code == 2);
    CHECK(r.out.empty());
    CHECK(r.err.find(proto.string()) != std::string::npos);   // the protocol file
    CHECK(r.err.find("state.file") != std::string::npos);     // the JSON path
    CHECK(r.err.find(name) != std::string::npos);             // the matrix file
    CHECK(r.err.find(expected) != std::string::npos);
  };
  // Eigenvalues of diag(1.2, -0.2) are 1.2 and -0.2 (a diagonal matrix, common practice, no
  // source): the message gives the smallest one.
  check_bad("negative.csv", "0,0,1.2\n1,1,-0.2\n", "smallest eigenvalue = -0.2");
  // [[0.5, 0.7], [0.7, 0.5]] has eigenvalues 0.5 +/- 0.7, the smallest -0.2 (2x2 symmetric,
  // common practice, no source).
  check_bad("offdiag.json",
            R"({"format": "macroreal-density-matrix/1", "dimension": 2,
                "real": [[0.5, 0.7], [0.7, 0.5]]})",
            "smallest eigenvalue = -0.2");
  check_bad("trace.csv", "0,0,0.5\n1,1,0.4\n", "trace");
  check_bad("hermitian.csv", "0,0,0.5\n1,1,0.5\n0,1,0.1\n1,0,0.3\n", "not Hermitian");
  check_bad("matrix.txt", "0,0,1\n", ".json or .csv");
}

TEST_CASE("predict CLI: the automatic choice picks the Weyl engine for the thermal demo and "
          "says so",
          "[apps][engine]") {
  const Run r = run("predict '" + shipped("lg3_thermal.json") + "'");
  INFO(r.err);
  REQUIRE(r.code == 0);
  CHECK(r.out.find("engine    weyl") != std::string::npos);
  CHECK(r.out.find("chosen automatically: the state's characteristic function is known") !=
        std::string::npos);
  const Run j = run("predict --json '" + shipped("lg3_thermal.json") + "'");
  REQUIRE(j.code == 0);
  const json doc = json::parse(j.out);
  CHECK(doc["engine"]["name"] == "weyl");
  CHECK(doc["engine"]["requested"] == "auto");
  CHECK(doc["engine"]["choice_reason"].get<std::string>().find("no truncation") !=
        std::string::npos);
  // An explicit request is reported as such.
  const Run f = run("predict '" + shipped("lg3_thermal.json") + "' --engine fock");
  REQUIRE(f.code == 0);
  CHECK(f.out.find("engine    fock") != std::string::npos);
  CHECK(f.out.find("not automatic: requested (--engine fock)") != std::string::npos);
}

TEST_CASE("predict CLI: dephasing runs on the Weyl quadrature or switches to Fock with the "
          "reason",
          "[apps][engine]") {
  SECTION("three times: two intervals fit the Weyl angle quadrature") {
    json d = shipped_doc("lg3_thermal.json");
    d["noise"]["dephasing_rate_per_s"] = 200.0;
    const fs::path p = write_file(temp_dir() / "dephasing3.json", d.dump());
    const Run r = run("predict --json '" + p.string() + "'");
    INFO(r.err);
    REQUIRE(r.code == 0);
    const json j = json::parse(r.out);
    CHECK(j["engine"]["name"] == "weyl");
    const std::string why = j["engine"]["choice_reason"];
    CHECK(why.find("Markovian dephasing") != std::string::npos);
    CHECK(why.find("Gauss-Hermite") != std::string::npos);
    CHECK(j["engine"]["hermite_nodes"].get<int>() > 0);
    // Two intervals; the thermal state is rotation invariant, so the Weyl engine may reduce
    // them to relative angles (phase_space/weyl_engine.hpp): at least one dimension.
    CHECK(j["engine"]["rotation_dimensions"].get<int>() >= 1);
  }
  SECTION("a listed five-step sequence: too many angles, Fock engine") {
    json d = shipped_doc("lg4_ntime.json");
    // Five measurements from 100 us on, and a sequence that runs all of them: five intervals
    // (the first from the end of preparation), a 5-dimensional product rule of
    // (2 x 12)^5 evaluations, beyond the Weyl engine's limit of 2e6. Small |beta| keeps the
    // Fock cutoff (and the test) small.
    const char* names[] = {"A", "B", "C", "D", "E"};
    d["measurements"]["E"] = {{"beta_polar", {0.5, 90.0}}, {"split", "one-sided"}};
    for (int k = 0; k < 5; ++k) {
      d["measurements"][names[k]]["time_s"] = 100e-6 * (k + 1);
      d["measurements"][names[k]]["beta_polar"][0] = 0.5;
    }
    d["noise"]["dephasing_rate_per_s"] = 200.0;
    d["sequences"] = json::array({{{"name", "ABCDE"},
                                   {"steps", {"A", "B", "C", "D", "E"}},
                                   {"dark_is", {"+", "+", "+", "+", "+"}}}});
    d["tests"] = json::array({{{"kind", "leggett-garg"}, {"order", {"A", "B", "C", "D", "E"}}}});
    const fs::path p = write_file(temp_dir() / "dephasing5.json", d.dump());
    const Run r = run("predict '" + p.string() + "'");
    INFO(r.err);
    REQUIRE(r.code == 0);
    CHECK(r.out.find("engine    fock") != std::string::npos);
    CHECK(r.out.find("chosen automatically: Markovian dephasing over 5 intervals") !=
          std::string::npos);
  }
}

TEST_CASE("predict CLI: the Fock engine refuses when the requested truncation tolerance is not met",
          "[apps][fock]") {
  // A cat of |alpha| = 2 needs a few dozen Fock levels; growing the cutoff by 25 % changes the
  // probabilities by round-off at most, which is still above 1e-300, so the request cannot be
  // met and the engine must refuse (exit 2, message naming the tolerance). A tolerance of 1e-6
  // is met and the run succeeds with the same output as without the option.
  const std::string file = shipped("lg3_prepared_cat_conclusive.json");
  const Run refused = run("predict --engine fock --truncation-tolerance 1e-300 '" + file + "'");
  CHECK(refused.code == 2);
  CHECK(refused.err.find("truncation_tolerance") != std::string::npos);
  CHECK(refused.out.empty());
  const Run met = run("predict --engine fock --truncation-tolerance 1e-6 '" + file + "'");
  CHECK(met.code == 0);
  CHECK(met.out == run("predict --engine fock '" + file + "'").out);
  CHECK(run("predict --truncation-tolerance -1 '" + file + "'").code == 2);
}
