// Choosing the dark/bright threshold of a photon-count readout (a count <= t reads dark).
// Minimum total error: t minimising dark_read_bright(t) + bright_read_dark(t) (equal weight
// on both states, i.e. equal priors). For two Poisson rates this is the largest n with
// P_dark(n) >= P_bright(n), n <= (bright - dark) / ln(bright / dark) (likelihood-ratio rule;
// common practice, no source). Balanced: t minimising |dark_read_bright - bright_read_dark|.
// Both scan t = 0..t_max with t_max far in the bright tail; ties go to the smaller t.
#pragma once

#include "detection/count_model.hpp"

namespace macroreal {

struct ThresholdChoice {
  long threshold = 0;
  Misassignment errors;
};

ThresholdChoice minimum_error_threshold(const CountModel& m);
ThresholdChoice balanced_threshold(const CountModel& m);
// The scan's upper end: bright_rate + 12 sqrt(bright_rate) + 12.
long threshold_scan_limit(const CountModel& m);

}  // namespace macroreal
