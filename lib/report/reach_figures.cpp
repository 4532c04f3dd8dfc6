// Figure of a reach map (reach_figures.hpp).
#include "report/reach_figures.hpp"

#include <cmath>
#include <cstdio>
#include <limits>

#include "core/error.hpp"

namespace macroreal {

namespace {

// A scan is drawn on a log axis when its points are positive with a constant ratio (the
// device file's "spacing": "log"); two points are taken as linear.
bool log_spaced(const std::vector<double>& v) {
  if (v.size() < 3) return false;
  for (double x : v)
    if (!(x > 0.0)) return false;
  const double r = v[1] / v[0];
  if (std::abs(r - 1.0) < 1e-12) return false;
  for (std::size_t k = 2; k < v.size(); ++k)
    if (std::abs(v[k] / v[k - 1] - r) > 1e-9 * r) return false;
  const double d = v[1] - v[0];
  for (std::size_t k = 2; k < v.size(); ++k)
    if (std::abs((v[k] - v[k - 1]) - d) > 1e-9 * std::abs(d)) return true;
  return false;  // both constant ratio and constant step cannot happen for r != 1
}

// "bath_temperature_k" -> "bath temperature" and "K": the unit is the field name's suffix.
std::pair<std::string, std::string> name_and_unit(const std::string& field) {
  static const std::pair<const char*, const char*> suffixes[] = {
      {"_hz", "Hz"}, {"_k", "K"}, {"_s", "s"}, {"_h", "h"}};
  std::string name = field, unit;
  for (const auto& [suffix, u] : suffixes) {
    const std::string s = suffix;
    if (name.size() > s.size() && name.compare(name.size() - s.size(), s.size(), s) == 0) {
      name.erase(name.size() - s.size());
      unit = u;
      break;
    }
  }
  if (name == "coupling_g_over_2pi") name = "coupling g/2#gp";
  for (auto& c : name)
    if (c == '_') c = ' ';
  return {name, unit};
}

std::string axis_label(const std::string& field, bool log) {
  const auto [name, unit] = name_and_unit(field);
  if (log) return "log#d10#u(" + name + (unit.empty() ? "" : " / " + unit) + ")";
  return name + (unit.empty() ? "" : " (" + unit + ")");
}

double coordinate(double v, bool log) { return log ? std::log10(v) : v; }

std::string format_hours(double h) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.4g", h);
  return buf;
}

}  // namespace

