#include "report/analysis_figures.hpp"
#include "report/text_layout.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <limits>
#include <optional>

#include "core/error.hpp"
#include "design/nsit_scan.hpp"

namespace macroreal {

namespace {

std::string percent(double level) {
  const double x = 100.0 * level;
  return detail::fixed_decimals(x, std::abs(x - std::round(x)) < 1e-9 ? 0 : 1) + " %";
}

const QuantityEstimate* estimate_of(const AnalysisResult& r, const std::string& name) {
  for (const auto& q : r.estimates)
    if (q.name == name) return &q;
  return nullptr;
}

// The y range of the finite values with the top 40 % left free for the legend.
std::pair<double, double> range_with_legend_room(const std::vector<double>& ys) {
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  for (double y : ys)
    if (std::isfinite(y)) {
      lo = std::min(lo, y);
      hi = std::max(hi, y);
    }
  if (!(hi >= lo)) return {0.0, 1.0};
  double span = hi - lo;
  if (span <= 0.0) span = std::max(0.1, 0.1 * std::abs(hi));
  return {lo - 0.08 * span, hi + 0.7 * span};
}

void add_interval_bars(FigureSeries& s, double x, const QuantityEstimate* q, double value) {
  s.x.push_back(x);
  s.y.push_back(value);
  const bool ok = q && q->ci.valid;
  s.y_low.push_back(ok ? q->ci.lo : value);
  s.y_high.push_back(ok ? q->ci.hi : value);
}

// "95 % bca interval": the default interval of the result.
std::string interval_words(const AnalysisResult& r) {
  return percent(r.level) + " " + (r.estimates.empty() ? std::string("bca") : r.estimates.front().ci.method) +
         " interval";
}
std::string interval_label(const AnalysisResult& r) { return "measured, " + interval_words(r); }

std::optional<AnalysisFigure> lg_figure(const AnalysisResult& r) {
  if (r.leggett_garg.empty()) return std::nullopt;
  AnalysisFigure af;
  af.stem = "lg_estimates";
  Figure& f = af.figure;
  f.title = "Leggett-Garg K per test";
  std::string names;
  FigureSeries measured, model, kicked, bounds;
  measured.kind = FigureSeries::Kind::error_bars;
  measured.label = interval_label(r);
  measured.colour = PaletteColour::vermillion;
  model.kind = FigureSeries::Kind::points;
  model.label = "model K";
  model.colour = PaletteColour::blue;
  kicked.kind = FigureSeries::Kind::points;
  kicked.label = "kicked classical K";
  kicked.colour = PaletteColour::bluish_green;
  std::vector<double> ys;
  bool same_bound = true;
  for (std::size_t i = 0; i < r.leggett_garg.size(); ++i) {
    const auto& a = r.leggett_garg[i];
    const double x = static_cast<double>(i + 1);
    names += (i ? ", " : "") + std::to_string(i + 1) + " = " + a.label;
    const QuantityEstimate* q = estimate_of(r, a.quantity);
    add_interval_bars(measured, x, q, a.K);
    ys.insert(ys.end(), {a.K, measured.y_low.back(), measured.y_high.back(), a.bound});
    if (a.model) {
      model.x.push_back(x);
      model.y.push_back(a.model->K_model);
      ys.push_back(a.model->K_model);
      if (a.model->K_classical_kicked) {
        kicked.x.push_back(x);
        kicked.y.push_back(*a.model->K_classical_kicked);
        ys.push_back(*a.model->K_classical_kicked);
      }
    }
    bounds.x.push_back(x);
    bounds.y.push_back(a.bound);
    same_bound = same_bound && a.bound == r.leggett_garg.front().bound;
  }
  f.x_label = "LG test (" + names + ")";
  f.y_label = "K (dimensionless)";
  f.x_range = std::make_pair(0.5, r.leggett_garg.size() + 0.5);
  f.y_range = range_with_legend_room(ys);
  f.series.push_back(measured);
  if (!model.x.empty()) f.series.push_back(model);
  if (!kicked.x.empty()) f.series.push_back(kicked);
  if (same_bound) {
    FigureSeries b;
    b.kind = FigureSeries::Kind::horizontal_line;
    b.label = "macrorealist bound K = " + detail::fixed_decimals(r.leggett_garg.front().bound, 0);
    b.dashed = true;
    b.y = {r.leggett_garg.front().bound};
    f.series.push_back(b);
  } else {
    bounds.kind = FigureSeries::Kind::points;
    bounds.label = "macrorealist bound n - 2";
    f.series.push_back(bounds);
  }
  af.caption = "K of every Leggett-Garg test with its " + interval_words(r) +
               (model.x.empty() ? "" : ", the model's K") + (kicked.x.empty() ? "" : " and the kicked classical K") +
               "; the dashed line is the macrorealist bound.";
  return af;
}

std::optional<AnalysisFigure> nsit_figure(const AnalysisResult& r,
                                          const std::optional<NsitScan>& scan,
                                          const std::optional<ModelCurve>& curve) {
  if (r.nsit.empty()) return std::nullopt;
  AnalysisFigure af;
  af.stem = "nsit_estimates";
  Figure& f = af.figure;
  f.title = scan ? "NSIT S over the scan" : "NSIT S per test";
  FigureSeries measured, model;
  measured.kind = FigureSeries::Kind::error_bars;
  measured.label = interval_label(r);
  measured.colour = PaletteColour::vermillion;
  model.kind = FigureSeries::Kind::points;
  model.label = "model S";
  model.colour = PaletteColour::blue;
  std::vector<double> ys{0.0}, xs;
  std::string names;
  for (std::size_t i = 0; i < r.nsit.size(); ++i) {
    const auto& a = r.nsit[i];
    const double x = scan ? scan->values.at(i) : static_cast<double>(i + 1);
    xs.push_back(x);
    names += (i ? ", " : "") + std::to_string(i + 1) + " = " + a.label;
    const QuantityEstimate* q = estimate_of(r, a.quantity);
    add_interval_bars(measured, x, q, a.S);
    ys.insert(ys.end(), {a.S, measured.y_low.back(), measured.y_high.back()});
    if (a.S_model) {
      model.x.push_back(x);
      model.y.push_back(*a.S_model);
      ys.push_back(*a.S_model);
    }
  }
  if (scan) {
    f.x_label = scan->axis_label;
    const auto [lo, hi] = std::minmax_element(xs.begin(), xs.end());
    const double pad = 0.05 * (*hi - *lo);
    f.x_range = std::make_pair(*lo - pad, *hi + pad);
  } else {
    f.x_label = "NSIT test (" + names + ")";
    f.x_range = std::make_pair(0.5, r.nsit.size() + 0.5);
  }
  f.y_label = "S (probability difference)";
  if (curve) {
    FigureSeries line;
    line.label = "model S along the scan";
    line.colour = PaletteColour::sky_blue;
    line.x = curve->x;
    line.y = curve->y;
    ys.insert(ys.end(), curve->y.begin(), curve->y.end());
    f.series.push_back(line);
  }
  f.y_range = range_with_legend_room(ys);
  f.series.push_back(measured);
  if (!model.x.empty()) f.series.push_back(model);
  FigureSeries zero;
  zero.kind = FigureSeries::Kind::horizontal_line;
  zero.label = "no signalling in time, S = 0";
  zero.dashed = true;
  zero.y = {0.0};
  f.series.push_back(zero);
  af.caption = std::string("S of every NSIT test") + (scan ? " against the scanned setting" : "") + " with its " +
               interval_words(r) + (curve ? ", the model's S along the scan" : "") +
               (model.x.empty() ? "" : ", the model's S at the settings") +
               "; the dashed line is S = 0 (no signalling).";
  return af;
}

std::optional<AnalysisFigure> scan_histogram_figure(const AnalysisResult& r, const NsitScan& scan,
                                                    const SamplingPrediction& sampling) {
  std::vector<double> measured;
  for (const auto& a : r.nsit)
    if (std::isfinite(a.S)) measured.push_back(a.S);
  if (measured.size() < 2 || sampling.entries.empty()) return std::nullopt;
  std::vector<double> extra;
  for (const auto& e : sampling.entries) {
    extra.push_back(e.model_value - 3.0 * e.std_error);
    extra.push_back(e.model_value + 3.0 * e.std_error);
  }
  const int bins = std::clamp(2 * static_cast<int>(std::ceil(std::sqrt(double(measured.size())))), 4, 20);
  const std::vector<double> edges = histogram_edges(measured, extra, bins);
  AnalysisFigure af;
  af.stem = "nsit_scan_histogram";
  Figure& f = af.figure;
  f.title = "Measured S over " + std::to_string(measured.size()) + " settings against the model";
  f.x_label = "S (probability difference)";
  f.y_label = "settings per bin";
  FigureSeries h;
  h.kind = FigureSeries::Kind::histogram;
  h.label = "measured S";
  h.colour = PaletteColour::vermillion;
  h.x = edges;
  h.y = histogram_counts(measured, edges);
  FigureSeries e = h;
  e.label = "model: expected settings per bin";
  e.colour = PaletteColour::blue;
  e.dashed = true;
  e.y = sampling.expected_counts(edges);
  FigureSeries d;
  d.label = "model density x settings x bin width";
  d.colour = PaletteColour::sky_blue;
  const double width = edges[1] - edges[0];
  const double n = static_cast<double>(sampling.entries.size());
  for (int i = 0; i <= 200; ++i) {
    const double s = edges.front() + (edges.back() - edges.front()) * i / 200.0;
    d.x.push_back(s);
    d.y.push_back(n * width * sampling.density(s));
  }
  std::vector<double> ys = h.y;
  ys.insert(ys.end(), e.y.begin(), e.y.end());
  ys.insert(ys.end(), d.y.begin(), d.y.end());
  ys.push_back(0.0);
  f.y_range = range_with_legend_room(ys);
  f.y_range->first = 0.0;
  f.series = {h, e, d};
  af.caption = "Histogram of the measured S over the " + std::to_string(measured.size()) + " settings of the scan (" +
               scan.axis_label + ") against what the model predicts with the campaign's shot numbers (" +
               sampling.method + ").";
  return af;
}

std::optional<AnalysisFigure> bootstrap_figure(const AnalysisResult& r, const QuantityEstimate& q,
                                               const AnalysisFigureOptions& options) {
  std::vector<double> reps;
  for (double x : q.bootstrap_replicates)
    if (std::isfinite(x)) reps.push_back(x);
  if (reps.size() < 2 || !std::isfinite(q.estimate)) return std::nullopt;
  std::vector<double> extra{q.estimate};
  if (q.ci.valid) extra.insert(extra.end(), {q.ci.lo, q.ci.hi});
  const std::vector<double> edges = histogram_edges(reps, extra, options.bootstrap_bins);
  AnalysisFigure af;
  af.stem = "bootstrap_" + quantity_figure_stem(q.name);
  Figure& f = af.figure;
  f.title = "Bootstrap distribution of " + q.name;
  f.x_label = q.name + (q.kind == QuantityKind::lg_k ? " (dimensionless)" : " (probability difference)");
  f.y_label = "replicates per bin";
  FigureSeries h;
  h.kind = FigureSeries::Kind::histogram;
  h.label = std::to_string(reps.size()) + " replicates (seed " + std::to_string(r.seed) + ")";
  h.colour = PaletteColour::blue;
  h.x = edges;
  h.y = histogram_counts(reps, edges);
  f.series.push_back(h);
  FigureSeries est;
  est.kind = FigureSeries::Kind::vertical_line;
  est.label = "estimate " + detail::fixed_decimals(q.estimate, 4);
  est.colour = PaletteColour::black;
  est.x = {q.estimate};
  f.series.push_back(est);
  if (q.ci.valid) {
    FigureSeries lo;
    lo.kind = FigureSeries::Kind::vertical_line;
    lo.label = percent(r.level) + " " + q.ci.method + " interval [" + detail::fixed_decimals(q.ci.lo, 4) + ", " + detail::fixed_decimals(q.ci.hi, 4) + "]";
    lo.colour = PaletteColour::vermillion;
    lo.dashed = true;
    lo.x = {q.ci.lo};
    FigureSeries hi = lo;
    hi.label.clear();
    hi.x = {q.ci.hi};
    f.series.push_back(lo);
    f.series.push_back(hi);
  }
  std::vector<double> ys = h.y;
  ys.push_back(0.0);
  f.y_range = range_with_legend_room(ys);
  f.y_range->first = 0.0;
  af.caption = "Bootstrap distribution of " + q.name + " (B = " + std::to_string(r.replicates) +
               ", recentred replicates from which the interval is computed) with the estimate and the " +
               percent(r.level) + " " + q.ci.method + " interval" + (q.ci.valid ? "" : " (not computable)") + ".";
  return af;
}

}  // namespace

std::vector<double> histogram_edges(const std::vector<double>& values, const std::vector<double>& extra, int bins) {
  if (bins < 1) throw DomainError("histogram bins = " + std::to_string(bins) + ", but must be >= 1");
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  for (const auto* v : {&values, &extra})
    for (double x : *v)
      if (std::isfinite(x)) {
        lo = std::min(lo, x);
        hi = std::max(hi, x);
      }
  if (!(hi >= lo)) throw DomainError("histogram: no finite value");
  if (hi == lo) {
    const double d = std::max(1e-9, 1e-9 * std::abs(lo));
    lo -= d;
    hi += d;
  }
  std::vector<double> edges(static_cast<std::size_t>(bins) + 1);
  for (int k = 0; k <= bins; ++k) edges[static_cast<std::size_t>(k)] = lo + (hi - lo) * k / bins;
  edges.back() = hi;
  return edges;
}

std::vector<double> histogram_counts(const std::vector<double>& values, const std::vector<double>& edges) {
  if (edges.size() < 2) throw DomainError("histogram: needs at least two edges");
  std::vector<double> counts(edges.size() - 1, 0.0);
  for (double x : values) {
    if (!std::isfinite(x) || x < edges.front() || x > edges.back()) continue;
    auto k = static_cast<std::size_t>(std::upper_bound(edges.begin(), edges.end(), x) - edges.begin());
    k = k == 0 ? 0 : k - 1;
    if (k >= counts.size()) k = counts.size() - 1;  // the last bin is closed
    counts[k] += 1.0;
  }
  return counts;
}

std::string quantity_figure_stem(const std::string& quantity) {
  std::string s;
  for (std::size_t i = 0; i < quantity.size(); ++i) {
    const char c = quantity[i];
    if (std::isalnum(static_cast<unsigned char>(c))) s += c;
    else if (c == '-' && i + 1 < quantity.size() && quantity[i + 1] == '>') { s += '-'; ++i; }
    else if (c == '[' || c == ':' || c == ',') s += '_';
    else if (c == '+') s += 'p';
    else if (c == '-') s += 'm';
  }
  return s;
}

AnalysisFigures analysis_figures(const Protocol& protocol, const CampaignCounts& counts,
                                 const AnalysisResult& result, const AnalysisFigureOptions& options) {
  AnalysisFigures out;
  const std::optional<NsitScan> scan = find_nsit_scan(protocol);
  std::optional<ModelCurve> curve;
  std::optional<SamplingPrediction> sampling;
  if (scan && protocol.state) {
    try {
      curve = nsit_scan_curve(protocol, *scan, options.curve_points);
      sampling = nsit_sampling_prediction(protocol, counts);
    } catch (const DomainError& e) {
      out.omitted.push_back(std::string("model curve and scan histogram: the model could not be computed (") + e.what() + ")");
    } catch (const UnsupportedError& e) {
      out.omitted.push_back(std::string("model curve and scan histogram: the model could not be computed (") + e.what() + ")");
    }
  }
  if (auto f = lg_figure(result)) out.figures.push_back(std::move(*f));
  else out.omitted.push_back("lg_estimates: the protocol has no Leggett-Garg test");
  if (auto f = nsit_figure(result, scan, curve)) out.figures.push_back(std::move(*f));
  else out.omitted.push_back("nsit_estimates: the protocol has no NSIT test");
  if (!scan) {
    out.omitted.push_back("nsit_scan_histogram: no scan (it needs two or more NSIT tests with one later measurement whose earlier measurements differ in exactly one setting)");
  } else if (!protocol.state) {
    out.omitted.push_back("nsit_scan_histogram: the protocol has no model (state)");
  } else if (sampling) {
    if (auto f = scan_histogram_figure(result, *scan, *sampling)) out.figures.push_back(std::move(*f));
    else out.omitted.push_back("nsit_scan_histogram: fewer than two finite S or no model standard error");
  }
  std::vector<const QuantityEstimate*> boot;
  for (const auto& a : result.leggett_garg)
    if (const auto* q = estimate_of(result, a.quantity)) boot.push_back(q);
  for (const auto& a : result.nsit)
    if (const auto* q = estimate_of(result, a.quantity)) boot.push_back(q);
  for (const auto* q : boot) {
    if (q->bootstrap_replicates.empty()) {
      out.omitted.push_back("bootstrap_" + quantity_figure_stem(q->name) + ": the replicates were not kept");
      continue;
    }
    if (auto f = bootstrap_figure(result, *q, options)) out.figures.push_back(std::move(*f));
    else out.omitted.push_back("bootstrap_" + quantity_figure_stem(q->name) + ": fewer than two finite replicates");
  }
  return out;
}

std::vector<std::string> write_analysis_figures(const AnalysisFigures& figures, const std::string& dir) {
  std::vector<std::string> paths;
  for (const auto& f : figures.figures) {
    const auto written = write_figure(f.figure, dir, f.stem);
    paths.insert(paths.end(), written.begin(), written.end());
  }
  return paths;
}

}  // namespace macroreal
