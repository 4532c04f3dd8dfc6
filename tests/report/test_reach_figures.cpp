// The reach map figure (report/reach_figures.hpp): its boundary data equal the map CSV's
// boundary column, its axes follow the scan spacing, and the files are a valid SVG and a PNG
// of the requested size that is not blank (decoded independently by
// tests/support/png_summary.py, Python standard library only).
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <limits>
#include <sstream>
#include <string>

#include <unistd.h>

#include <nlohmann/json.hpp>

#include "core/error.hpp"
#include "report/reach_figures.hpp"
#include "report/reach_report.hpp"
#include "support/compare.hpp"

using namespace macroreal;
namespace fs = std::filesystem;

namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();

// A 6 x 4 map with hand-made times: a feasible region in the upper left, infeasible finite
// times elsewhere and two points with no conclusive test at all (infinite).
ReachMap made_up_map() {
  ReachMap m;
  m.x_param = "bath_temperature_k";
  m.y_param = "coupling_g_over_2pi_hz";
  for (int i = 0; i < 6; ++i) m.xs.push_back(1e-3 * std::pow(10.0, 0.4 * i));  // log spaced
  for (int j = 0; j < 4; ++j) m.ys.push_back(5e4 + 2.5e4 * j);                  // linear
  m.available_s = 10.0 * 3600.0;
  for (int j = 0; j < 4; ++j)
    for (int i = 0; i < 6; ++i) {
      MapPoint p;
      p.i = i;
      p.j = j;
      p.index = j * 6 + i;
      p.x = m.xs[static_cast<std::size_t>(i)];
      p.y = m.ys[static_cast<std::size_t>(j)];
      p.seconds = 3600.0 * std::pow(3.0, i - j);  // feasible where 3^(i-j) <= 10
      if (i == 5 && j < 2) p.seconds = kInf;
      m.points.push_back(p);
    }
  return m;
}

// The boundary points (x, y) of the CSV: rows whose last column is 1.
std::vector<std::pair<double, double>> csv_boundary(const std::string& csv) {
  std::vector<std::pair<double, double>> out;
  std::istringstream in(csv);
  std::string line;
  bool header = false;
  while (std::getline(in, line)) {
    if (line.empty() || line[0] == '#') continue;
    if (!header) {
      header = true;  // the column line
      continue;
    }
    std::vector<std::string> f;
    std::istringstream ls(line);
    std::string cell;
    while (std::getline(ls, cell, ',')) f.push_back(cell);
    REQUIRE(f.size() == 5);
    if (f[4] == "1") out.emplace_back(std::stod(f[0]), std::stod(f[1]));
  }
  return out;
}

std::string slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

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

}  // namespace

TEST_CASE("reach figure: boundary points equal the CSV's boundary column", "[report][figure]") {
  const ReachMap m = made_up_map();
  ReachOptions opt;
  const ReachMapFigure fig = reach_map_figure(m, opt);
  const auto csv = csv_boundary(map_csv_text(m, opt));
  REQUIRE(!csv.empty());
  REQUIRE(fig.boundary.size() == csv.size());
  for (std::size_t k = 0; k < csv.size(); ++k) {
    // The CSV prints 10 significant digits.
    CHECK_CLOSE(fig.boundary[k].first, csv[k].first, 0.0, 1e-9);
    CHECK_CLOSE(fig.boundary[k].second, csv[k].second, 0.0, 1e-9);
  }
  // The marker series holds the same points in plotted coordinates: log10 of the log-spaced
  // temperature, the linear coupling as it is.
  CHECK(fig.log_x);
  CHECK_FALSE(fig.log_y);
  const FigureSeries* marks = nullptr;
  int lines = 0;
  for (const auto& s : fig.figure.series) {
    if (s.kind == FigureSeries::Kind::points) marks = &s;
    if (s.kind == FigureSeries::Kind::line) ++lines;
  }
  REQUIRE(marks);
  REQUIRE(marks->x.size() == csv.size());
  for (std::size_t k = 0; k < csv.size(); ++k) {
    CHECK_CLOSE(marks->x[k], std::log10(csv[k].first), 1e-9, 0.0);
    CHECK_CLOSE(marks->y[k], csv[k].second, 0.0, 1e-9);
  }
  CHECK(lines > 0);  // the boundary line between feasible and infeasible cells
  // Colour: hours on a log scale, infinite times blank (NaN), the rest as hours.
  REQUIRE(fig.figure.map);
  CHECK(fig.figure.map->log_z);
  CHECK(std::isnan(fig.figure.map->z[5][0]));
  CHECK_CLOSE(fig.figure.map->z[2][1], 3.0, 0.0, 1e-12);
  CHECK(fig.figure.x_label.find("K") != std::string::npos);
  CHECK(fig.figure.y_label.find("Hz") != std::string::npos);
}

TEST_CASE("reach figure: SVG and PNG files, not blank", "[report][figure]") {
  const fs::path dir = fs::temp_directory_path() / ("macroreal_reach_fig_" + std::to_string(::getpid()));
  const auto paths = write_reach_figures(made_up_map(), ReachOptions{}, dir.string());
  REQUIRE(paths.size() == 2);
  const std::string svg = slurp(paths[0]);
  CHECK(svg.find("<svg") != std::string::npos);
  CHECK(svg.rfind("</svg>") != std::string::npos);
  const auto summary = png_summary(paths[1]);
  if (summary.is_null()) {
    WARN("Python 3 not available: PNG decoding check skipped");
  } else {
    CHECK(summary["width"].get<int>() == 800);
    CHECK(summary["height"].get<int>() == 600);
    CHECK(summary["non_background_fraction"].get<double>() > 0.05);  // the colour map fills it
    CHECK(summary["colours"].get<int>() >= 10);
  }
  fs::remove_all(dir);
}

TEST_CASE("reach figure: a map with no conclusive point is refused with a reason", "[report][figure]") {
  ReachMap m = made_up_map();
  for (auto& p : m.points) p.seconds = kInf;
  CHECK_THROWS_WITH(reach_map_figure(m, ReachOptions{}), Catch::Contains("no point of the map"));
}