ReachMapFigure reach_map_figure(const ReachMap& map, const ReachOptions& options) {
  const std::size_t nx = map.xs.size(), ny = map.ys.size();
  if (map.points.size() != nx * ny) throw DomainError("the map is incomplete");
  if (nx < 2 || ny < 2) throw DomainError("a map figure needs at least 2 x 2 grid points");
  std::vector<double> sec(nx * ny);
  for (const auto& p : map.points) sec[static_cast<std::size_t>(p.index)] = p.seconds;
  ReachMapFigure out;
  out.log_x = log_spaced(map.xs);
  out.log_y = log_spaced(map.ys);
  Figure& f = out.figure;
  // Short enough for the page; the line and the dots mark the boundary at the available time.
  f.title = std::string(options.test == ReachTest::leggett_garg ? "LG" : "NSIT") +
            ": hours to a conclusive test (boundary: " + format_hours(map.available_s / 3600.0) +
            " h)";
  f.x_label = axis_label(map.x_param, out.log_x);
  f.y_label = axis_label(map.y_param, out.log_y);
  FigureMap m;
  m.z.assign(nx, std::vector<double>(ny, std::numeric_limits<double>::quiet_NaN()));
  bool any = false;
  for (std::size_t i = 0; i < nx; ++i)
    for (std::size_t j = 0; j < ny; ++j) {
      const double h = sec[j * nx + i] / 3600.0;
      if (std::isfinite(h) && h > 0.0) {
        m.z[i][j] = h;
        any = true;
      }
    }
  if (!any)
    throw DomainError("no point of the map reaches a conclusive test: nothing to colour in the "
                      "figure (the CSV says so point by point)");
  m.log_z = true;
  m.z_label = "lab hours (blank: no conclusive test)";
  // The colour map centres each cell on its grid point and shows the outer cells in full
  // (figure.hpp), so the grid is the scan itself.
  m.x_min = coordinate(map.xs.front(), out.log_x);
  m.x_max = coordinate(map.xs.back(), out.log_x);
  m.y_min = coordinate(map.ys.front(), out.log_y);
  m.y_max = coordinate(map.ys.back(), out.log_y);
  // A linear scan must be equally spaced for the colour map's regular grid.
  auto check_regular = [](const std::vector<double>& v, bool log, const std::string& name) {
    const double d = coordinate(v[1], log) - coordinate(v[0], log);
    for (std::size_t k = 2; k < v.size(); ++k)
      if (std::abs(coordinate(v[k], log) - coordinate(v[k - 1], log) - d) > 1e-6 * std::abs(d))
        throw DomainError("map parameter \"" + name + "\" is not evenly spaced (linear or log)");
  };
  check_regular(map.xs, out.log_x, map.x_param);
  check_regular(map.ys, out.log_y, map.y_param);
  f.map = m;
  // The boundary points: feasible with an infeasible 4-neighbour (the CSV's rule).
  auto feasible = [&](std::size_t i, std::size_t j) { return sec[j * nx + i] <= map.available_s; };
  FigureSeries marks;
  marks.kind = FigureSeries::Kind::points;
  marks.colour = PaletteColour::black;
  for (std::size_t j = 0; j < ny; ++j)
    for (std::size_t i = 0; i < nx; ++i) {
      if (!feasible(i, j)) continue;
      const bool edge = (i > 0 && !feasible(i - 1, j)) || (i + 1 < nx && !feasible(i + 1, j)) ||
                        (j > 0 && !feasible(i, j - 1)) || (j + 1 < ny && !feasible(i, j + 1));
      if (!edge) continue;
      out.boundary.emplace_back(map.xs[i], map.ys[j]);
      marks.x.push_back(coordinate(map.xs[i], out.log_x));
      marks.y.push_back(coordinate(map.ys[j], out.log_y));
    }
  // The boundary as a line: the cell edges between feasible and infeasible neighbours (cell
  // edges halfway between grid points, the outer edges half a step beyond the last ones). Drawn
  // from the grid rather than as a contour of the hours, so that cells with no conclusive
  // test at all (blank) are on the infeasible side.
  std::vector<double> cx(nx), cy(ny);
  for (std::size_t i = 0; i < nx; ++i) cx[i] = coordinate(map.xs[i], out.log_x);
  for (std::size_t j = 0; j < ny; ++j) cy[j] = coordinate(map.ys[j], out.log_y);
  auto lo_edge = [](const std::vector<double>& c, std::size_t k) {
    return k == 0 ? c[0] - 0.5 * (c[1] - c[0]) : 0.5 * (c[k - 1] + c[k]);
  };
  auto hi_edge = [](const std::vector<double>& c, std::size_t k) {
    const std::size_t n = c.size();
    return k + 1 == n ? c[k] + 0.5 * (c[n - 1] - c[n - 2]) : 0.5 * (c[k] + c[k + 1]);
  };
  auto segment = [&](double x0, double y0, double x1, double y1) {
    FigureSeries s;
    s.kind = FigureSeries::Kind::line;
    // No legend (it would cover the map): the title names the line and the dots.
    s.colour = PaletteColour::vermillion;
    s.x = {x0, x1};
    s.y = {y0, y1};
    f.series.push_back(std::move(s));
  };
  for (std::size_t j = 0; j < ny; ++j)
    for (std::size_t i = 0; i < nx; ++i) {
      if (i + 1 < nx && feasible(i, j) != feasible(i + 1, j)) {
        const double x = 0.5 * (cx[i] + cx[i + 1]);
        segment(x, lo_edge(cy, j), x, hi_edge(cy, j));
      }
      if (j + 1 < ny && feasible(i, j) != feasible(i, j + 1)) {
        const double y = 0.5 * (cy[j] + cy[j + 1]);
        segment(lo_edge(cx, i), y, hi_edge(cx, i), y);
      }
    }
  if (!marks.x.empty()) f.series.push_back(std::move(marks));
  return out;
}

bool reach_map_has_conclusive_point(const ReachMap& map) {
  for (const auto& p : map.points)
    if (std::isfinite(p.seconds)) return true;
  return false;
}

std::vector<std::string> write_reach_figures(const ReachMap& map, const ReachOptions& options,
                                             const std::string& dir) {
  return write_figure(reach_map_figure(map, options).figure, dir, "reach_map");
}

}  // namespace macroreal
