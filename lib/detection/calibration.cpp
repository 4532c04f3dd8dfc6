#include "detection/calibration.hpp"

#include <algorithm>
#include <cmath>

#include "core/error.hpp"
#include "phase_space/number_text.hpp"
#include "stats/random_variates.hpp"

namespace macroreal {

namespace {

using detail::number_text;

// Resamples a histogram with its own size (multinomial on the observed frequencies).
std::vector<long> resample(RandomEngine& g, const std::vector<long>& h) {
  const long n = histogram_shots(h);
  std::vector<long> out(h.size(), 0);
  if (n == 0) return out;
  std::vector<double> w(h.begin(), h.end()), draw(h.size(), 0.0);
  multinomial(g, n, w, draw);
  for (std::size_t i = 0; i < h.size(); ++i) out[i] = static_cast<long>(draw[i]);
  return out;
}

// Percentile interval: order statistics at ceil(B a/2) and ceil(B (1 - a/2)) (1-based).
CalibrationEstimate percentile(double estimate, std::vector<double> v, double level) {
  CalibrationEstimate iv{estimate, estimate, estimate};
  if (v.empty()) return iv;
  std::sort(v.begin(), v.end());
  const double a = (1 - level) / 2;
  const auto B = static_cast<double>(v.size());
  const auto lo = static_cast<std::size_t>(std::max(1.0, std::ceil(B * a))) - 1;
  const auto hi = static_cast<std::size_t>(std::min(B, std::ceil(B * (1 - a)))) - 1;
  iv.lo = std::min(v[lo], estimate);
  iv.hi = std::max(v[hi], estimate);
  return iv;
}

}  // namespace

std::vector<WindowRow> window_table(const CountModel& m, double window_s, const std::vector<double>& windows) {
  validate(m);
  std::vector<double> factors;
  if (windows.empty()) {
    factors = {0.25, 0.5, 1.0, 2.0, 4.0};
  } else {
    for (double w : windows) {
      if (!(w > 0) || !std::isfinite(w))
        throw DomainError("window-table entry = " + number_text(w) + ", but must be > 0");
      factors.push_back(window_s > 0 ? w / window_s : w);
    }
  }
  std::vector<WindowRow> rows;
  for (double f : factors) {
    WindowRow r;
    r.factor = f;
    r.window_s = window_s > 0 ? f * window_s : 0.0;
    r.model = scaled_window(m, f);
    r.best = minimum_error_threshold(r.model);
    rows.push_back(r);
  }
  return rows;
}

CalibrationResult calibrate_counts(const CountHistograms& h, const CalibrationOptions& o) {
  if (o.bootstrap_replicates < 100)
    throw DomainError("bootstrap replicates = " + std::to_string(o.bootstrap_replicates) + ", but must be >= 100");
  if (!(o.level > 0 && o.level < 1)) throw DomainError("level = " + number_text(o.level) + ", but must be in (0, 1)");
  if (!(o.window_s >= 0)) throw DomainError("window_s = " + number_text(o.window_s) + ", but must be >= 0");
  CalibrationResult r;
  r.file = h.file;
  r.rows = h.rows;
  r.dark_shots = histogram_shots(h.dark);
  r.bright_shots = histogram_shots(h.bright);
  r.unknown_shots = histogram_shots(h.unknown);
  r.window_s = o.window_s > 0 ? o.window_s : h.window_s;
  r.level = o.level;
  r.seed = o.seed;
  MixtureFitOptions fo;
  if (o.dark_lifetime_s) {
    if (!(*o.dark_lifetime_s > 0) || !std::isfinite(*o.dark_lifetime_s))
      throw DomainError("dark lifetime = " + number_text(*o.dark_lifetime_s) + " s, but must be > 0");
    if (r.window_s <= 0)
      throw DomainError("a dark lifetime needs the detection window length: give a window_s column or --window-s");
    r.dark_lifetime_s = o.dark_lifetime_s;
    fo.pump_per_window = r.window_s / *o.dark_lifetime_s;
  }
  r.fit = fit_mixture(h, fo);
  r.gof = goodness_of_fit(h, r.fit);
  r.minimum_error = minimum_error_threshold(r.fit.model);
  r.balanced = balanced_threshold(r.fit.model);
  r.threshold = r.minimum_error.threshold;

  for (std::size_t n = 0; n < h.dark.size(); ++n)
    if (static_cast<long>(n) > r.threshold) r.dark_above += h.dark[n];
  for (std::size_t n = 0; n < h.bright.size() && static_cast<long>(n) <= r.threshold; ++n)
    r.bright_at_or_below += h.bright[n];

  // Bootstrap: one engine per replicate (derive_seed), so the result does not depend on order.
  std::vector<double> bd, bb, bw, e1, e2;
  for (int b = 0; b < o.bootstrap_replicates; ++b) {
    RandomEngine g(derive_seed(o.seed, static_cast<std::uint64_t>(b)));
    CountHistograms s;
    s.file = h.file;
    s.dark = resample(g, h.dark);
    s.bright = resample(g, h.bright);
    s.unknown = resample(g, h.unknown);
    const MixtureFit f = fit_mixture(s, fo, r.fit);
    if (!f.converged || !std::isfinite(f.log_likelihood) || !(f.model.bright_rate > f.model.dark_rate)) {
      ++r.bootstrap_failures;
      continue;
    }
    const Misassignment e = misassignment(f.model, r.threshold);
    bd.push_back(f.model.dark_rate);
    bb.push_back(f.model.bright_rate);
    bw.push_back(f.bright_fraction);
    e1.push_back(e.dark_read_bright);
    e2.push_back(e.bright_read_dark);
  }
  r.bootstrap_replicates = o.bootstrap_replicates;
  r.dark_rate = percentile(r.fit.model.dark_rate, bd, o.level);
  r.bright_rate = percentile(r.fit.model.bright_rate, bb, o.level);
  r.bright_fraction = percentile(r.fit.bright_fraction, bw, o.level);
  r.dark_read_bright = percentile(r.minimum_error.errors.dark_read_bright, e1, o.level);
  r.bright_read_dark = percentile(r.minimum_error.errors.bright_read_dark, e2, o.level);

  r.window_table_in_seconds = r.window_s > 0;
  r.window_table = window_table(r.fit.model, r.window_s, o.table_windows);
  return r;
}

Calibration to_calibration(const CalibrationResult& r) {
  Calibration c;
  c.dark_rate = r.fit.model.dark_rate;
  c.bright_rate = r.fit.model.bright_rate;
  c.threshold = static_cast<double>(r.threshold);
  c.dark_read_bright = r.dark_read_bright.estimate;
  c.bright_read_dark = r.bright_read_dark.estimate;
  c.dark_read_bright_ci = std::make_pair(r.dark_read_bright.lo, r.dark_read_bright.hi);
  c.bright_read_dark_ci = std::make_pair(r.bright_read_dark.lo, r.bright_read_dark.hi);
  c.ci_level = r.level;
  c.window_s = r.window_s;
  c.dark_lifetime_s = r.dark_lifetime_s;
  c.shots = r.rows;
  c.source_file = r.file;
  return c;
}

}  // namespace macroreal
