// One-sided tests of a Leggett-Garg bound, H0: K <= bound (K_3: bound 1; K_n: n - 2), against
// K > bound. Each returns a p-value, its Gaussian significance sigma (gaussian_sigma below,
// one-sided) and the method name.
//
// (a) "z-asymptotic": z = (K^ - bound) / se with the caller's estimate and delta-method SE
//     (e.g. the pooled MLE of estimator.hpp); p = 1 - Phi(z). Large-sample only.
// (b) "hoeffding": finite-sample, no normal approximation. Uses the non-pooled linear
//     estimator L^ = sum_s sum_j c_sj n_sj / N_s of linear_functional.hpp (unbiased; the pooled
//     MLE is nonlinear under destructive readout, so it is not used here). L^ is a sum of
//     independent per-shot terms, the term of a shot of sequence s lying in an interval of
//     width R_s / N_s (R_s = max_j c_sj - min_j c_sj, 2 for a correlator). Hoeffding,
//     JASA 58:13 (1963), Theorem 2:  P(L^ - E L^ >= t) <= exp(-2 t^2 / sum_s R_s^2 / N_s).
//     Under H0, E L^ = K <= bound, so p = exp(-2 (L^ - bound)_+^2 / sum_s R_s^2 / N_s).
// (c) "empirical-bernstein": finite-sample. Per sequence, the shot terms Y (rescaled to [0, 1])
//     are i.i.d.; Maurer & Pontil, "Empirical Bernstein bounds and sample variance
//     penalization" (COLT 2009), Theorem 4: with probability >= 1 - d,
//       E Y >= mean - sqrt(2 V ln(2/d) / n) - 7 ln(2/d) / (3 (n - 1)),  V = sample variance.
//     A union bound over the S used sequences (d / S each) gives a lower confidence bound
//     LCB(d) of K; p = inf {d : LCB(d) > bound} (LCB is monotone in d; bisection in log d).
//     Tighter than Hoeffding when the shot terms have small variance (correlators near +-1).
// (d) "parametric-bootstrap": the least-favourable null is the constrained MLE of the cell
//     probabilities with L(p) = bound (linear_functional.hpp; the saturated per-sequence
//     model, which contains every macrorealist one). Campaigns with the observed shot numbers
//     are simulated from it; the statistic is the studentised T = (L^ - bound) / se~ with the
//     smoothed plug-in se~; p = (1 + #{T* >= T}) / (B + 1) (Davison & Hinkley (1997), 4.2.1).
//     Asymptotically exact; its finite-sample level is checked by the [long] validity study.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "stats/bootstrap.hpp"
#include "stats/linear_functional.hpp"

namespace macroreal {

struct TestResult {
  std::string method;          // "z-asymptotic", "hoeffding", "empirical-bernstein", ...
  double statistic = 0.0;      // z, L^ - bound, T, ... (method dependent)
  double p_value = 1.0;
  double sigma = 0.0;          // gaussian_sigma(p) for the test's sidedness, >= 0
  bool sigma_capped = false;   // p underflowed the floor 1e-300
  std::string note;
};

// The significance of a p-value in Gaussian standard deviations ("sigma"), never negative:
//   one-sided: Phi^-1(1 - p) for p < 1/2 (the z of a one-sided z test), 0 for p >= 1/2: data
//     on the null's side are no evidence against it, and the signed statistic says how far.
//     Cowan, Cranmer, Gross & Vitells, Eur. Phys. J. C 71:1554 (2011), sec. 2: Z = Phi^-1(1 - p),
//     a deficit giving Z = 0.
//   two-sided: Phi^-1(1 - p/2), the |z| of a two-sided z test with this p (Phi^-1(1 - p) would
//     understate it, and go negative for p > 1/2).
// Boost.Math normal quantile; p is floored at 1e-300 (*capped set), so the value stays finite.
// DomainError for p outside [0, 1].
enum class Sidedness { one_sided, two_sided };
double gaussian_sigma(double p_value, Sidedness sides, bool* capped = nullptr);

TestResult lg_z_test(double estimate, double std_error, double bound);
TestResult lg_hoeffding_test(const CellCounts& counts, const LinearFunctional& k, double bound);
TestResult lg_empirical_bernstein_test(const CellCounts& counts, const LinearFunctional& k,
                                       double bound);

struct ParametricBootstrapOptions {
  long replicates = 10000;
  std::uint64_t seed = 0x6d726c67ULL;
  double pseudo_count = 0.5;   // smoothing of the constrained fit (linear_functional.hpp)
  int threads = 0;             // 0: OpenMP default; the result does not depend on it
};
TestResult lg_parametric_bootstrap_test(const CellCounts& counts, const LinearFunctional& k,
                                        double bound, const ParametricBootstrapOptions& options = {});

// Every LG test above for the LG order of a campaign, bound n - 2: the z test with the
// caller's estimate and SE (e.g. the pooled MLE and its delta-method SE), then Hoeffding,
// empirical Bernstein and the parametric bootstrap on the non-pooled K of `campaign`.
std::vector<TestResult> leggett_garg_tests(const CampaignCounts& campaign,
                                           const std::vector<std::string>& order, double estimate,
                                           double std_error,
                                           const ParametricBootstrapOptions& options = {});

}  // namespace macroreal
