// Multiple-testing corrections for families of LG / NSIT tests (several orders, a scan over
// settings).
//   Holm step-down adjusted p-values (Holm, Scand. J. Stat. 6:65 (1979)):
//     sorted p_(1) <= ... <= p_(m):  p~_(i) = max_{k <= i} min(1, (m - k + 1) p_(k)).
//     Controls the family-wise error rate under any dependence.
//   Benjamini-Hochberg adjusted p-values (Benjamini & Hochberg, JRSS B 57:289 (1995)):
//     p~_(i) = min_{k >= i} min(1, m p_(k) / k). Controls the false discovery rate for
//     independent (or positively dependent) tests.
//   Max-statistic calibration of "the largest violation in a scan" (Westfall & Young,
//     Resampling-Based Multiple Testing (1993), single-step maxT with bootstrap resampling
//     centred at the estimates, which stands in for the joint null under subset pivotality):
//     the scan is ONE campaign (all its sequences) and several linear functionals L_k with
//     bounds b_k, T_k = (L^_k - b_k) / se~_k (smoothed plug-in SE, linear_functional.hpp).
//     Each replicate draws one stratified resample of the whole campaign (every sequence
//     from its own observed multinomial) and evaluates every statistic on it as the pivot
//     T*_k = (L*_k - L^_k) / se~*_k; the maximum is taken per replicate, so LG tests that
//     share sequences (K[ABC] and K[ABD] both use the AB runs) keep their dependence. The
//     adjusted p-value of k is (1 + #{max_l T*_l >= T_k}) / (B + 1); the smallest is the
//     p-value of the largest observed violation, look-elsewhere effect included. Settings
//     with their own sequences (stack_settings) are the independent special case: the
//     maximum is then over independent pivots (Sidak, JASA 62:626 (1967)).
#pragma once

#include <cstdint>
#include <vector>

#include "stats/bootstrap.hpp"
#include "stats/leggett_garg_tests.hpp"
#include "stats/linear_functional.hpp"

namespace macroreal {

// Both throw DomainError for a p-value outside [0, 1]; the result is in the input order.
std::vector<double> holm_adjust(const std::vector<double>& p_values);
std::vector<double> benjamini_hochberg_adjust(const std::vector<double>& p_values);

// The scan as one campaign: every statistic is defined on the layout of `counts`.
struct JointScan {
  CellCounts counts;
  std::vector<LinearFunctional> statistics;
  std::vector<double> bounds;  // one per statistic
};

// A setting with its own sequences (independent of the other settings).
struct ScanSetting {
  CellCounts counts;            // this setting's own sequences
  LinearFunctional statistic;   // e.g. lg_functional for this setting's layout
  double bound = 1.0;
};
// Independent settings as one campaign: their sequences side by side, each statistic zero on
// the other settings' sequences.
JointScan stack_settings(const std::vector<ScanSetting>& settings);

struct MaxStatisticResult {
  std::vector<double> statistic;     // T_k per setting
  std::vector<double> adjusted_p;    // single-step maxT adjusted p-value per setting
  std::size_t largest = 0;           // index of the largest T_k
  double p_largest = 1.0;            // adjusted p of that setting
  double sigma_largest = 0.0;        // one-sided gaussian_sigma(p_largest)
  long replicates = 0;
  std::uint64_t seed = 0;
};

// Uses options.replicates, seed and threads (pseudo_count is not used: the resample is
// from the observed counts). DomainError for an empty scan, a statistic whose sequence has
// no shots, or a shape mismatch.
MaxStatisticResult max_statistic_calibration(const JointScan& scan,
                                             const ParametricBootstrapOptions& options = {});
// The same for independent settings (stack_settings).
MaxStatisticResult max_statistic_calibration(const std::vector<ScanSetting>& settings,
                                             const ParametricBootstrapOptions& options = {});

}  // namespace macroreal
