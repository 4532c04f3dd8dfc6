#include "report/figure.hpp"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <limits>
#include <mutex>

#include <plplot/plplot.h>
#include <plplot/plstream.h>

#include "core/error.hpp"
#include "report/svg_ids.hpp"
#include "report/map_geometry.hpp"

namespace macroreal {

namespace {

// PLplot keeps global state; one figure at a time.
std::mutex& plplot_mutex() {
  static std::mutex m;
  return m;
}

const char* device_name(FigureFormat f) { return f == FigureFormat::svg ? "svgcairo" : "pngcairo"; }

struct Rgb {
  int r, g, b;
};

// Okabe & Ito (2008), "Color Universal Design", the eight-colour set.
constexpr Rgb kPalette[8] = {{0, 0, 0},     {230, 159, 0}, {86, 180, 233}, {0, 158, 115},
                             {240, 228, 66}, {0, 114, 178}, {213, 94, 0},   {204, 121, 167}};
// Colour-map index 0 is the background, 1 the axes; the palette follows.
constexpr int kFirstSeriesColour = 2;

int colour_index(PaletteColour c) { return kFirstSeriesColour + static_cast<int>(c); }

struct Bounds {
  double lo = std::numeric_limits<double>::infinity();
  double hi = -std::numeric_limits<double>::infinity();
  void add(double v) {
    if (std::isfinite(v)) {
      lo = std::min(lo, v);
      hi = std::max(hi, v);
    }
  }
  bool empty() const { return !(lo <= hi); }
  // A little margin so that markers on the edge stay visible; a degenerate range is widened.
  std::pair<double, double> padded() const {
    double a = lo, b = hi;
    if (a == b) {
      const double w = a == 0 ? 1.0 : std::abs(a) * 0.1;
      a -= w;
      b += w;
    }
    const double m = 0.05 * (b - a);
    return {a - m, b + m};
  }
};

double axis_value(double v, bool log) { return log ? (v > 0 ? std::log10(v) : NAN) : v; }

struct MapTransform {
  double x_min, dx, y_min, dy;
};

void map_transform(PLFLT i, PLFLT j, PLFLT* x, PLFLT* y, PLPointer data) {
  const auto* t = static_cast<const MapTransform*>(data);
  *x = t->x_min + i * t->dx;
  *y = t->y_min + j * t->dy;
}

// A monotone ramp from dark blue to yellow (lightness increasing), readable in grey and by
// the common colour-vision deficiencies (control points chosen along the blue-yellow axis,
// which those deficiencies keep).
void set_map_colours(plstream& pls) {
  const PLFLT pos[] = {0.0, 0.35, 0.7, 1.0};
  const PLFLT r[] = {0.05, 0.25, 0.60, 0.99};
  const PLFLT g[] = {0.10, 0.35, 0.65, 0.91};
  const PLFLT b[] = {0.35, 0.55, 0.45, 0.15};
  pls.scmap1n(256);
  pls.scmap1l(true, 4, pos, r, g, b, nullptr);
}

// Diverging: Okabe-Ito blue (0, 114, 178) at the low end, white at the middle (z = 0 on a
// symmetric scale), Okabe-Ito vermillion (213, 94, 0) at the high end.
void set_diverging_colours(plstream& pls) {
  const PLFLT pos[] = {0.0, 0.5, 1.0};
  const PLFLT r[] = {0.0, 1.0, 213.0 / 255};
  const PLFLT g[] = {114.0 / 255, 1.0, 94.0 / 255};
  const PLFLT b[] = {178.0 / 255, 1.0, 0.0};
  pls.scmap1n(256);
  pls.scmap1l(true, 3, pos, r, g, b, nullptr);
}

struct Frame {
  double x0, x1, y0, y1;
};

Frame data_frame(const Figure& f) {
  Bounds bx, by;
  for (const auto& s : f.series) {
    switch (s.kind) {
      case FigureSeries::Kind::vertical_line:
        if (!s.x.empty()) bx.add(axis_value(s.x[0], f.log_x));
        break;
      case FigureSeries::Kind::horizontal_line:
        if (!s.y.empty()) by.add(axis_value(s.y[0], f.log_y));
        break;
      default:
        for (double x : s.x) bx.add(axis_value(x, f.log_x));
        for (double y : s.y) by.add(axis_value(y, f.log_y));
        for (double y : s.y_low) by.add(axis_value(y, f.log_y));
        for (double y : s.y_high) by.add(axis_value(y, f.log_y));
        if (s.kind == FigureSeries::Kind::histogram && !f.log_y) by.add(0.0);
    }
  }
  if (f.map) {
    // The outer cells stand half a step beyond the grid (map_geometry.hpp).
    const MapRect e = map_extent(*f.map);
    bx.add(e.x0);
    bx.add(e.x1);
    by.add(e.y0);
    by.add(e.y1);
  }
  if (bx.empty() || by.empty()) throw DomainError("figure '" + f.title + "': nothing finite to draw");
  auto [x0, x1] = f.map ? std::pair{bx.lo, bx.hi} : bx.padded();
  auto [y0, y1] = f.map ? std::pair{by.lo, by.hi} : by.padded();
  if (f.x_range) {
    x0 = axis_value(f.x_range->first, f.log_x);
    x1 = axis_value(f.x_range->second, f.log_x);
  }
  if (f.y_range) {
    y0 = axis_value(f.y_range->first, f.log_y);
    y1 = axis_value(f.y_range->second, f.log_y);
  }
  return {x0, x1, y0, y1};
}

void draw_map(plstream& pls, const FigureMap& m, const Frame& frame) {
  const int nx = static_cast<int>(m.z.size());
  const int ny = nx ? static_cast<int>(m.z[0].size()) : 0;
  if (nx < 2 || ny < 2) throw DomainError("figure map: needs at least 2 x 2 grid points");
  std::vector<std::vector<PLFLT>> z(nx, std::vector<PLFLT>(ny));
  Bounds bz;
  for (int i = 0; i < nx; ++i) {
    if (static_cast<int>(m.z[i].size()) != ny) throw DomainError("figure map: ragged grid");
    for (int j = 0; j < ny; ++j) {
      const double v = m.log_z ? (m.z[i][j] > 0 ? std::log10(m.z[i][j]) : NAN) : m.z[i][j];
      z[i][j] = v;
      bz.add(v);
    }
  }
  if (bz.empty()) throw DomainError("figure map: no finite value");
  double zlo = bz.lo, zhi = bz.hi;
  const bool diverging = m.diverging && !m.log_z;
  if (diverging) {
    const double a = std::max(std::abs(zlo), std::abs(zhi));
    zlo = -a;
    zhi = a;
  }
  if (zlo == zhi) zhi = zlo + 1.0;
  // imagefr leaves values outside [valuemin, valuemax] undrawn: NaN cells become blank.
  const double blank = zlo - 1.0 - std::abs(zhi - zlo);
  for (auto& row : z)
    for (auto& v : row)
      if (!std::isfinite(v)) v = blank;
  std::vector<const PLFLT*> rows(nx);
  for (int i = 0; i < nx; ++i) rows[i] = z[i].data();
  // imagefr fills value (i, j) between the transformed corners (i, j) and (i + 1, j + 1);
  // starting the corners half a step low centres every cell on its grid point
  // (map_geometry.hpp; the cells are map_cell's).
  const MapRect first = map_cell(m, 0, 0);
  MapTransform t{first.x0, first.x1 - first.x0, first.y0, first.y1 - first.y0};
  if (diverging)
    set_diverging_colours(pls);
  else
    set_map_colours(pls);
  const MapRect extent = map_extent(m);
  pls.imagefr(rows.data(), nx, ny, extent.x0, extent.x1, extent.y0, extent.y1, zlo, zhi, zlo, zhi,
              map_transform, &t);
  if (m.boundary_level) {
    // Marching squares that leave out squares with a missing corner: PLplot's contour would
    // take the blank marker above as a low value and ring every missing point.
    pls.col0(1);
    pls.width(2.5);
    for (const MapSegment& s : map_contour(m, *m.boundary_level)) pls.join(s.x0, s.y0, s.x1, s.y1);
    pls.width(1.0);
  }
  // Colour bar beside the plot: a vertical gradient with its own labelled axis.
  pls.vpor(0.86, 0.89, 0.13, 0.90);
  pls.wind(0.0, 1.0, zlo, zhi);
  std::vector<PLFLT> grad_lo(64), grad_hi(64);
  std::vector<const PLFLT*> grad(2);
  for (int k = 0; k < 64; ++k) grad_lo[k] = grad_hi[k] = zlo + (zhi - zlo) * k / 63.0;
  grad[0] = grad_lo.data();
  grad[1] = grad_hi.data();
  // Bar value k is zlo + k (zhi - zlo) / 63, its cell centred on it like the map's.
  const double bar_step = (zhi - zlo) / 63.0;
  MapTransform bar{0.0, 1.0, zlo - 0.5 * bar_step, bar_step};
  pls.imagefr(grad.data(), 2, 64, 0.0, 1.0, zlo, zhi, zlo, zhi, zlo, zhi, map_transform, &bar);
  pls.col0(1);
  pls.box("bc", 0.0, 0, m.log_z ? "bcmstvl" : "bcmstv", 0.0, 0);
  pls.mtex("r", 5.0, 0.5, 0.5, m.z_label.c_str());
  (void)frame;
}

void draw_series(plstream& pls, const FigureSeries& s, const Frame& fr, bool log_x, bool log_y) {
  pls.col0(colour_index(s.colour));
  pls.lsty(s.dashed ? 2 : 1);
  pls.width(2.0);
  std::vector<PLFLT> x(s.x.size());
  for (std::size_t i = 0; i < x.size(); ++i) x[i] = axis_value(s.x[i], log_x);
  const auto on_y = [log_y](const std::vector<double>& v) {
    std::vector<PLFLT> out(v.size());
    for (std::size_t i = 0; i < v.size(); ++i) out[i] = axis_value(v[i], log_y);
    return out;
  };
  const std::vector<PLFLT> y = on_y(s.y), y_low = on_y(s.y_low), y_high = on_y(s.y_high);
  const auto n = static_cast<PLINT>(std::min(x.size(), y.size()));
  switch (s.kind) {
    case FigureSeries::Kind::line:
      if (n >= 2) pls.line(n, x.data(), y.data());
      break;
    case FigureSeries::Kind::points:
      pls.poin(n, x.data(), y.data(), 17);
      break;
    case FigureSeries::Kind::error_bars: {
      const auto m = static_cast<PLINT>(std::min({x.size(), y_low.size(), y_high.size()}));
      pls.erry(m, x.data(), y_low.data(), y_high.data());
      pls.poin(n, x.data(), y.data(), 17);
      break;
    }
    case FigureSeries::Kind::histogram: {
      // On a log axis a bar starts at the bottom of the frame; empty bins are not drawn.
      const PLFLT base = log_y ? fr.y0 : 0.0;
      for (std::size_t k = 0; k + 1 < x.size() && k < y.size(); ++k) {
        if (!std::isfinite(y[k])) continue;
        const PLFLT bx[] = {x[k], x[k], x[k + 1], x[k + 1]};
        const PLFLT by[] = {base, y[k], y[k], base};
        pls.line(4, bx, by);
      }
      break;
    }
    case FigureSeries::Kind::vertical_line:
      if (!x.empty()) {
        const PLFLT vx[] = {x[0], x[0]}, vy[] = {fr.y0, fr.y1};
        pls.line(2, vx, vy);
      }
      break;
    case FigureSeries::Kind::horizontal_line:
      if (!y.empty()) {
        const PLFLT hx[] = {fr.x0, fr.x1}, hy[] = {y[0], y[0]};
        pls.line(2, hx, hy);
      }
      break;
  }
  pls.lsty(1);
  pls.width(1.0);
}

// A legend in the top-left corner of the plot: a short sample of each labelled series and
// its text (drawn by hand: fewer moving parts than plstream::legend's 28 arguments).
void draw_legend(plstream& pls, const Figure& f, const Frame& fr) {
  int row = 0;
  const double w = fr.x1 - fr.x0, h = fr.y1 - fr.y0;
  for (const auto& s : f.series) {
    if (s.label.empty()) continue;
    const double y = fr.y1 - h * (0.06 + 0.06 * row);
    const double xa = fr.x0 + 0.03 * w, xb = fr.x0 + 0.10 * w;
    pls.col0(colour_index(s.colour));
    pls.lsty(s.dashed ? 2 : 1);
    pls.width(2.0);
    if (s.kind == FigureSeries::Kind::points || s.kind == FigureSeries::Kind::error_bars) {
      const PLFLT px[] = {(xa + xb) / 2}, py[] = {y};
      pls.poin(1, px, py, 17);
    } else {
      const PLFLT lx[] = {xa, xb}, ly[] = {y, y};
      pls.line(2, lx, ly);
    }
    pls.lsty(1);
    pls.width(1.0);
    pls.col0(1);
    pls.ptex(xb + 0.01 * w, y, 1.0, 0.0, 0.0, s.label.c_str());
    ++row;
  }
}

}  // namespace

bool figure_format_available(FigureFormat format) {
  // plgDevs fills caller-provided arrays; 128 is far more than any PLplot build has.
  std::lock_guard<std::mutex> lock(plplot_mutex());
  std::vector<const char*> menu(128), names(128);
  int n = static_cast<int>(names.size());
  const char** menu_p = menu.data();
  const char** names_p = names.data();
  plgDevs(&menu_p, &names_p, &n);
  for (int i = 0; i < n; ++i)
    if (names_p[i] && std::string(names_p[i]) == device_name(format)) return true;
  return false;
}

void render_figure(const Figure& figure, const std::string& path, FigureFormat format,
                   FigureSize size) {
  if (!figure_format_available(format))
    throw UnsupportedError(std::string("figures: PLplot has no '") + device_name(format) +
                           "' device (install the Debian package plplot-driver-cairo)");
  const Frame fr = data_frame(figure);
  std::lock_guard<std::mutex> lock(plplot_mutex());
  {
    plstream pls;
    pls.sdev(device_name(format));
    pls.sfnam(path.c_str());
    pls.spage(0.0, 0.0, size.width_px, size.height_px, 0, 0);
    // Background and palette must be set before init (DESIGN.md section 4).
    pls.scolbg(255, 255, 255);
    pls.scol0(1, 0, 0, 0);
    for (int k = 0; k < 8; ++k)
      pls.scol0(kFirstSeriesColour + k, kPalette[k].r, kPalette[k].g, kPalette[k].b);
    pls.init();
    pls.schr(0.0, 1.1);
    pls.adv(0);
    pls.vpor(0.12, figure.map ? 0.80 : 0.95, 0.13, 0.90);
    pls.wind(fr.x0, fr.x1, fr.y0, fr.y1);
    if (figure.map) draw_map(pls, *figure.map, fr);
    // draw_map moves the viewport to the colour bar; return to the plot.
    pls.vpor(0.12, figure.map ? 0.80 : 0.95, 0.13, 0.90);
    pls.wind(fr.x0, fr.x1, fr.y0, fr.y1);
    pls.col0(1);
    pls.box(figure.log_x ? "bcnstl" : "bcnst", 0.0, 0, figure.log_y ? "bcnstvl" : "bcnstv", 0.0, 0);
    pls.lab(figure.x_label.c_str(), figure.y_label.c_str(), figure.title.c_str());
    for (const auto& s : figure.series) draw_series(pls, s, fr, figure.log_x, figure.log_y);
    draw_legend(pls, figure, fr);
  }  // the stream's destructor finishes and closes the file
  // cairo names some SVG elements after process-wide counters: renumber them so that the
  // bytes depend on the figure only (svg_ids.hpp).
  if (format == FigureFormat::svg) {
    std::string svg;
    {
      std::ifstream in(path, std::ios::binary);
      svg.assign(std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>());
      if (!in && !in.eof()) throw InputError(path, "", "cannot read back the SVG file cairo wrote");
    }
    std::ofstream out(path, std::ios::binary | std::ios::trunc);
    out << detail::renumber_svg_ids(svg);
    if (!out.flush()) throw InputError(path, "", "cannot write the SVG file");
  }
}

std::vector<std::string> write_figure(const Figure& figure, const std::string& dir,
                                      const std::string& stem, FigureSize size) {
  std::filesystem::create_directories(dir);
  std::vector<std::string> written;
  for (auto [format, ext] : {std::pair{FigureFormat::svg, ".svg"}, std::pair{FigureFormat::png, ".png"}}) {
    const std::string path = (std::filesystem::path(dir) / (stem + ext)).string();
    render_figure(figure, path, format, size);
    written.push_back(path);
  }
  return written;
}

}  // namespace macroreal
