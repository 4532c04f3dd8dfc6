// The analysis figures (lib/report/analysis_figures.hpp) are tied to the analysis they draw:
// the interval endpoints and estimates in the figures are the result's, the histograms count
// every replicate and every setting, the model curve passes through the model's S at the
// scanned settings, and the model's predicted distribution of S over a scan is a density
// (integrates to 1) whose spread matches the spread of S in campaigns simulated from the model.
#include <catch2/catch.hpp>

#include <cmath>
#include <algorithm>
#include <numeric>

#include "analysis_fixtures.hpp"
#include "core/error.hpp"
#include "design/nsit_scan.hpp"
#include "report/analysis_figures.hpp"
#include "stats/estimator.hpp"
#include "support/compare.hpp"

using namespace macroreal;
using namespace macroreal::test_support;

namespace {

const AnalysisFigure* find_figure(const AnalysisFigures& f, const std::string& stem) {
  for (const auto& x : f.figures)
    if (x.stem == stem) return &x;
  return nullptr;
}

const FigureSeries* find_series(const Figure& f, FigureSeries::Kind kind, const std::string& label_start = "") {
  for (const auto& s : f.series)
    if (s.kind == kind && s.label.rfind(label_start, 0) == 0) return &s;
  return nullptr;
}

const QuantityEstimate& estimate(const AnalysisResult& r, const std::string& name) {
  for (const auto& q : r.estimates)
    if (q.name == name) return q;
  FAIL("no estimate " << name);
  return r.estimates.front();
}

double sum(const std::vector<double>& v) { return std::accumulate(v.begin(), v.end(), 0.0); }

}  // namespace

TEST_CASE("analysis figures: estimates, intervals and model values are the result's", "[report][analysis_figures]") {
  const Protocol p = analysis_protocol("protocols/lg3_thermal.json");
  const RunsInput runs = read_runs_file(source_path("example_runs/lg3_thermal_runs.csv"), p, {});
  const AnalysisResult r = analyse_campaign(p, runs.read.counts, quick_options());
  const AnalysisFigures figs = analysis_figures(p, runs.read.counts, r);

  const AnalysisFigure* lg = find_figure(figs, "lg_estimates");
  REQUIRE(lg);
  const FigureSeries* bars = find_series(lg->figure, FigureSeries::Kind::error_bars);
  REQUIRE(bars);
  REQUIRE(bars->y.size() == r.leggett_garg.size());
  const QuantityEstimate& k = estimate(r, r.leggett_garg[0].quantity);
  CHECK(bars->y[0] == k.estimate);
  CHECK(bars->y_low[0] == k.ci.lo);
  CHECK(bars->y_high[0] == k.ci.hi);
  const FigureSeries* model = find_series(lg->figure, FigureSeries::Kind::points, "model");
  REQUIRE(model);
  REQUIRE(r.leggett_garg[0].model);
  CHECK(model->y[0] == r.leggett_garg[0].model->K_model);
  const FigureSeries* bound = find_series(lg->figure, FigureSeries::Kind::horizontal_line);
  REQUIRE(bound);
  CHECK(bound->y[0] == r.leggett_garg[0].bound);

  const AnalysisFigure* ns = find_figure(figs, "nsit_estimates");
  REQUIRE(ns);
  const FigureSeries* sbars = find_series(ns->figure, FigureSeries::Kind::error_bars);
  REQUIRE(sbars);
  const QuantityEstimate& s = estimate(r, r.nsit[0].quantity);
  CHECK(sbars->y_low[0] == s.ci.lo);
  CHECK(sbars->y_high[0] == s.ci.hi);

  // One NSIT test is no scan: no scan histogram, and the report is told why.
  CHECK_FALSE(find_figure(figs, "nsit_scan_histogram"));
  CHECK(std::any_of(figs.omitted.begin(), figs.omitted.end(),
                    [](const std::string& o) { return o.rfind("nsit_scan_histogram", 0) == 0; }));

  // Bootstrap distribution of K: every replicate counted once, interval lines at the endpoints.
  const AnalysisFigure* bk = find_figure(figs, "bootstrap_" + quantity_figure_stem(k.name));
  REQUIRE(bk);
  const FigureSeries* hist = find_series(bk->figure, FigureSeries::Kind::histogram);
  REQUIRE(hist);
  CHECK(sum(hist->y) == static_cast<double>(r.replicates));
  CHECK(hist->x.size() == hist->y.size() + 1);
  std::vector<double> lines;
  for (const auto& x : bk->figure.series)
    if (x.kind == FigureSeries::Kind::vertical_line) lines.push_back(x.x.at(0));
  REQUIRE(lines.size() == 3);  // estimate, lower and upper limit
  CHECK(lines[0] == k.estimate);
  CHECK(lines[1] == k.ci.lo);
  CHECK(lines[2] == k.ci.hi);
  // The replicates are the ones the interval came from: with numpy's quantile rule the
  // percentile interval lies inside their range.
  CHECK(hist->x.front() <= k.ci.lo);
  CHECK(hist->x.back() >= k.ci.hi);
}

