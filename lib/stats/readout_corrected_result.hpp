// The misassignment-corrected part of an analysis (`analyse --correct-readout`), as plain data
// so that the analysis result (analysis.hpp) can carry it and the report can print it. It is
// computed in the detection module (detection/readout_corrected_analysis.hpp), which knows the
// readout model; see docs/readout_correction.md for the model and its assumptions.
#pragma once

#include <limits>
#include <string>
#include <vector>

#include "stats/estimator.hpp"
#include "stats/leggett_garg_tests.hpp"

namespace macroreal {

struct CorrectedInterval {
  std::string method;   // "bca", "percentile", "basic"
  double lo = std::numeric_limits<double>::quiet_NaN(), hi = std::numeric_limits<double>::quiet_NaN();
  bool valid = false;
};

struct CorrectedEstimate {
  std::string name;                    // e.g. "K[ABC]" (same names as the raw estimates)
  QuantityKind kind = QuantityKind::joint_probability;
  double raw = 0.0;                    // the recorded-results estimate (pooled MLE)
  double estimate = 0.0;               // corrected, at the rates' point values (not clipped)
  double std_error = 0.0;              // delta method: shots and the rates' uncertainty
  double std_error_shots = 0.0;        // delta method: shots only (rates held fixed)
  CorrectedInterval ci;                // default bootstrap interval, rates redrawn per replicate
  std::vector<CorrectedInterval> intervals;            // every interval computed, default first
  CorrectedInterval ci_rates_fixed;    // the default interval with the rates held fixed
  std::string status = "ok";
};

struct CorrectedTest {
  std::string label;                   // "LG ABC", "NSIT A->B"
  std::string quantity;                // "K[ABC]", "S[A->B]"
  double raw = 0.0, estimate = 0.0, std_error = 0.0;
  double bound = 0.0;                  // LG: n - 2; NSIT: 0
  std::vector<TestResult> tests;       // z-asymptotic (LG one-sided, NSIT two-sided)
  std::string verdict;
};

struct ReadoutCorrectedAnalysis {
  double dark_read_bright = 0.0, bright_read_dark = 0.0;  // point values used
  double dark_read_bright_se = 0.0, bright_read_dark_se = 0.0;  // their uncertainty (0: exact)
  double dark_read_bright_shots = 0.0, bright_read_dark_shots = 0.0;  // effective binomial sizes
  std::string rates_source;            // e.g. "calibration file cal.json (errors.*)"
  std::string uncertainty;             // how the rates' uncertainty enters, in words
  std::string continuation;            // "fair" or "dark=P"
  std::string default_interval;
  long replicates = 0;
  std::uint64_t seed = 0;
  std::vector<CorrectedEstimate> estimates;
  std::vector<CorrectedTest> leggett_garg, nsit;
  std::string tests_note;              // which tests run on corrected estimates, which on raw only
  std::vector<std::string> assumptions;
};

}  // namespace macroreal
