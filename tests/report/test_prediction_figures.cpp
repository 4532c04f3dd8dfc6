// Figures of predict (lib/report/prediction_figures.hpp) as data: each curve is tied to the
// number predict reports (the K or S curve at the protocol's setting is predict's value to
// 1e-12), checked against closed forms where one exists (K at beta = 0 from the Ramsey phases,
// the Wigner function at the origin from the parity operator), and written files are checked
// by the independent SVG/PNG readers of tests/support (with the plan figure alongside).
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <numbers>
#include <unistd.h>

#include "design/campaign_plan.hpp"
#include "protocol/prediction.hpp"
#include "protocol/protocol_reader.hpp"
#include "report/plan_figures.hpp"
#include "report/prediction_figures.hpp"
#include "support/compare.hpp"
#include "support/figure_checks.hpp"

using namespace macroreal;
namespace fs = std::filesystem;

namespace {

Protocol shipped(const std::string& name) {
  return read_protocol(std::string(MACROREAL_SOURCE_DIR) + "/protocols/" + name);
}

SettingScanOptions small_scan() {
  SettingScanOptions o;
  o.points = 13;
  return o;
}

const FigureSeries& series_labelled(const Figure& f, const std::string& start) {
  for (const auto& s : f.series)
    if (s.label.rfind(start, 0) == 0) return s;
  FAIL("no series labelled '" << start << "...' in figure '" << f.title << "'");
  throw;  // unreachable
}

}  // namespace

TEST_CASE("prediction figures: the K curve at the protocol's setting is predict's K", "[report][figure]") {
  for (const std::string name : {"lg3_thermal.json", "lg3_prepared_cat_conclusive.json", "lg4_ntime.json"}) {
    INFO(name);
    const Protocol p = shipped(name);
    const PredictionResult r = predict(p);
    const SettingScan s = scan_test_over_beta(p, 0, small_scan());
    REQUIRE(r.tests[0].lg);
    REQUIRE(s.settings.size() == 1);
    CHECK_CLOSE(s.settings[0].value, r.tests[0].lg->K, 1e-12, 0.0);
    // The setting is a grid point of the drawn curve, with the same value.
    const auto at = std::find(s.x.begin(), s.x.end(), s.settings[0].x);
    REQUIRE(at != s.x.end());
    CHECK_CLOSE(s.value[at - s.x.begin()], r.tests[0].lg->K, 1e-12, 0.0);
    // The bound is the library's own n - 2 (1 for three times, 2 for four).
    CHECK(s.bound == r.tests[0].lg->bound);
    CHECK(s.bound == static_cast<double>(p.tests[0].order.size()) - 2.0);
    // The marked optimum is at least every point of the curve.
    for (double v : s.value) CHECK(s.optimum_value >= v - 1e-12);
    // The classical curve (Gaussian input) at the setting is the reported classical K.
    if (r.tests[0].lg->K_classical_kicked) {
      REQUIRE(s.classical.size() == s.value.size());
      const bool kicked = r.tests[0].lg->model_in_use == ClassicalKind::kicked;
      CHECK_CLOSE(s.classical[at - s.x.begin()],
                  kicked ? *r.tests[0].lg->K_classical_kicked : *r.tests[0].lg->K_classical, 1e-12, 0.0);
    } else {
      CHECK(s.classical.empty());
    }
  }
}

TEST_CASE("prediction figures: at beta = 0 no measurement disturbs, K follows from the Ramsey phases",
          "[report][figure]") {
  // With beta = 0, D(0) = 1 and K_o = (1 + o e^{i phi}) / 2 for either split (DESIGN.md
  // section 2): each outcome is a fixed random sign with P(+) = (1 + cos phi) / 2 that leaves
  // the state alone, so C_ij = cos(phi_i) cos(phi_j) (contrast 1, independent outcomes;
  // derived here from the Kraus operators, no source). lg3_thermal has phases 0, 15, 270 deg.
  const Protocol p = shipped("lg3_thermal.json");
  const SettingScan s = scan_test_over_beta(p, 0, small_scan());
  REQUIRE(s.x.front() == 0.0);
  const double c[] = {std::cos(0.0), std::cos(15.0 * std::numbers::pi / 180), std::cos(270.0 * std::numbers::pi / 180)};
  CHECK_CLOSE(s.value.front(), c[0] * c[1] + c[1] * c[2] - c[0] * c[2], 1e-12, 0.0);
}

