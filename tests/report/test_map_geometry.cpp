// Colour-map geometry (lib/report/map_geometry.hpp): cells centred on their grid points, the
// plotted extent, and the boundary contour that leaves missing points alone; then the same in
// a rendered PNG, read at known pixels by tests/support/png_summary.py.
#include <catch2/catch.hpp>

#include <cmath>
#include <filesystem>
#include <limits>
#include <string>
#include <vector>

#include "core/error.hpp"
#include "report/figure.hpp"
#include "report/map_geometry.hpp"
#include "support/compare.hpp"
#include "support/figure_checks.hpp"

using namespace macroreal;

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// z[i][j] = f(x_i, y_j) on x = 0, 1, ..., nx - 1 and y = 0, 1, ..., ny - 1.
template <class F>
FigureMap grid_map(int nx, int ny, F f) {
  FigureMap m;
  m.z.assign(static_cast<std::size_t>(nx), std::vector<double>(static_cast<std::size_t>(ny)));
  for (int i = 0; i < nx; ++i)
    for (int j = 0; j < ny; ++j) m.z[static_cast<std::size_t>(i)][static_cast<std::size_t>(j)] = f(i, j);
  m.x_min = 0;
  m.x_max = nx - 1;
  m.y_min = 0;
  m.y_max = ny - 1;
  return m;
}

}  // namespace

TEST_CASE("Map cells are centred on their grid points", "[report][figure]") {
  // Definition (as matplotlib's pcolormesh(shading="nearest")): the cell of a grid point
  // reaches halfway to its neighbours. Grid x = 1, 1.5, 2 (step 0.5), y = 10, 20 (step 10).
  FigureMap m = grid_map(3, 2, [](int i, int) { return double(i); });
  m.x_min = 1.0;
  m.x_max = 2.0;
  m.y_min = 10.0;
  m.y_max = 20.0;
  const MapRect c00 = map_cell(m, 0, 0), c21 = map_cell(m, 2, 1), c10 = map_cell(m, 1, 0);
  CHECK_CLOSE(c00.x0, 0.75, 1e-15, 0.0);
  CHECK_CLOSE(c00.x1, 1.25, 1e-15, 0.0);
  CHECK_CLOSE(c00.y0, 5.0, 1e-15, 0.0);
  CHECK_CLOSE(c00.y1, 15.0, 1e-15, 0.0);
  CHECK_CLOSE(c10.x0, 1.25, 1e-15, 0.0);
  CHECK_CLOSE(c10.x1, 1.75, 1e-15, 0.0);
  CHECK_CLOSE(c21.x0, 1.75, 1e-15, 0.0);
  CHECK_CLOSE(c21.x1, 2.25, 1e-15, 0.0);
  CHECK_CLOSE(c21.y0, 15.0, 1e-15, 0.0);
  CHECK_CLOSE(c21.y1, 25.0, 1e-15, 0.0);
  const MapRect e = map_extent(m);
  CHECK_CLOSE(e.x0, 0.75, 1e-15, 0.0);
  CHECK_CLOSE(e.x1, 2.25, 1e-15, 0.0);
  CHECK_CLOSE(e.y0, 5.0, 1e-15, 0.0);
  CHECK_CLOSE(e.y1, 25.0, 1e-15, 0.0);
  CHECK_THROWS_AS(map_cell(m, 3, 0), DomainError);
  FigureMap thin = grid_map(1, 3, [](int, int) { return 1.0; });
  CHECK_THROWS_AS(map_extent(thin), DomainError);
}

