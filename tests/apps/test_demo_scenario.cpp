// The invented end-to-end demo scenario (example_runs/demo/): run_demo.sh is re-run in a
// scratch copy of the repository layout with the program under test, and every text, JSON
// and CSV output is compared byte for byte with the committed one. These are golden files of
// our own output: a regression and reproducibility check (same commands, same seeds, same
// bytes), not a check of correctness, which the module tests do against outside sources.
// Figures (PNG/SVG) are checked for validity only: PLplot's cairo output is not promised to
// be byte-stable across library versions.
#include <cstdlib>
#include <filesystem>
#include <set>
#include <string>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "support/cli_run.hpp"

namespace fs = std::filesystem;
using macroreal::test_support::slurp;

namespace {

const fs::path kDemo = fs::path(MACROREAL_SOURCE_DIR) / "example_runs" / "demo";

// The files the demo starts from; everything else in the folder is made by run_demo.sh.
const std::set<std::string> kInputs = {"README.md", "run_demo.sh", "device.json",
                                       "protocol_start.json"};

bool is_figure(const fs::path& p) { return p.extension() == ".png" || p.extension() == ".svg"; }

// PNG: the signature and a non-trivial size; SVG: an <svg element and a closing tag.
void check_figure(const fs::path& p) {
  INFO("figure " << p);
  const std::string bytes = slurp(p);
  if (p.extension() == ".png") {
    REQUIRE(bytes.size() > 1000);
    CHECK(bytes.compare(0, 8, "\x89PNG\r\n\x1a\n") == 0);
    const fs::path summary = p.string() + ".summary.json";
    const std::string cmd = std::string(MACROREAL_PYTHON) + " '" + MACROREAL_SOURCE_DIR +
                            "/tests/support/png_summary.py' '" + p.string() + "' >'" +
                            summary.string() + "'";
    REQUIRE(std::system(cmd.c_str()) == 0);  // decodes (zlib, filters) without error
    const auto j = nlohmann::json::parse(slurp(summary));
    fs::remove(summary);
    CHECK(j["width"].get<int>() >= 400);
    CHECK(j["height"].get<int>() >= 300);
    CHECK(j["non_background_fraction"].get<double>() > 0.01);  // not blank
  } else {
    CHECK(bytes.find("<svg") != std::string::npos);
    CHECK(bytes.find("</svg>") != std::string::npos);
  }
}

}  // namespace

TEST_CASE("demo scenario: run_demo.sh re-makes every committed output byte for byte",
          "[apps][demo]") {
  const fs::path root = macroreal::test_support::scratch_dir("demo_scenario");
  const fs::path copy = root / "example_runs" / "demo";
  fs::remove_all(root / "example_runs");
  fs::create_directories(copy);
  for (const auto& name : kInputs) fs::copy_file(kDemo / name, copy / name);

  const std::string cmd = "MACROREAL='" + std::string(MACROREAL_EXE) + "' bash '" +
                          (copy / "run_demo.sh").string() + "' >'" + (root / "demo.log").string() +
                          "' 2>&1";
  const int status = std::system(cmd.c_str());
  INFO(slurp(root / "demo.log"));
  REQUIRE(status == 0);

  // Files by their path inside the demo folder (figures/ and the like included).
  const auto files = [](const fs::path& dir) {
    std::set<std::string> names;
    for (const auto& e : fs::recursive_directory_iterator(dir))
      if (e.is_regular_file()) names.insert(fs::relative(e.path(), dir).string());
    return names;
  };
  const std::set<std::string> committed = files(kDemo), made = files(copy);
  CHECK(made == committed);  // nothing missing, nothing uncommitted

  int compared = 0, figures = 0;
  for (const auto& name : committed) {
    if (kInputs.count(name) || !made.count(name)) continue;
    INFO("output " << name);
    if (is_figure(fs::path(name))) {
      check_figure(copy / name);
      ++figures;
      continue;
    }
    CHECK(slurp(copy / name) == slurp(kDemo / name));
    ++compared;
  }
  CHECK(compared >= 10);  // reach x2, optimise x2, plan x3, runs, analysis x2

  // The chain holds together: the analysed runs follow the plan's allocation, and the
  // sequences it leaves out (the NSIT controls) got run_demo.sh's --shots 2500.
  const auto allocation = nlohmann::json::parse(slurp(kDemo / "allocation.json"));
  const auto analysis = nlohmann::json::parse(slurp(kDemo / "analysis.json"));
  REQUIRE(analysis["sequences"].size() >= allocation["shots"].size());
  for (const auto& s : analysis["sequences"]) {
    INFO("sequence " << s["name"]);
    const std::string name = s["name"];
    const double expected =
        allocation["shots"].contains(name) ? allocation["shots"][name].get<double>() : 2500.0;
    CHECK(s["shots"].get<double>() == expected);
  }
  CHECK(figures >= 2);  // plan's power curve, SVG and PNG
}
