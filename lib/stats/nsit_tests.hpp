// Tests of no-signalling in time, S = P_B(+) - sum_a P_AB(a, +) (DESIGN.md section 2).
//
//   score test ("score"): two-sided test of S = 0 with the constrained MLE under S = 0
//     (linear_functional.hpp) supplying the null variance: z = S^ / se_0. For two independent
//     binomials this is exactly the pooled two-proportion z test (Agresti, Categorical Data
//     Analysis (2013), 3.1); it also covers destructive readout, where sum_a P_AB(a, +) is the
//     sum of two proportions from the sequences AB+ and AB- (different shots), which is not a
//     single binomial.
//   Barnard's exact unconditional test ("barnard-exact"): two independent binomials
//     x1 ~ Bin(n1, p1) (B alone) and x2 ~ Bin(n2, p2) (B = + in [A, B] runs), H0: p1 = p2 = pi;
//     statistic the pooled z (Barnard, Biometrika 34:123 (1947)); p = max over pi in [0, 1] of
//     P_pi(|Z| >= |z_obs|), maximised over a grid of 400 points plus golden-section refinement
//     around the three best, as in scipy.stats.barnard_exact (which uses shgo instead). Ties
//     |Z| = |z_obs| (within 1e-12 relative) count as extreme. The two binomials exist when the
//     readout is non-destructive (all [A, B] shots show B); under destructive readout the
//     [A, B] arm is a sum of two binomial proportions and only the score test applies
//     (nsit_binomial_arms throws UnsupportedError saying so).
//   Boschloo's exact unconditional test ("boschloo-exact"): the same two binomials and null;
//     statistic Fisher's one-sided p-value (hypergeometric tail given x1 + x2), p = max over pi
//     of P_pi(Fisher p <= observed) per side (Boschloo, Statistica Neerlandica 24:1 (1970));
//     two-sided as scipy.stats.boschloo_exact: min(1, 2 min(p_less, p_greater)). Uniformly
//     more powerful than Fisher's exact test; same destructive-readout restriction as Barnard.
//   Hoeffding bound ("hoeffding"): two-sided finite-sample p-value for S = 0, twice the
//     smaller of the one-sided Hoeffding (JASA 58:13 (1963)) bounds for S <= 0 and S >= 0 over
//     the independent sequences (lg_hoeffding_test on S and -S). Needs no normal
//     approximation and holds for any readout: under destructive readout, where S combines
//     three independent sequences (B, AB+, AB-) and no exact test exists, it is the test that
//     does not rest on asymptotics (conservative).
//   TOST ("tost"): equivalence |S| < margin by two one-sided score tests at S = -margin and
//     S = +margin, p = max of the two (Schuirmann, J. Pharmacokinet. Biopharm. 15:657 (1987));
//     the null variances come from the constrained fits at S = +-margin.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "stats/campaign_counts.hpp"
#include "stats/leggett_garg_tests.hpp"
#include "stats/linear_functional.hpp"

namespace macroreal {

// Two-sided score test of functional == 0 (any linear functional, e.g. nsit_functional).
TestResult nsit_score_test(const CellCounts& counts, const LinearFunctional& s);

// Two-sided Barnard exact test of p1 = p2; throws DomainError unless 0 <= x <= n, n >= 1, and
// UnsupportedError when (n1 + 1)(n2 + 1) > 4e6 (the score test is accurate there).
TestResult barnard_exact_test(long x1, long n1, long x2, long n2);

// Two-sided Boschloo exact test of p1 = p2; the same domain and size limits as Barnard's.
TestResult boschloo_exact_test(long x1, long n1, long x2, long n2);

// Two-sided Hoeffding finite-sample test of functional == 0.
TestResult nsit_hoeffding_test(const CellCounts& counts, const LinearFunctional& s);

struct BinomialArms {
  long x1 = 0, n1 = 0;  // B = + among runs of [B] alone
  long x2 = 0, n2 = 0;  // B = + among runs of [A, B]
};
// The two binomial arms of NSIT from -> to; UnsupportedError under destructive readout.
BinomialArms nsit_binomial_arms(const CampaignCounts& counts, const std::string& from,
                                const std::string& to);

// TOST for |S| < margin (margin > 0 and inside the functional's range).
TestResult nsit_tost(const CellCounts& counts, const LinearFunctional& s, double margin);

// The NSIT tests of a campaign: the score test; Barnard's and Boschloo's exact tests when the
// readout gives two binomials and the enumeration is small enough; the Hoeffding bound; TOST
// when a margin is given.
std::vector<TestResult> nsit_tests(const CampaignCounts& campaign, const std::string& from,
                                   const std::string& to, std::optional<double> margin = {});

}  // namespace macroreal
