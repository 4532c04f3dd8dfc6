// The whole calibration of a photon-count readout from CountHistograms: the mixture fit
// (mixture_fit.hpp), goodness of fit, the minimum-error and balanced thresholds, the two
// misassignment probabilities at the chosen threshold with percentile-bootstrap intervals
// (Efron & Tibshirani, "An Introduction to the Bootstrap", 1993, ch. 13: every group's
// histogram is resampled with its own size, the model refitted, the errors recomputed at the
// chosen threshold; seeded), the model-free fractions of misread reference shots, and the
// error-versus-window-length table.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "detection/calibration_counts.hpp"
#include "detection/calibration_file.hpp"
#include "detection/goodness_of_fit.hpp"
#include "detection/mixture_fit.hpp"
#include "detection/thresholds.hpp"

namespace macroreal {

struct CalibrationOptions {
  std::uint64_t seed = 1;
  int bootstrap_replicates = 1000;  // >= 100
  double level = 0.95;              // in (0, 1)
  std::optional<double> dark_lifetime_s;  // the decay model; needs a window length
  double window_s = 0;              // overrides the counts file's window_s when > 0
  // Window lengths for the trade-off table: seconds when a window length is known, else
  // multiples of the calibration window. Empty: 0.25, 0.5, 1, 2, 4 times the window.
  std::vector<double> table_windows;
};

// A calibrated quantity: its estimate and percentile-bootstrap interval [lo, hi]. Not named
// Interval: stats/bootstrap.hpp defines macroreal::Interval (lo, hi, valid), and code that
// uses both a calibration and the analysis includes both headers.
struct CalibrationEstimate {
  double estimate = 0, lo = 0, hi = 0;
};

struct WindowRow {
  double factor = 1;     // window / calibration window
  double window_s = 0;   // 0 when the calibration window is not known
  CountModel model;
  ThresholdChoice best;  // minimum total error at this window
};

struct CalibrationResult {
  std::string file;
  long rows = 0, dark_shots = 0, bright_shots = 0, unknown_shots = 0;
  double window_s = 0;
  std::optional<double> dark_lifetime_s;
  MixtureFit fit;
  GoodnessOfFit gof;
  ThresholdChoice minimum_error, balanced;
  long threshold = 0;  // the one used: minimum total error
  CalibrationEstimate dark_rate, bright_rate, bright_fraction;
  CalibrationEstimate dark_read_bright, bright_read_dark;
  double level = 0.95;
  std::uint64_t seed = 1;
  int bootstrap_replicates = 0, bootstrap_failures = 0;
  // Model-free check: misread fractions of the labelled reference shots at the threshold
  // (k of n; n = 0 when the group is absent).
  long dark_above = 0, bright_at_or_below = 0;
  std::vector<WindowRow> window_table;
  bool window_table_in_seconds = false;
};

CalibrationResult calibrate_counts(const CountHistograms& h, const CalibrationOptions& options = {});

// The error-versus-window table for a model at one window (`window_s` 0 = unknown; then the
// entries of `windows` are factors); windows empty = factors 0.25, 0.5, 1, 2, 4.
std::vector<WindowRow> window_table(const CountModel& m, double window_s, const std::vector<double>& windows);

// The calibration file value for the result.
Calibration to_calibration(const CalibrationResult& r);

}  // namespace macroreal