TEST_CASE("analysis figures: no kept replicates means no bootstrap figure, with the reason", "[report][analysis_figures]") {
  const Protocol p = analysis_protocol("protocols/lg3_thermal.json");
  const RunsInput runs = read_runs_file(source_path("example_runs/lg3_thermal_runs.csv"), p, {});
  AnalysisOptions o = quick_options();
  o.keep_replicates = false;
  const AnalysisResult r = analyse_campaign(p, runs.read.counts, o);
  const AnalysisFigures figs = analysis_figures(p, runs.read.counts, r);
  for (const auto& f : figs.figures) CHECK(f.stem.rfind("bootstrap_", 0) != 0);
  CHECK(std::count_if(figs.omitted.begin(), figs.omitted.end(), [](const std::string& s) {
          return s.find("replicates were not kept") != std::string::npos;
        }) == 2);
}

TEST_CASE("analysis figures: an NSIT orientation scan gives the curve and the predicted histogram", "[report][analysis_figures]") {
  const Protocol p = analysis_protocol("protocols/nsit_orientation_scan_cat.json");
  const auto scan = find_nsit_scan(p);
  REQUIRE(scan);
  CHECK(scan->parameter == "beta_angle_deg");
  REQUIRE(scan->values.size() == 6);
  CHECK_CLOSE(scan->values[1], 30.0, 1e-9, 0.0);  // the file's beta_polar angles 0, 30, ..., 150
  CHECK_CLOSE(scan->values[5], 150.0, 1e-9, 0.0);

  const CampaignCounts counts = simulated_counts(p, 2000.0, 11);
  const AnalysisResult r = analyse_campaign(p, counts, quick_options());
  const AnalysisFigures figs = analysis_figures(p, counts, r);

  const AnalysisFigure* ns = find_figure(figs, "nsit_estimates");
  REQUIRE(ns);
  const FigureSeries* curve = find_series(ns->figure, FigureSeries::Kind::line);
  REQUIRE(curve);
  // The curve runs from the first to the last setting and passes through the model's S there.
  CHECK(curve->x.front() == scan->values.front());
  CHECK(curve->x.back() == scan->values.back());
  REQUIRE(r.nsit.front().S_model);
  CHECK_CLOSE(curve->y.front(), *r.nsit.front().S_model, 1e-12, 0.0);
  CHECK_CLOSE(curve->y.back(), *r.nsit.back().S_model, 1e-12, 0.0);
  const FigureSeries* bars = find_series(ns->figure, FigureSeries::Kind::error_bars);
  REQUIRE(bars);
  for (std::size_t i = 0; i < r.nsit.size(); ++i) {
    CHECK(bars->x[i] == scan->values[i]);
    CHECK(bars->y[i] == r.nsit[i].S);
  }

  const AnalysisFigure* h = find_figure(figs, "nsit_scan_histogram");
  REQUIRE(h);
  const FigureSeries* measured = find_series(h->figure, FigureSeries::Kind::histogram, "measured");
  const FigureSeries* expected = find_series(h->figure, FigureSeries::Kind::histogram, "model");
  REQUIRE(measured);
  REQUIRE(expected);
  CHECK(sum(measured->y) == 6.0);
  // The edges cover every model mean +- 3 sigma, so at most 6 * 0.0027 settings fall outside.
  CHECK(sum(expected->y) <= 6.0 + 1e-12);
  CHECK(sum(expected->y) >= 6.0 * (1.0 - 0.0027));

  // The predicted mixture density integrates to 1 (trapezoid over +-10 sigma of every component).
  const SamplingPrediction sp = nsit_sampling_prediction(p, counts);
  REQUIRE(sp.entries.size() == 6);
  double lo = 1e300, hi = -1e300;
  for (const auto& e : sp.entries) {
    lo = std::min(lo, e.model_value - 10.0 * e.std_error);
    hi = std::max(hi, e.model_value + 10.0 * e.std_error);
  }
  const int n = 200000;
  double integral = 0.0;
  for (int i = 0; i <= n; ++i) {
    const double s = lo + (hi - lo) * i / n;
    integral += (i == 0 || i == n ? 0.5 : 1.0) * sp.density(s);
  }
  integral *= (hi - lo) / n;
  CHECK_CLOSE(integral, 1.0, 1e-6, 0.0);
  // The model's S at the settings are the prediction's.
  for (std::size_t i = 0; i < sp.entries.size(); ++i) CHECK(sp.entries[i].model_value == *r.nsit[i].S_model);

  // Bootstrap figures of all six S, each counting every replicate.
  for (const auto& a : r.nsit) {
    const AnalysisFigure* b = find_figure(figs, "bootstrap_" + quantity_figure_stem(a.quantity));
    REQUIRE(b);
    CHECK(sum(find_series(b->figure, FigureSeries::Kind::histogram)->y) == static_cast<double>(r.replicates));
  }
}

