#include "report/command_figures.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <filesystem>
#include <limits>

#include "core/error.hpp"

namespace macroreal {

std::string figure_stem(const std::string& label) {
  std::string s, text = label;
  for (std::size_t at; (at = text.find("->")) != std::string::npos;) text.replace(at, 2, " to ");
  for (char c : text) {
    const bool keep = std::isalnum(static_cast<unsigned char>(c)) || c == '-' || c == '_';
    s += keep ? c : '_';
  }
  return s;
}

void leave_room_for_legend(Figure& f) {
  const auto axis = [&f](double y) { return f.log_y ? (y > 0 ? std::log10(y) : NAN) : y; };
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  const auto add = [&](double y) {
    const double v = axis(y);
    if (std::isfinite(v)) {
      lo = std::min(lo, v);
      hi = std::max(hi, v);
    }
  };
  int rows = 0;
  for (const auto& s : f.series) {
    if (!s.label.empty()) ++rows;
    if (s.kind == FigureSeries::Kind::vertical_line) continue;
    if (s.kind == FigureSeries::Kind::horizontal_line) {
      if (!s.y.empty()) add(s.y[0]);
      continue;
    }
    for (const auto* v : {&s.y, &s.y_low, &s.y_high})
      for (double y : *v) add(y);
    if (s.kind == FigureSeries::Kind::histogram && !f.log_y) add(0.0);
  }
  if (!(lo <= hi)) return;  // nothing finite: render_figure reports it
  if (f.y_range) {          // a range the builder asked for bounds the data it shows
    lo = std::max(lo, axis(f.y_range->first));
    hi = std::min(hi, axis(f.y_range->second));
  }
  const double data = hi > lo ? hi - lo : (hi == 0 ? 1.0 : std::abs(hi) * 0.2);
  const double top = 0.06 * rows + 0.04;
  const double span = data / std::max(0.3, 1.0 - top - 0.05);
  const double y0 = lo - 0.05 * span, y1 = y0 + span;
  f.y_range = f.log_y ? std::pair{std::pow(10.0, y0), std::pow(10.0, y1)} : std::pair{y0, y1};
}

std::vector<std::string> write_figures(const std::vector<NamedFigure>& figures,
                                       const std::string& dir, FigureSize size) {
  // Check the devices first: a missing driver then writes nothing rather than half a set.
  if (!figure_format_available(FigureFormat::svg) || !figure_format_available(FigureFormat::png))
    throw UnsupportedError("--figures: PLplot has no svgcairo/pngcairo device (install the "
                           "Debian package plplot-driver-cairo)");
  std::vector<std::string> paths;
  for (const auto& f : figures)
    for (auto& p : write_figure(f.figure, dir, f.stem, size)) paths.push_back(std::move(p));
  return paths;
}

std::string figures_written_line(const std::string& dir, const std::vector<std::string>& paths) {
  std::string s = "Figures written to " + dir + ":";
  for (std::size_t k = 0; k < paths.size(); ++k)
    s += (k ? ", " : " ") + std::filesystem::path(paths[k]).filename().string();
  return s + "\n";
}

}  // namespace macroreal