TEST_CASE("prediction figures: S curve and the orientation scan agree with predict for every test",
          "[report][figure]") {
  const Protocol cat = shipped("nsit_prepared_cat.json");
  const PredictionResult rc = predict(cat);
  const SettingScan s = scan_test_over_beta(cat, 0, small_scan());
  CHECK_CLOSE(s.settings[0].value, rc.tests[0].nsit->S, 1e-12, 0.0);
  CHECK(s.bound == 0.0);

  // Six tests A0..A5 -> B that differ only in the direction of A (0, 30, ..., 150 deg): one
  // direction curve, obtained by rotating A0, with all six marked. With 13 points the direction
  // grid has 36 intervals of 10 deg, so the curve has 0, 30, ..., 150 deg and rotating A0 there must
  // give what predict computes from the file's own A1..A5.
  const Protocol scan = shipped("nsit_orientation_scan_cat.json");
  const PredictionResult r = predict(scan);
  const SettingScan d = scan_nsit_over_direction(scan, 0, small_scan());
  for (std::size_t k = 0; k < 6; ++k) {
    const double angle = 30.0 * k;
    const auto at = std::find_if(d.x.begin(), d.x.end(), [&](double x) { return std::abs(x - angle) < 1e-9; });
    REQUIRE(at != d.x.end());
    CHECK_CLOSE(d.value[at - d.x.begin()], r.tests[k].nsit->S, 1e-12, 0.0);
  }
  PredictionFigureOptions o;
  o.scan = small_scan();
  o.wigner.spacing = 0.3;
  const auto figs = prediction_figures(scan, o);
  std::size_t direction_figures = 0;
  for (const auto& f : figs)
    if (f.stem.rfind("S_vs_direction_", 0) == 0) {
      ++direction_figures;
      CHECK(series_labelled(f.figure, "the protocol's 6 tests").x.size() == 6);
    }
  CHECK(direction_figures == 1);
  CHECK(figs.size() == 6 + 1 + 2);  // six |beta| scans, one direction scan, two Wigner maps
}

TEST_CASE("prediction figures: Wigner maps at the origin equal the parity expectation", "[report][figure]") {
  // W(0) = (2/pi) <parity> with Integral W d^2alpha = 1 (Royer, Phys. Rev. A 15, 449 (1977)):
  // thermal nbar: <parity> = 1 / (2 nbar + 1); the even cat (|-2> + |2>)/N prepared by
  // lg3_prepared_cat_conclusive.json: <parity> = +1 (the file's README derivation).
  WignerFigureOptions o;
  o.spacing = 0.2;  // the fitted grid is symmetric with the origin at its centre
  const auto centre = [](const Figure& f) {
    const std::size_t c = f.map->z.size() / 2;
    REQUIRE(f.map->z.size() % 2 == 1);
    CHECK_CLOSE(f.map->x_min, -f.map->x_max, 1e-12, 0.0);
    return f.map->z[c][c];
  };
  const Protocol thermal = shipped("lg3_thermal.json");
  const auto tf = wigner_figures(thermal, o);
  REQUIRE(tf.size() == 1);
  CHECK(tf[0].stem == "wigner_input");
  REQUIRE(tf[0].figure.map);
  CHECK(tf[0].figure.map->diverging);
  CHECK_CLOSE(centre(tf[0].figure), 2.0 / std::numbers::pi / (2 * 0.3 + 1), 1e-9, 0.0);

  const Protocol cat = shipped("lg3_prepared_cat_conclusive.json");
  const auto cf = wigner_figures(cat, o);
  REQUIRE(cf.size() == 2);
  CHECK(cf[0].stem == "wigner_input");
  CHECK(cf[1].stem == "wigner_before_preparation");
  CHECK_CLOSE(centre(cf[0].figure), 2.0 / std::numbers::pi, 1e-9, 0.0);
  // The prepared cat is Wigner-negative, the vacuum it was made from is not.
  double cat_min = 0, vac_min = 0;
  for (const auto& row : cf[0].figure.map->z) cat_min = std::min(cat_min, *std::min_element(row.begin(), row.end()));
  for (const auto& row : cf[1].figure.map->z) vac_min = std::min(vac_min, *std::min_element(row.begin(), row.end()));
  CHECK(cat_min < -0.1);
  CHECK(vac_min > -1e-9);
  CHECK_CLOSE(centre(cf[1].figure), 2.0 / std::numbers::pi, 1e-9, 0.0);  // vacuum: parity 1
}

TEST_CASE("command figures: written files are valid SVG and non-blank PNG of the requested size",
          "[report][figure]") {
  const fs::path dir = fs::temp_directory_path() / ("macroreal_command_figures_" + std::to_string(::getpid()));
  PredictionFigureOptions o;
  o.scan = small_scan();
  o.wigner.spacing = 0.2;
  // A curve, a diverging map and the plan figure: one of each kind keeps the test short.
  std::vector<NamedFigure> figs;
  for (auto& f : prediction_figures(shipped("lg3_prepared_cat_conclusive.json"), o))
    if (f.stem == "K_vs_beta_LG_ABC" || f.stem == "wigner_input") figs.push_back(std::move(f));
  REQUIRE(figs.size() == 2);
  const CampaignPlan plan = plan_campaign(shipped("lg3_thermal.json"));
  for (auto& f : plan_figures(plan)) figs.push_back(std::move(f));
  const auto paths = write_figures(figs, dir.string(), {640, 480});
  CHECK(paths.size() == 2 * figs.size());
  for (const auto& f : figs) {
    INFO(f.stem);
    test_support::check_figure_files(dir, f.stem, 640, 480);
  }
  CHECK(figures_written_line("out", {"out/a.svg", "out/a.png"}) == "Figures written to out: a.svg, a.png\n");
  CHECK(figure_stem("NSIT A->B") == "NSIT_A_to_B");
  fs::remove_all(dir);
}
