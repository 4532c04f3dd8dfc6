// The figure of `macroreal calibrate` as data (figure.hpp): the histogram of every shot's
// photon count (dark and bright reference shots and unknown shots pooled), the fitted
// mixture as expected numbers of shots per count, its dark and bright components, and the
// minimum-error and balanced thresholds as vertical lines between t and t + 1 (a count <= t
// reads dark). The count axis is logarithmic: the two components differ by orders of
// magnitude and the misassignment lives in their tails.
#pragma once

#include <vector>

#include "detection/calibration.hpp"
#include "detection/calibration_counts.hpp"
#include "report/command_figures.hpp"

namespace macroreal {

// Expected numbers of shots with n = 0..n_max counts under the fit: the dark component is
// (N_dark + N_unknown (1 - w)) P_dark(n), the bright one (N_bright + N_unknown w) P_bright(n)
// (N_* the shots of each label, w the fitted bright fraction of the unknown shots, P_* the
// fitted count distributions, with the decay model when it was fitted). Summed over all n
// they give the number of shots.
struct FittedCounts {
  std::vector<double> observed;            // shots with n counts, all labels pooled
  std::vector<double> dark, bright, total; // expected shots with n counts
  double shots = 0.0;                      // every shot in the histograms
};

// n_max < 0: the larger of the largest observed count and the threshold scan limit.
FittedCounts fitted_counts(const CountHistograms& h, const CalibrationResult& r, long n_max = -1);

Figure count_histogram_figure(const CountHistograms& h, const CalibrationResult& r);

// {"count_histogram"}.
std::vector<NamedFigure> calibration_figures(const CountHistograms& h, const CalibrationResult& r);

}  // namespace macroreal
