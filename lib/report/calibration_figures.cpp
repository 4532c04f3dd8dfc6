#include "report/calibration_figures.hpp"
#include "report/text_layout.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "detection/thresholds.hpp"

namespace macroreal {

namespace {

std::string sci(double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.2g", v);
  return buf;
}

}  // namespace

FittedCounts fitted_counts(const CountHistograms& h, const CalibrationResult& r, long n_max) {
  const long largest = static_cast<long>(std::max({h.dark.size(), h.bright.size(), h.unknown.size()})) - 1;
  if (n_max < 0) n_max = std::max(largest, threshold_scan_limit(r.fit.model));
  FittedCounts f;
  f.observed.assign(n_max + 1, 0.0);
  for (const auto* hist : {&h.dark, &h.bright, &h.unknown})
    for (std::size_t n = 0; n < hist->size() && static_cast<long>(n) <= n_max; ++n)
      f.observed[n] += static_cast<double>((*hist)[n]);
  const double nd = static_cast<double>(histogram_shots(h.dark));
  const double nb = static_cast<double>(histogram_shots(h.bright));
  const double nu = static_cast<double>(histogram_shots(h.unknown));
  f.shots = nd + nb + nu;
  const double w = r.fit.has_unknown ? r.fit.bright_fraction : 0.0;
  const double dark_shots = nd + nu * (1.0 - w), bright_shots = nb + nu * w;
  const std::vector<double> pd = dark_pmf(r.fit.model, n_max), pb = bright_pmf(r.fit.model, n_max);
  for (long n = 0; n <= n_max; ++n) {
    f.dark.push_back(dark_shots * pd[n]);
    f.bright.push_back(bright_shots * pb[n]);
    f.total.push_back(f.dark.back() + f.bright.back());
  }
  return f;
}

Figure count_histogram_figure(const CountHistograms& h, const CalibrationResult& r) {
  const FittedCounts c = fitted_counts(h, r);
  Figure f;
  f.title = "Photon counts of " + detail::fixed_decimals(c.shots, 0) + " calibration shots and the fitted mixture";
  f.x_label = "photon counts per detection window" +
              (r.window_s > 0 ? " (" + sci(r.window_s) + " s)" : std::string());
  f.y_label = "shots";
  f.log_y = true;
  double peak = 1.0;
  for (double v : c.observed) peak = std::max(peak, v);
  // Half a shot is the floor of the axis: below it the expected numbers are tails nobody sees.
  const double floor = 0.5;
  f.y_range = std::pair{floor, peak};
  // Only the counts where something is visible: up to the last observed count or the last
  // count the fit expects at least the floor, whichever is larger.
  std::size_t last = 0;
  for (std::size_t n = 0; n < c.observed.size(); ++n)
    if (c.observed[n] > 0 || c.total[n] >= floor) last = n;
  last = std::min(c.observed.size() - 1, last + 2);
  const auto upto = [last](const std::vector<double>& v) {
    return std::vector<double>(v.begin(), v.begin() + static_cast<long>(last) + 1);
  };
  FigureSeries hist;
  hist.kind = FigureSeries::Kind::histogram;
  hist.label = "observed (all shots)";
  hist.colour = PaletteColour::black;
  for (std::size_t n = 0; n <= last + 1; ++n) hist.x.push_back(static_cast<double>(n) - 0.5);
  hist.y = upto(c.observed);
  std::vector<double> xs;
  for (std::size_t n = 0; n <= last; ++n) xs.push_back(static_cast<double>(n));
  // Expected numbers far below the floor are drawn at a tenth of it (clipped by the frame)
  // so a line never meets log(0).
  const auto clipped = [&](const std::vector<double>& v) {
    std::vector<double> out = upto(v);
    for (double& y : out) y = std::max(y, 0.1 * floor);
    return out;
  };
  FigureSeries total;
  total.label = "fitted mixture (" + r.fit.method + ")";
  total.colour = PaletteColour::blue;
  total.x = xs;
  total.y = clipped(c.total);
  FigureSeries dark;
  dark.label = "dark component, rate " + detail::fixed_decimals(r.fit.model.dark_rate, 3);
  dark.colour = PaletteColour::sky_blue;
  dark.dashed = true;
  dark.x = xs;
  dark.y = clipped(c.dark);
  FigureSeries bright;
  bright.label = "bright component, rate " + detail::fixed_decimals(r.fit.model.bright_rate, 3);
  bright.colour = PaletteColour::orange;
  bright.dashed = true;
  bright.x = xs;
  bright.y = clipped(c.bright);
  FigureSeries chosen;
  chosen.kind = FigureSeries::Kind::vertical_line;
  chosen.label = "threshold used (minimum error): dark if counts <= " + std::to_string(r.threshold);
  chosen.colour = PaletteColour::vermillion;
  chosen.x = {static_cast<double>(r.threshold) + 0.5};
  f.series = {hist, total, dark, bright, chosen};
  if (r.balanced.threshold != r.threshold) {
    FigureSeries bal;
    bal.kind = FigureSeries::Kind::vertical_line;
    bal.label = "balanced threshold: dark if counts <= " + std::to_string(r.balanced.threshold);
    bal.colour = PaletteColour::reddish_purple;
    bal.dashed = true;
    bal.x = {static_cast<double>(r.balanced.threshold) + 0.5};
    f.series.push_back(bal);
  }
  leave_room_for_legend(f);
  return f;
}

std::vector<NamedFigure> calibration_figures(const CountHistograms& h, const CalibrationResult& r) {
  return {{"count_histogram", count_histogram_figure(h, r)}};
}

}  // namespace macroreal
