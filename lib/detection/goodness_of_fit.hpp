// Goodness of fit of the count model to the calibration histograms: Pearson's chi-square and
// the likelihood-ratio statistic G = 2 sum O ln(O/E) over bins pooled so that every expected
// count is >= 5 (the usual rule for the chi-square approximation; Cochran, Ann. Math. Stat.
// 23:315 (1952)); the last bin of each group is the open tail n >= k. Degrees of freedom:
// sum over groups of (bins - 1) minus the fitted parameters; p-values from chi-square(df)
// (Boost.Math). df < 1 leaves the p-values NaN (too few bins to test anything).
#pragma once

#include <string>
#include <vector>

#include "detection/calibration_counts.hpp"
#include "detection/mixture_fit.hpp"

namespace macroreal {

struct GoodnessOfFit {
  double pearson = 0, g_statistic = 0;
  int bins = 0, df = 0;
  double pearson_p = 0, g_p = 0;  // NaN when df < 1
};

GoodnessOfFit goodness_of_fit(const CountHistograms& h, const MixtureFit& fit);

}  // namespace macroreal
