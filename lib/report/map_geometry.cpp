// Cells and boundary contour of a colour map (map_geometry.hpp).
#include "report/map_geometry.hpp"

#include <cmath>
#include <string>

#include "core/error.hpp"

namespace macroreal {

namespace {

struct Grid {
  int nx = 0, ny = 0;
  double dx = 0, dy = 0;
};

Grid grid_of(const FigureMap& m) {
  Grid g;
  g.nx = static_cast<int>(m.z.size());
  g.ny = g.nx ? static_cast<int>(m.z[0].size()) : 0;
  if (g.nx < 2 || g.ny < 2) throw DomainError("figure map: needs at least 2 x 2 grid points");
  for (const auto& row : m.z)
    if (static_cast<int>(row.size()) != g.ny) throw DomainError("figure map: ragged grid");
  g.dx = (m.x_max - m.x_min) / (g.nx - 1);
  g.dy = (m.y_max - m.y_min) / (g.ny - 1);
  return g;
}

}  // namespace

MapRect map_cell(const FigureMap& m, int i, int j) {
  const Grid g = grid_of(m);
  if (i < 0 || i >= g.nx || j < 0 || j >= g.ny)
    throw DomainError("figure map: cell (" + std::to_string(i) + ", " + std::to_string(j) +
                      ") is outside the " + std::to_string(g.nx) + " x " + std::to_string(g.ny) + " grid");
  const double x = m.x_min + i * g.dx, y = m.y_min + j * g.dy;
  return {x - 0.5 * g.dx, x + 0.5 * g.dx, y - 0.5 * g.dy, y + 0.5 * g.dy};
}

MapRect map_extent(const FigureMap& m) {
  const Grid g = grid_of(m);
  return {m.x_min - 0.5 * g.dx, m.x_max + 0.5 * g.dx, m.y_min - 0.5 * g.dy, m.y_max + 0.5 * g.dy};
}

std::vector<MapSegment> map_contour(const FigureMap& m, double level) {
  const Grid g = grid_of(m);
  auto value = [&](int i, int j) {
    const double v = m.z[static_cast<std::size_t>(i)][static_cast<std::size_t>(j)];
    if (!m.log_z) return v;
    return v > 0 ? std::log10(v) : NAN;
  };
  const double lv = m.log_z ? (level > 0 ? std::log10(level) : NAN) : level;
  std::vector<MapSegment> out;
  if (!std::isfinite(lv)) return out;
  struct Point {
    double x, y;
  };
  for (int i = 0; i + 1 < g.nx; ++i)
    for (int j = 0; j + 1 < g.ny; ++j) {
      // Corners counter-clockwise from the lower left: a (i, j), b (i+1, j), c (i+1, j+1),
      // d (i, j+1); edges 0 = ab (bottom), 1 = bc (right), 2 = dc (top), 3 = ad (left).
      const double v[4] = {value(i, j), value(i + 1, j), value(i + 1, j + 1), value(i, j + 1)};
      if (!(std::isfinite(v[0]) && std::isfinite(v[1]) && std::isfinite(v[2]) && std::isfinite(v[3])))
        continue;  // a missing corner: no boundary through this square
      const bool in[4] = {v[0] >= lv, v[1] >= lv, v[2] >= lv, v[3] >= lv};
      const double x0 = m.x_min + i * g.dx, y0 = m.y_min + j * g.dy;
      const Point corner[4] = {{x0, y0}, {x0 + g.dx, y0}, {x0 + g.dx, y0 + g.dy}, {x0, y0 + g.dy}};
      constexpr int kEdge[4][2] = {{0, 1}, {1, 2}, {3, 2}, {0, 3}};
      auto crossing = [&](int e) {
        const int p = kEdge[e][0], q = kEdge[e][1];
        const double t = (lv - v[p]) / (v[q] - v[p]);
        return Point{corner[p].x + t * (corner[q].x - corner[p].x),
                     corner[p].y + t * (corner[q].y - corner[p].y)};
      };
      auto segment = [&](int e, int f) {
        const Point p = crossing(e), q = crossing(f);
        out.push_back({p.x, p.y, q.x, q.y});
      };
      int crossed[4], n = 0;
      for (int e = 0; e < 4; ++e)
        if (in[kEdge[e][0]] != in[kEdge[e][1]]) crossed[n++] = e;
      if (n == 2) {
        segment(crossed[0], crossed[1]);
      } else if (n == 4) {
        // Saddle: the corners on the other side of the centre value each get cut off by the
        // segment joining their two edges.
        const bool centre_in = 0.25 * (v[0] + v[1] + v[2] + v[3]) >= lv;
        constexpr int kCornerEdges[4][2] = {{0, 3}, {0, 1}, {1, 2}, {2, 3}};
        for (int k = 0; k < 4; ++k)
          if (in[k] != centre_in) segment(kCornerEdges[k][0], kCornerEdges[k][1]);
      }
    }
  return out;
}

}  // namespace macroreal