TEST_CASE("Map boundary: the contour of a linear field is its level line", "[report][figure]") {
  // z = x on a 4 x 3 grid: linear interpolation along the square edges is exact for a linear
  // field, so the contour at 1.5 is the line x = 1.5 from y = 0 to y = 2 (analytic).
  const FigureMap m = grid_map(4, 3, [](int i, int) { return double(i); });
  const auto segs = map_contour(m, 1.5);
  REQUIRE(segs.size() == 2);  // one per square of the column between x = 1 and x = 2
  double length = 0.0;
  for (const auto& s : segs) {
    CHECK_CLOSE(s.x0, 1.5, 1e-15, 0.0);
    CHECK_CLOSE(s.x1, 1.5, 1e-15, 0.0);
    length += std::abs(s.y1 - s.y0);
  }
  CHECK_CLOSE(length, 2.0, 1e-15, 0.0);
  // A level outside the values: no boundary.
  CHECK(map_contour(m, 7.0).empty());
  // log_z: the contour is of log10 z, so z = 10^x at level 10^1.5 is again x = 1.5.
  FigureMap lg = grid_map(4, 3, [](int i, int) { return std::pow(10.0, i); });
  lg.log_z = true;
  const auto lsegs = map_contour(lg, std::pow(10.0, 1.5));
  REQUIRE(lsegs.size() == 2);
  for (const auto& s : lsegs) CHECK_CLOSE(s.x0, 1.5, 1e-12, 0.0);
}

TEST_CASE("Map boundary: no boundary is drawn around missing points", "[report][figure]") {
  // Every finite value is above the level, one point is missing: there is nothing to bound.
  // (Taking the missing point as a low value, as PLplot's contour of the blank marker did,
  // rings it with four segments.)
  FigureMap hole = grid_map(5, 5, [](int, int) { return 10.0; });
  hole.z[2][2] = kNaN;
  CHECK(map_contour(hole, 5.0).empty());
  // z = x with the column x = 3 missing in its upper half: the level line x = 1.5 is whole, the
  // line x = 3.5 only where both neighbouring columns have values (squares with a missing
  // corner are left out).
  FigureMap m = grid_map(5, 5, [](int i, int) { return double(i); });
  m.z[3][3] = m.z[3][4] = kNaN;
  double len_15 = 0.0, len_35 = 0.0;
  for (const auto& s : map_contour(m, 1.5)) {
    CHECK_CLOSE(s.x0, 1.5, 1e-15, 0.0);
    len_15 += std::abs(s.y1 - s.y0);
  }
  for (const auto& s : map_contour(m, 3.5)) {
    CHECK_CLOSE(s.x0, 3.5, 1e-15, 0.0);
    CHECK(std::max(s.y0, s.y1) <= 2.0);  // the squares from y = 2 up touch a missing point
    len_35 += std::abs(s.y1 - s.y0);
  }
  CHECK_CLOSE(len_15, 4.0, 1e-15, 0.0);
  CHECK_CLOSE(len_35, 2.0, 1e-15, 0.0);
  // log_z: a non-positive value is missing too.
  FigureMap lg = grid_map(3, 3, [](int, int) { return 100.0; });
  lg.log_z = true;
  lg.z[1][1] = 0.0;
  CHECK(map_contour(lg, 10.0).empty());
}

TEST_CASE("Map boundary: a saddle square is split by its centre value", "[report][figure]") {
  // Corners (0,0) = 1 and (1,1) = 1 above the level 0.5, (1,0) = 0 and (0,1) = 0 below; the
  // centre (mean 0.5) counts as above, so the two low corners are cut off: segments from
  // (0.5, 0) to (1, 0.5) and from (0, 0.5) to (0.5, 1) (marching squares' saddle rule).
  FigureMap m = grid_map(2, 2, [](int i, int j) { return i == j ? 1.0 : 0.0; });
  const auto segs = map_contour(m, 0.5);
  REQUIRE(segs.size() == 2);
  auto has = [&](double ax, double ay, double bx, double by) {
    for (const auto& s : segs)
      if ((std::abs(s.x0 - ax) + std::abs(s.y0 - ay) + std::abs(s.x1 - bx) + std::abs(s.y1 - by) < 1e-12) ||
          (std::abs(s.x0 - bx) + std::abs(s.y0 - by) + std::abs(s.x1 - ax) + std::abs(s.y1 - ay) < 1e-12))
        return true;
    return false;
  };
  CHECK(has(0.5, 0.0, 1.0, 0.5));
  CHECK(has(0.0, 0.5, 0.5, 1.0));
}

