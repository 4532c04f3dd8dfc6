// Maximum-likelihood fit of the two-state photon-count model to calibration histograms:
// labelled dark and bright reference shots and unlabelled ("unknown") shots, which are a
// mixture with bright fraction w, all in one likelihood
//   log L = sum_n h_dark[n] log P_dark(n) + sum_n h_bright[n] log P_bright(n)
//         + sum_n h_unknown[n] log((1 - w) P_dark(n) + w P_bright(n)).
// Without decay (pump_per_window = 0) the EM algorithm of Dempster, Laird & Rubin, J. R. Stat.
// Soc. B 39:1 (1977) has closed-form steps for a Poisson mixture (responsibilities, then
// weighted means). With the dark-pumped-to-bright model (count_model.hpp, pump fixed by the
// given lifetime) the same likelihood is maximised by Nelder-Mead (Nelder & Mead, Comput. J.
// 7:308 (1965)) started at the EM fit.
// Identifiability is checked first (identify_or_throw); a fit is never returned for data that
// cannot separate two rates.
#pragma once

#include <optional>
#include <string>

#include "detection/calibration_counts.hpp"
#include "detection/count_model.hpp"

namespace macroreal {

struct MixtureFitOptions {
  double pump_per_window = 0;  // fixed, from the declared dark lifetime; 0 = no decay
  int max_iterations = 20000;
  double tolerance = 1e-11;    // relative change of log L between iterations
};

struct MixtureFit {
  CountModel model;
  double bright_fraction = 0;  // w of the unknown shots (0 when there are none)
  bool has_unknown = false;
  double log_likelihood = 0;
  int iterations = 0;
  bool converged = false;
  std::string method;          // "EM (two Poisson)" or "Nelder-Mead (dark pumped to bright)"
  int free_parameters = 0;     // 2 rates (+ w with unknown shots)
};

// Throws InputError(file, "", reason) for data that cannot identify the model: negative or
// empty input, a single-valued histogram, no dark or no bright evidence, bright reference
// shots not brighter than dark ones (z < 3), or unknown-only/one-label data whose two-component
// fit does not beat one component (likelihood ratio 2 dlogL < 10.83, i.e. p > 0.001 against
// chi-square(1); a conservative rule of ours, no source).
void identify_or_throw(const CountHistograms& h, const MixtureFitOptions& options = {});

// The fit (identify_or_throw first). `start`, when given, is a warm start (bootstrap).
MixtureFit fit_mixture(const CountHistograms& h, const MixtureFitOptions& options = {},
                       const std::optional<MixtureFit>& start = std::nullopt);

// log L of `model`, `bright_fraction` on the histograms (for tests and profile checks).
double mixture_log_likelihood(const CountHistograms& h, const CountModel& model, double bright_fraction);

}  // namespace macroreal
