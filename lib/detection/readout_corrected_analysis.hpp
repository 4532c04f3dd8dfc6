// Misassignment-corrected estimates of a campaign (`analyse --correct-readout`): every
// quantity of the statistics core (joint probabilities, averages, correlators, K, S)
// re-estimated from counts corrected sequence by sequence with the inverse readout map of
// sequence_readout_model.hpp, with intervals that include the uncertainty of the error rates.
//
// Estimate: the pooled estimator of estimator.hpp applied to the corrected counts
// M_s^-1 N_s, at the rates' point values. Not clipped.
// Rates' uncertainty: a stored interval [lo, hi] at level c for a rate e is turned into an
// effective binomial calibration sample, n = e (1 - e) / se^2 with se = (hi - lo) / (2 z),
// z = Phi^-1((1 + c) / 2) (a normal-approximation reading of the interval; our choice), and
// k = round(e n) "misread" shots. These two extra strata join the campaign's sequences in the
// stratified bootstrap (bootstrap.hpp), so each replicate redraws the rate as
// e* = e + (k* - k) / n with k* ~ Binomial(n, k / n) (a parametric bootstrap of the
// calibration, floored at 0) together with the shots; the BCa jackknife runs over them too.
// The point value stays e. Without an interval (a bare number, or rates from the protocol)
// the rates are taken as exact and the report says so.
// Standard errors: the multinomial delta method over the shots of every sequence, plus
// (d f / d e)^2 se^2 for each rate (the same formula applied to the calibration strata).
// Tests on the corrected K and S: the z test with that standard error (LG one-sided,
// H0: K <= n - 2; NSIT two-sided, H0: S = 0) and the bootstrap intervals; the finite-sample,
// exact and resampling tests stay on the raw counts (their arguments assume multinomial
// counts of the recorded results).
#pragma once

#include <cstdint>
#include <string>

#include "detection/calibration_file.hpp"
#include "detection/sequence_readout_model.hpp"
#include "protocol/protocol.hpp"
#include "stats/analysis.hpp"
#include "stats/campaign_counts.hpp"
#include "stats/readout_corrected_result.hpp"

namespace macroreal {

// The error rates a correction uses, with their uncertainty (se 0: taken as exact).
struct CorrectionRates {
  MisassignmentRates point;
  double dark_read_bright_se = 0.0, bright_read_dark_se = 0.0;
  std::string source;       // where the values come from, for the report
  std::string uncertainty;  // how their uncertainty enters, in words
};

// From a calibration file: point values errors.*.estimate; se from errors.*.ci (formula
// above). Throws DomainError if the rates are invalid for a correction (e1 + e2 >= 1).
CorrectionRates rates_from_calibration(const Calibration& calibration, const std::string& file);
// From the protocol's detection model (exact values). Throws DomainError when both are 0:
// a correction needs error rates.
CorrectionRates rates_from_protocol(const Protocol& protocol);

struct ReadoutCorrectionOptions {
  CorrectionRates rates;
  MisreadContinuation continuation;
  double level = 0.95;
  std::uint64_t seed = kDefaultAnalysisSeed;
  long replicates = 10000;   // B, >= 100
  int threads = 0;
  // Extra assumption sentences (e.g. that a dark/bright table was thresholded where the
  // rates belong).
  std::vector<std::string> extra_assumptions;
};

// `counts`: the campaign as read (sequences without shots are left out, as in analyse).
// Throws DomainError for invalid rates or options, or a campaign with no shots.
ReadoutCorrectedAnalysis readout_corrected_analysis(const Protocol& protocol, const CampaignCounts& counts,
                                                    const ReadoutCorrectionOptions& options);

// Stores `corrected` in the analysis result and rewrites its detection caution to say which
// part of the report is corrected.
void attach_readout_correction(AnalysisResult& result, ReadoutCorrectedAnalysis corrected);

}  // namespace macroreal
