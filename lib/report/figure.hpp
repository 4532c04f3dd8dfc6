// Figures as data: a command describes what to draw (axes with units, curves, points with
// error bars, histograms, marker lines, a colour map with a boundary contour) in a `Figure`,
// and render_figure() draws it with PLplot's cairo driver as SVG or PNG. Commands never call
// PLplot themselves, so every figure shares one look: readable fonts, white background and a
// colour-blind-safe palette (Okabe & Ito, "Color Universal Design" (2008): eight colours
// distinguishable under the common colour-vision deficiencies; the map uses a monotone
// dark-blue-to-yellow ramp whose lightness increases steadily, so it also reads in grey).
#pragma once

#include <optional>
#include <string>
#include <vector>

namespace macroreal {

enum class FigureFormat { svg, png };

// The eight Okabe-Ito colours, in the order series use them by default.
enum class PaletteColour { black, orange, sky_blue, bluish_green, yellow, blue, vermillion,
                           reddish_purple };

struct FigureSeries {
  enum class Kind {
    line,             // y(x) joined
    points,           // markers at (x, y)
    error_bars,       // markers at (x, y) with vertical bars [y_low, y_high]
    histogram,        // bars: x are the left bin edges (size n+1), y the n heights
    vertical_line,    // one vertical marker at x[0] across the plot
    horizontal_line,  // one horizontal marker at y[0] across the plot
  };
  Kind kind = Kind::line;
  std::string label;                  // legend text (empty: not in the legend)
  std::vector<double> x, y, y_low, y_high;
  PaletteColour colour = PaletteColour::black;
  bool dashed = false;
};

// A colour map z(x, y) on a regular grid: z[i][j] at x = x_min + i*dx, y = y_min + j*dy, drawn
// as a cell centred on that point (the plotted range is half a step wider than the grid on each
// side; map_geometry.hpp). NaN cells are left blank. Optional contour at one level draws a
// boundary (e.g. where a test becomes feasible); it is not drawn around NaN cells.
struct FigureMap {
  std::vector<std::vector<double>> z;
  double x_min = 0, x_max = 1, y_min = 0, y_max = 1;
  std::string z_label;                // colour-bar label with units
  std::optional<double> boundary_level;
  bool log_z = false;                 // colour by log10(z) (z > 0)
  // A signed quantity (e.g. a Wigner function): the colour scale runs over [-m, m] with
  // m = max |z|, through white at 0, blue for negative and orange-red for positive values
  // (Okabe-Ito blue and vermillion, a pair the common colour-vision deficiencies keep apart),
  // so negative regions stand out. Ignored with log_z.
  bool diverging = false;
};

struct Figure {
  std::string title;
  std::string x_label, y_label;       // with units, e.g. "|#gb|" or "time (h)"
  std::vector<FigureSeries> series;
  std::optional<FigureMap> map;
  std::optional<std::pair<double, double>> x_range, y_range;  // default: fitted to the data
  bool log_x = false;
  bool log_y = false;                 // series y > 0 only; histogram bars start at the frame
};

struct FigureSize {
  int width_px = 800;
  int height_px = 600;
};

// True when PLplot has the cairo devices needed for `format` (checked before any plot is
// started: a missing driver makes PLplot exit the process).
bool figure_format_available(FigureFormat format);

// Draws `figure` into `path`. Throws UnsupportedError when the driver is missing, DomainError
// when the figure has nothing finite to draw.
void render_figure(const Figure& figure, const std::string& path, FigureFormat format,
                   FigureSize size = {});

// Writes <dir>/<stem>.svg and <dir>/<stem>.png (creating dir); returns the paths written.
std::vector<std::string> write_figure(const Figure& figure, const std::string& dir,
                                      const std::string& stem, FigureSize size = {});

}  // namespace macroreal