TEST_CASE("Map PNG: each value is drawn around its own grid point, a missing one blank", "[report][figure]") {
  if (!figure_format_available(FigureFormat::png)) FAIL("PLplot cairo devices missing");
  if (!test_support::python_available()) {
    WARN("Python 3 not available: pixel check skipped");
    return;
  }
  // Grid x = 0, 1, 2 and y = 0, 1 with z = x; z(1, 1) missing. The plot window is the viewport
  // 0.12-0.80 (x) by 0.13-0.90 (y, from the bottom) of the page (figure.cpp) over the cells'
  // extent x in [-0.5, 2.5], y in [-0.5, 1.5].
  Figure f;
  f.title = "cells";
  FigureMap m = grid_map(3, 2, [](int i, int) { return double(i); });
  m.z[1][1] = kNaN;
  f.map = m;
  const FigureSize size{800, 600};
  const auto dir = std::filesystem::temp_directory_path() / "macroreal_map_geometry_test";
  std::filesystem::create_directories(dir);
  const std::string png = (dir / "cells.png").string();
  render_figure(f, png, FigureFormat::png, size);
  auto pixel = [&](double x, double y) {
    const long col = std::lround(size.width_px * (0.12 + 0.68 * (x + 0.5) / 3.0));
    const long row = std::lround(size.height_px * (1.0 - (0.13 + 0.77 * (y + 0.5) / 2.0)));
    return std::to_string(col) + "," + std::to_string(row);
  };
  // x = 0.75 and x = 2.25 lie in the cells of x = 1 and x = 2; a cell drawn from its grid point
  // to the next one would put them in the cells of x = 0 and x = 1.
  const std::vector<std::pair<double, double>> at = {{0.0, 0.0}, {0.75, 0.0}, {2.25, 0.0}, {1.0, 1.0}, {0.25, 1.0}};
  std::string args;
  for (const auto& [x, y] : at) args += pixel(x, y) + " ";
  const auto j = test_support::run_support_script("png_summary.py", png, args);
  REQUIRE_FALSE(j.is_null());
  const auto& px = j["pixels"];
  REQUIRE(px.size() == at.size());
  // Expected colours: the ramp's control points (dark blue (0.05, 0.10, 0.35) at 0, yellow
  // (0.99, 0.91, 0.15) at 1, (0.25, 0.35, 0.55) at 0.35 and (0.60, 0.65, 0.45) at 0.7,
  // figure.cpp) interpolated by hand in RGB: the middle value 1 of [0, 2] sits at 0.5, i.e.
  // 0.15 / 0.35 of the way from 0.35 to 0.7: (0.40, 0.479, 0.507) = (102, 122, 129) of 255.
  // Tolerance 6 of 255: PLplot quantises the ramp into 256 colours.
  auto close_to = [&](const nlohmann::json& p, int r, int g, int b) {
    INFO("pixel " << p.dump() << " against (" << r << ", " << g << ", " << b << ")");
    CHECK(std::abs(p[0].get<int>() - r) <= 6);
    CHECK(std::abs(p[1].get<int>() - g) <= 6);
    CHECK(std::abs(p[2].get<int>() - b) <= 6);
  };
  close_to(px[0], 13, 26, 89);     // (0, 0): z = 0
  close_to(px[1], 102, 122, 129);  // (0.75, 0): cell of x = 1, z = 1
  close_to(px[2], 252, 232, 38);   // (2.25, 0): cell of x = 2, z = 2
  close_to(px[3], 255, 255, 255);  // (1, 1): missing, blank (white page)
  close_to(px[4], 13, 26, 89);     // (0.25, 1): cell of x = 0, z = 0
}
