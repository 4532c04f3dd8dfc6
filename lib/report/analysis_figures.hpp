// The figures of `macroreal analyse --figures DIR` as data (figure.hpp), built from an
// AnalysisResult and, where the protocol carries a model, from the model itself:
//   - "lg_estimates": K of every LG test with its default interval, the model's K and the
//     kicked classical K where known, and the macrorealist bound;
//   - "nsit_estimates": S of every NSIT test with its default interval against the scanned
//     setting (design/nsit_scan.hpp) or the test number, the model curve or model values, and
//     the no-signalling value 0;
//   - "nsit_scan_histogram": over a scan, the histogram of the measured S against the number
//     of settings per bin the model predicts and its mixture density (same units: settings
//     per bin), with the sampling error of the campaign's shot numbers;
//   - "bootstrap_<quantity>": the bootstrap replicates of every K and S (the values the
//     default interval is computed from) with the estimate and the interval marked.
// A figure that cannot be drawn (no model, no scan, no replicates kept) is left out and the
// reason is listed in `omitted`, so a report can say why.
#pragma once

#include <string>
#include <vector>

#include "protocol/protocol.hpp"
#include "report/figure.hpp"
#include "stats/analysis.hpp"
#include "stats/campaign_counts.hpp"

namespace macroreal {

struct AnalysisFigure {
  std::string stem;          // file name without extension (letters, digits, '_', '-')
  std::string caption;       // one sentence for reports
  Figure figure;
};

struct AnalysisFigureOptions {
  int curve_points = 121;    // model curve over a scan
  int bootstrap_bins = 40;   // histogram of the replicates
};

struct AnalysisFigures {
  std::vector<AnalysisFigure> figures;
  std::vector<std::string> omitted;  // "<figure>: <why>"
};

// `counts` are the campaign's counts as analysed (for the shot numbers of the model's
// sampling distribution). The bootstrap figures need a result from analyse_campaign with
// AnalysisOptions::keep_replicates. The model parts are computed only when
// `protocol.state` is set; a model that cannot be computed is reported in `omitted`.
AnalysisFigures analysis_figures(const Protocol& protocol, const CampaignCounts& counts,
                                 const AnalysisResult& result, const AnalysisFigureOptions& options = {});

// Equal-width bin edges covering every finite value of `values` and of `extra` (bins >= 1; a
// zero-width range is widened by 1e-9 relative). Counts of `values` per bin (the last bin is
// closed), so the counts sum to the number of finite values.
std::vector<double> histogram_edges(const std::vector<double>& values, const std::vector<double>& extra,
                                    int bins);
std::vector<double> histogram_counts(const std::vector<double>& values, const std::vector<double>& edges);

// A file stem from a quantity name: "K[ABC]" -> "K_ABC", "S[A0->B]" -> "S_A0-B".
std::string quantity_figure_stem(const std::string& quantity);

// Writes every figure as <dir>/<stem>.svg and .png; returns the paths written, in order.
std::vector<std::string> write_analysis_figures(const AnalysisFigures& figures, const std::string& dir);

}  // namespace macroreal
