// `--figures DIR` on predict, optimise, calibrate and plan, end to end: the real program
// writes the named SVG/PNG pairs into a folder it creates, the SVG parses as XML with an
// <svg> root and the PNG has the default 800 x 600 size and is not blank (independent
// readers in tests/support/figure_checks.hpp), the text report lists the files, and --json
// output stays one JSON object.
#include <catch2/catch.hpp>

#include <filesystem>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "support/cli_run.hpp"
#include "support/figure_checks.hpp"

using macroreal::test_support::check_figure_files;
using macroreal::test_support::run_macroreal;
using macroreal::test_support::scratch_dir;
namespace fs = std::filesystem;

namespace {

// Every SVG is parsed and every PNG's header size read; the PNGs of the first `decoded`
// stems are decoded in full (pure Python, about half a second each).
void check_all(const fs::path& dir, const std::vector<std::string>& stems, const std::string& out,
               std::size_t decoded = 2) {
  for (std::size_t k = 0; k < stems.size(); ++k) {
    const auto& stem = stems[k];
    INFO(stem);
    check_figure_files(dir, stem, 800, 600, k < decoded);
    CHECK(out.find(stem + ".svg") != std::string::npos);
    CHECK(out.find(stem + ".png") != std::string::npos);
  }
  std::size_t files = 0;
  for (const auto& e : fs::directory_iterator(dir)) files += e.is_regular_file();
  CHECK(files == 2 * stems.size());  // nothing else is written
}

}  // namespace

TEST_CASE("predict --figures: K against beta, the Wigner maps of a prepared cat and of its vacuum",
          "[apps][figure]") {
  const fs::path dir = scratch_dir("fig_predict") / "new" / "figs";  // created by the command
  const auto r = run_macroreal("predict protocols/lg3_prepared_cat_conclusive.json --figures '" +
                                   dir.string() + "'", "fig_predict");
  INFO(r.err);
  REQUIRE(r.code == 0);
  CHECK(r.out.find("Figures written to " + dir.string() + ":") != std::string::npos);
  check_all(dir,
            {"K_vs_beta_LG_ABC", "wigner_input", "S_vs_direction_NSIT_A_to_B", "S_vs_beta_NSIT_A_to_B",
             "S_vs_beta_NSIT_B_to_C", "S_vs_beta_NSIT_A_to_C", "S_vs_direction_NSIT_B_to_C",
             "S_vs_direction_NSIT_A_to_C", "wigner_before_preparation"},
            r.out);
  // The report itself is unchanged by --figures apart from the last line.
  const auto plain = run_macroreal("predict protocols/lg3_prepared_cat_conclusive.json", "fig_predict_plain");
  REQUIRE(plain.code == 0);
  CHECK(r.out.compare(0, plain.out.size(), plain.out) == 0);
}

TEST_CASE("optimise --figures: K against beta through the optimised setting and the input's Wigner map",
          "[apps][figure]") {
  const fs::path dir = scratch_dir("fig_optimise") / "figs";
  const auto r = run_macroreal("optimise protocols/lg3_thermal.json --max-evaluations 400 --figures '" +
                                   dir.string() + "'", "fig_optimise");
  INFO(r.err);
  REQUIRE(r.code == 0);
  check_all(dir, {"K_vs_beta_optimised_LG_ABC", "wigner_input"}, r.out);
}

TEST_CASE("calibrate --figures: the count histogram with the fitted mixture and the thresholds",
          "[apps][figure]") {
  const fs::path dir = scratch_dir("fig_calibrate") / "figs";
  const auto r = run_macroreal("calibrate example_runs/calibration_counts.csv --bootstrap 100 --figures '" +
                                   dir.string() + "'", "fig_calibrate");
  INFO(r.err);
  REQUIRE(r.code == 0);
  check_all(dir, {"count_histogram"}, r.out);
}

TEST_CASE("plan --figures: power against total shots", "[apps][figure]") {
  const fs::path dir = scratch_dir("fig_plan") / "figs";
  const auto r = run_macroreal("plan protocols/lg3_thermal.json --verify 50 --seed 3 --threads 1 --figures '" +
                                   dir.string() + "'", "fig_plan");
  INFO(r.err);
  REQUIRE(r.code == 0);
  check_all(dir, {"power_vs_shots"}, r.out);
  // --json stays one JSON object.
  const auto j = run_macroreal("plan protocols/lg3_thermal.json --json --figures '" +
                                   (scratch_dir("fig_plan") / "json").string() + "'", "fig_plan_json");
  REQUIRE(j.code == 0);
  CHECK_NOTHROW(nlohmann::json::parse(j.out));
  check_figure_files(scratch_dir("fig_plan") / "json", "power_vs_shots", 800, 600, false);
}
