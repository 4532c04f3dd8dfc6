// Figures: render_figure writes valid SVG and PNG files of the requested size that are not
// blank. The PNG is decoded independently by tests/support/png_summary.py (Python standard
// library only, following the PNG specification) so the check does not trust PLplot's own
// account of what it drew.
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include <nlohmann/json.hpp>

#include "core/error.hpp"
#include "report/figure.hpp"

using namespace macroreal;
namespace fs = std::filesystem;

namespace {

std::string slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

fs::path figure_dir() {
  const fs::path d = fs::temp_directory_path() / "macroreal_figure_test";
  fs::create_directories(d);
  return d;
}

// JSON summary of a PNG from the independent decoder, or null when Python is missing.
nlohmann::json png_summary(const fs::path& png) {
  const std::string cmd = std::string(MACROREAL_PYTHON) + " '" + MACROREAL_SOURCE_DIR +
                          "/tests/support/png_summary.py' '" + png.string() + "'";
  FILE* p = ::popen(cmd.c_str(), "r");
  if (!p) return nullptr;
  std::string out;
  char buf[512];
  while (std::fgets(buf, sizeof buf, p)) out += buf;
  if (::pclose(p) != 0 || out.empty()) return nullptr;
  return nlohmann::json::parse(out);
}

Figure curve_figure() {
  Figure f;
  f.title = "K against displacement";
  f.x_label = "|#gb|";
  f.y_label = "K#d3#u";
  FigureSeries model;
  model.label = "model";
  model.colour = PaletteColour::blue;
  for (int i = 0; i <= 100; ++i) {
    model.x.push_back(0.03 * i);
    model.y.push_back(1.0 + 0.3 * std::sin(0.03 * i));
  }
  FigureSeries data;
  data.kind = FigureSeries::Kind::error_bars;
  data.label = "measured";
  data.colour = PaletteColour::vermillion;
  for (int i = 1; i <= 5; ++i) {
    data.x.push_back(0.5 * i);
    data.y.push_back(1.0 + 0.3 * std::sin(0.5 * i));
    data.y_low.push_back(data.y.back() - 0.05);
    data.y_high.push_back(data.y.back() + 0.05);
  }
  FigureSeries bound;
  bound.kind = FigureSeries::Kind::horizontal_line;
  bound.label = "classical bound";
  bound.dashed = true;
  bound.y = {1.0};
  f.series = {model, data, bound};
  return f;
}

Figure map_figure() {
  Figure f;
  f.title = "feasibility";
  f.x_label = "temperature (K)";
  f.y_label = "coupling (Hz)";
  FigureMap m;
  m.z.assign(30, std::vector<double>(20));
  for (int i = 0; i < 30; ++i)
    for (int j = 0; j < 20; ++j) m.z[i][j] = 1.0 + i + 2.0 * j;
  m.x_min = 0.01;
  m.x_max = 0.3;
  m.y_min = 1e3;
  m.y_max = 2e4;
  m.z_label = "time (h)";
  m.boundary_level = 30.0;
  f.map = m;
  return f;
}

void check_svg(const fs::path& p) {
  const std::string s = slurp(p);
  REQUIRE(s.size() > 200);
  // Well-formed enough for a browser: an XML prolog or an <svg> root that is closed.
  CHECK(s.find("<svg") != std::string::npos);
  CHECK(s.rfind("</svg>") != std::string::npos);
  CHECK(s.find("<path") != std::string::npos);
}

void check_png(const fs::path& p, FigureSize size) {
  const std::string s = slurp(p);
  REQUIRE(s.size() > 8);
  CHECK(s.compare(0, 8, std::string("\x89PNG\r\n\x1a\n", 8)) == 0);
  const auto summary = png_summary(p);
  if (summary.is_null()) {
    WARN("Python 3 not available: PNG decoding check skipped");
    return;
  }
  CHECK(summary["width"].get<int>() == size.width_px);
  CHECK(summary["height"].get<int>() == size.height_px);
  // Not blank: axes, text and curves cover well over 1 % of an 800 x 600 figure (a blank
  // page has 0), and several palette colours appear.
  CHECK(summary["non_background_fraction"].get<double>() > 0.01);
  CHECK(summary["colours"].get<int>() >= 3);
}

}  // namespace

TEST_CASE("figures: curves with error bars and a bound render as SVG and PNG", "[report][figure]") {
  if (!figure_format_available(FigureFormat::png) || !figure_format_available(FigureFormat::svg)) {
    FAIL("PLplot cairo devices missing (install plplot-driver-cairo, as scripts/setup.sh does)");
  }
  const FigureSize size{800, 600};
  const auto files = write_figure(curve_figure(), figure_dir().string(), "curve", size);
  REQUIRE(files.size() == 2);
  check_svg(files[0]);
  check_png(files[1], size);
}

TEST_CASE("figures: a colour map with a boundary renders at the requested size", "[report][figure]") {
  const FigureSize size{640, 480};
  const auto files = write_figure(map_figure(), figure_dir().string(), "map", size);
  check_svg(files[0]);
  check_png(files[1], size);
}

TEST_CASE("figures: nothing finite to draw is an error, not an empty file", "[report][figure]") {
  Figure f;
  f.title = "empty";
  FigureSeries s;
  s.x = {NAN};
  s.y = {NAN};
  f.series = {s};
  CHECK_THROWS_AS(render_figure(f, (figure_dir() / "empty.svg").string(), FigureFormat::svg),
                  DomainError);
}
