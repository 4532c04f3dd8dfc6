// How large a Leggett-Garg violation measurement disturbance alone could produce, bounded by
// the protocol's NSIT controls (in the spirit of the adroit-measurement argument of Wilde &
// Mizel, Found. Phys. 42:256 (2012): control runs quantify the invasiveness, which then
// enters the macrorealist bound).
//
// Derivation. Macrorealist model with invasive measurements: a hidden state lambda (density
// rho) fixes Q_i(lambda) = +-1 at each time; a measurement at t_i reveals Q_i(lambda) but may
// change what follows. In runs of [i, j] the later value has mean E_d[Q_j | lambda] (after a
// measurement at t_i); without it E_u[Q_j | lambda]. The undisturbed correlators
// C°_ij = sum_lambda rho Q_i E_u[Q_j | lambda] come from one joint distribution of
// (Q_1, ..., Q_n) and so obey K°_n <= n - 2. The measured ones differ by
//     C_ij - C°_ij = sum_{q = +-1} q P(Q_i = q) D_ij(q),
//     D_ij(q) = average over the branch Q_i = q of (E_d - E_u)[Q_j | lambda],
// while the NSIT control (runs of [j] alone give the undisturbed marginal, assuming the runs
// are stationary) measures only the branch average:
//     S_{i->j} = P_j(+) - sum_a P_ij(a, +) = -(1/2) sum_q P(Q_i = q) D_ij(q).
// Assumption (sign-uniform disturbance): on both branches of Q_i the disturbance shifts the
// mean of Q_j in the same direction, D_ij(+) D_ij(-) >= 0. Then
//     |C_ij - C°_ij| <= sum_q P(q) |D_ij(q)| = |sum_q P(q) D_ij(q)| = 2 |S_{i->j}|,
// i.e. twice the total-variation disturbance of Q_j's distribution, and
//     K_n <= n - 2 + 2 sum_{pairs} |S_{i->j}|,  pairs (k, k+1), k = 1..n-1, and (1, n).
// Without the assumption NSIT cannot bound invasiveness at all: D(+) = d / P(+),
// D(-) = -d / P(-) gives S = 0 yet moves C_ij by 2d. Reports must state the assumption.
//
// Confidence: with alpha = 1 - level, alpha/2 goes to the lower limit of K (one-sided) and
// alpha/2 is split (Bonferroni) over the m controls, each |S| bounded above by
// |S^| + z_{1 - alpha/(4m)} se (a two-sided interval of S at 1 - alpha/(2m)). Then
// P(K >= K_low and bound <= bound_up) >= level, and "exceeds" = K_low > bound_up is a test at
// level alpha of "the violation is explained by disturbance" under the assumption above.
#pragma once

#include <string>
#include <vector>

namespace macroreal {

struct NsitControl {
  std::string from, to;   // measurement names
  double estimate = 0.0;  // S^
  double std_error = 0.0; // its (delta-method) standard error
};

// The assumptions the bound rests on, in words (reports print them beside every bound and
// in their cautions, also when no bound could be computed).
inline constexpr const char* kInvasivenessAssumption =
    "sign-uniform disturbance: on both outcome branches of an earlier measurement, its "
    "disturbance shifts the mean of each later measurement in the same direction "
    "(D_ij(+) D_ij(-) >= 0); and stationary runs, so that runs of the later measurement alone "
    "give its undisturbed distribution. Without sign-uniformity the NSIT controls cannot bound "
    "invasiveness at all (S = 0 is compatible with a disturbance that moves C_ij by any amount)";

struct InvasivenessBound {
  std::vector<std::string> pairs;     // "A->B", ... in the order used
  std::vector<double> s_upper;        // upper limit of |S| per pair
  double base = 1.0;                  // n - 2
  double bound = 1.0;                 // n - 2 + 2 sum |S^|
  double bound_upper = 1.0;           // n - 2 + 2 sum s_upper
  double k_estimate = 0.0;
  double k_lower = 0.0;               // one-sided lower limit of K at 1 - alpha/2
  double level = 0.95;
  bool exceeds = false;               // k_lower > bound_upper
  std::string assumption;             // the sign-uniform disturbance assumption, in words
};

// `order`: the LG order (n >= 3 names); `controls` must contain an NSIT control for every
// pair (k, k+1) and (1, n) of the order (DomainError naming the missing one otherwise).
InvasivenessBound invasiveness_bound(const std::vector<std::string>& order, double k_estimate,
                                     double k_std_error, const std::vector<NsitControl>& controls,
                                     double level = 0.95);

}  // namespace macroreal
