// NSIT scans over one setting: a protocol whose NSIT tests share the later measurement B and
// whose earlier measurements A_i differ in exactly one setting (the direction or modulus of
// beta, the Ramsey phase, the time or the contrast), as build_nsit_scan writes them. For the
// analysis figures this module finds the scanned setting, the model's S along it, and the
// distribution the model predicts for the measured S over the scan's settings.
//
// Predicted sampling distribution. At setting i the model gives cell probabilities p_sj
// (model_cells.hpp); with the campaign's shot numbers N_s, the estimate S^_i (the pooled MLE
// of estimator.hpp) has the delta-method standard error sigma_i evaluated at the expected
// counts N_s p_sj (the multinomial, i.e. binomial per cell, sampling error under the model;
// Agresti, Categorical Data Analysis (2013) section 16.1). Under the normal approximation
// S^_i ~ Normal(S_i, sigma_i^2), so the measured values over m settings are draws from the
// equal-weight mixture f(s) = (1/m) sum_i phi((s - S_i)/sigma_i)/sigma_i, and the expected
// number of settings in a bin [a, b) is sum_i [Phi((b - S_i)/sigma_i) - Phi((a - S_i)/sigma_i)].
// Assumptions: the model's probabilities are those of the ideal outcomes (no detection
// errors), the settings are independent experiments, and N_s is large enough for the normal
// approximation (it fails for cells with a handful of expected counts).
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "protocol/prediction.hpp"
#include "stats/campaign_counts.hpp"

namespace macroreal {

struct NsitScan {
  std::string parameter;             // "beta_angle_deg", "beta_modulus", "phase_deg", "time_s", "contrast"
  std::string axis_label;            // for figures, with units
  std::vector<int> test_indices;     // the NSIT tests of the scan (Protocol::tests), file order
  std::vector<double> values;        // the scanned setting of each test's earlier measurement
};

// The scan, when the protocol has at least two NSIT tests with one common later measurement
// whose earlier measurements differ in exactly one setting; nullopt otherwise.
std::optional<NsitScan> find_nsit_scan(const Protocol& protocol);

// The setting `parameter` of a measurement, and a copy with it changed.
double scan_setting(const MeasurementSpec& m, const std::string& parameter);
MeasurementSpec with_scan_setting(const MeasurementSpec& m, const std::string& parameter,
                                  double value);

struct ModelCurve {
  std::vector<double> x, y;          // setting and the model's S there
  std::string engine;                // the engine that ran (prediction.hpp)
};

// The model's S of the scan's first test with its earlier measurement's setting moved over
// `points` equally spaced values from the smallest to the largest scanned value (points >= 2).
// Throws DomainError when the protocol has no state, as predict() does.
ModelCurve nsit_scan_curve(const Protocol& protocol, const NsitScan& scan, int points = 121,
                           const PredictOptions& options = {});

struct SamplingEntry {
  int test_index = -1;
  std::string quantity;              // "S[A0->B]"
  double model_value = 0.0;          // S_i of the model
  double std_error = 0.0;            // sigma_i at the expected counts (see above)
};

struct SamplingPrediction {
  std::vector<SamplingEntry> entries;  // one per NSIT test with data, file order
  std::string method;                  // in words, for reports

  // The mixture density f(s) above (per unit of S).
  double density(double s) const;
  // Expected number of settings in each bin [edges[k], edges[k+1]) (edges increasing).
  std::vector<double> expected_counts(const std::vector<double>& edges) const;
};

// For every NSIT test of `protocol` (all of them, a scan or not) that the counts can estimate.
// `observed` gives the shot numbers N_s (sequences without shots are left out, as in
// analyse_campaign). Throws DomainError when the protocol has no state.
SamplingPrediction nsit_sampling_prediction(const Protocol& protocol, const CampaignCounts& observed,
                                            const PredictOptions& options = {});

}  // namespace macroreal