TEST_CASE("analysis figures: the predicted sampling error of S matches campaigns simulated from the model", "[report][analysis_figures]") {
  // Independent check of the delta-method sigma at the expected counts: the standard
  // deviation of S^ over M campaigns drawn from the model. Its relative Monte Carlo error is
  // about 1/sqrt(2 (M - 1)) = 2.5 % for M = 800; the tolerance 12 % allows 4.8 of those plus the
  // delta method's O(1/N) bias at N = 400 shots per sequence.
  const Protocol p = analysis_protocol("protocols/nsit_orientation_scan_cat.json");
  const double shots = 400.0;
  const CampaignCounts layout = simulated_counts(p, shots, 1);
  const SamplingPrediction sp = nsit_sampling_prediction(p, layout);
  const ModelCells model = model_cells(p);
  const CampaignEstimator est(p, layout);
  CellCounts like = CampaignEstimator::counts_of(layout), draw = like;
  RandomEngine g(20261202);
  const int M = 800;
  std::vector<double> sum1(sp.entries.size(), 0.0), sum2(sp.entries.size(), 0.0), v;
  std::vector<int> index;
  for (const auto& e : sp.entries) index.push_back(est.index_of(e.quantity));
  for (int m = 0; m < M; ++m) {
    simulate_counts(g, model.probabilities, like, draw);
    est.evaluate(draw, v);
    for (std::size_t i = 0; i < index.size(); ++i) {
      sum1[i] += v[static_cast<std::size_t>(index[i])];
      sum2[i] += v[static_cast<std::size_t>(index[i])] * v[static_cast<std::size_t>(index[i])];
    }
  }
  for (std::size_t i = 0; i < sp.entries.size(); ++i) {
    const double mean = sum1[i] / M;
    const double sd = std::sqrt((sum2[i] - M * mean * mean) / (M - 1));
    INFO(sp.entries[i].quantity);
    CHECK_CLOSE(sd, sp.entries[i].std_error, 0.0, 0.12);
    // And the mean is the model's S within 4 standard errors of the mean.
    CHECK(std::abs(mean - sp.entries[i].model_value) <= 4.0 * sp.entries[i].std_error / std::sqrt(double(M)));
  }
}

TEST_CASE("analysis figures: histogram edges cover the values and counts sum to them", "[report][analysis_figures]") {
  const std::vector<double> v{0.1, 0.5, 0.5, 0.9, NAN};
  const auto edges = histogram_edges(v, {0.0, 1.0}, 4);
  REQUIRE(edges.size() == 5);
  CHECK(edges.front() == 0.0);
  CHECK(edges.back() == 1.0);
  const auto c = histogram_counts(v, edges);
  CHECK(c == std::vector<double>{1.0, 0.0, 2.0, 1.0});  // 0.5 opens the third bin; NaN is not counted
  CHECK(histogram_counts({1.0}, edges).back() == 1.0);  // the last bin is closed
  CHECK_THROWS_AS(histogram_edges({NAN}, {}, 3), DomainError);
  CHECK(quantity_figure_stem("K[ABC]") == "K_ABC");
  CHECK(quantity_figure_stem("S[A0->B]") == "S_A0-B");
}
