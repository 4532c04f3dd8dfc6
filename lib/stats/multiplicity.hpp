// Multiple-testing corrections for families of LG / NSIT tests (several orders, a scan over
// settings).
//   Holm step-down adjusted p-values (Holm, Scand. J. Stat. 6:65 (1979)):
//     sorted p_(1) <= ... <= p_(m):  p~_(i) = max_{k <= i} min(1, (m - k + 1) p_(k)).
//     Controls the family-wise error rate under any dependence.
//   Benjamini-Hochberg adjusted p-values (Benjamini & Hochberg, JRSS B 57:289 (1995)):
//     p~_(i) = min_{k >= i} min(1, m p_(k) / k). Controls the false discovery rate for
//     independent (or positively dependent) tests.
//   Max-statistic calibration of "the largest violation in a scan" (Westfall & Young,
//     Resampling-Based Multiple Testing (1993), single-step maxT): every setting k has its own
//     sequences (independent campaigns) and a linear functional K_k with bound b_k; the
//     statistic is T_k = (K^_k - b_k) / se~_k (smoothed plug-in SE, linear_functional.hpp).
//     Under the least-favourable null every setting sits on its bound (the constrained fit of
//     each); campaigns are simulated jointly and the adjusted p-value of setting k is
//     (1 + #{max_l T*_l >= T_k}) / (B + 1). The smallest of them is the p-value of the largest
//     observed violation, with the scan's look-elsewhere effect included.
#pragma once

#include <cstdint>
#include <vector>

#include "stats/leggett_garg_tests.hpp"
#include "stats/linear_functional.hpp"

namespace macroreal {

// Both throw DomainError for a p-value outside [0, 1]; the result is in the input order.
std::vector<double> holm_adjust(const std::vector<double>& p_values);
std::vector<double> benjamini_hochberg_adjust(const std::vector<double>& p_values);

struct ScanSetting {
  CellCounts counts;            // this setting's own sequences
  LinearFunctional statistic;   // e.g. lg_functional for this setting's layout
  double bound = 1.0;
};

struct MaxStatisticResult {
  std::vector<double> statistic;     // T_k per setting
  std::vector<double> adjusted_p;    // single-step maxT adjusted p-value per setting
  std::size_t largest = 0;           // index of the largest T_k
  double p_largest = 1.0;            // adjusted p of that setting
  double sigma_largest = 0.0;        // Phi^-1(1 - p_largest)
  long replicates = 0;
  std::uint64_t seed = 0;
};

MaxStatisticResult max_statistic_calibration(const std::vector<ScanSetting>& settings,
                                             const ParametricBootstrapOptions& options = {});

}  // namespace macroreal
