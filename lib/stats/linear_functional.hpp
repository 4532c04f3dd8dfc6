// Linear functionals of the cell probabilities of independent multinomial sequences, and
// their constrained maximum-likelihood fit. The finite-sample and parametric-bootstrap tests
// (leggett_garg_tests.hpp, nsit_tests.hpp, multiplicity.hpp) are built on these.
//
//   L(p) = sum_s sum_j c_sj p_sj,   estimated without pooling by  L^ = sum_s sum_j c_sj n_sj / N_s.
//
// Why not the pooled MLE (estimator.hpp): under destructive readout the MLE pools P(A) over
// the sequences AB+ and AB- and multiplies conditionals, so K^ is a nonlinear function of the
// counts. The non-pooled L^ is exactly unbiased for every sequence design, is a sum of
// independent bounded per-shot terms (shot i of sequence s contributes c_sj / N_s when it
// falls in cell j), and so admits Hoeffding/Bernstein bounds and an exact linear constraint.
// It is less efficient than the MLE (it ignores that AB+ and AB- share P(A)); the tests that
// use it are therefore valid but somewhat conservative.
//
// Builders translate the physics quantities (DESIGN.md section 2) into coefficients for a
// given cell layout (campaign_counts.hpp): P_ij(a, b) comes, under destructive readout, from
// the sequences with steps [i, j] whose first dark sign is a (several such sequences are
// combined in proportion to their shots); under non-destructive readout from every sequence
// with steps [i, j].
//
// Constrained fit: maximise sum_sj m_sj log p_sj subject to sum_j p_sj = 1 for every s and
// L(p) = target, with m_sj = n_sj + pseudo_count (default 1/2, a Jeffreys-type smoothing so
// that no cell of a constrained sequence has probability 0; otherwise a sequence observed in
// one cell could never vary in simulation). Stationarity gives p_sj = m_sj / (mu_s + lambda c_sj);
// mu_s(lambda) is the unique root of sum_j p_sj = 1 on the branch where every denominator is
// positive, and L(p(lambda)) decreases monotonically in lambda, so two nested safeguarded
// root searches solve it exactly (Boyd & Vandenberghe, Convex Optimization (2004), 5.5.3).
// Sequences with all coefficients zero keep their (unsmoothed) relative frequencies.
#pragma once

#include <string>
#include <vector>

#include "stats/bootstrap.hpp"
#include "stats/campaign_counts.hpp"
#include "stats/random_variates.hpp"

namespace macroreal {

struct LinearFunctional {
  std::string name;                       // e.g. "K[ABC]" (reports only)
  std::vector<std::vector<double>> coef;  // c_sj on probabilities, same shape as the counts

  // Non-pooled estimate from counts; NaN if a sequence with a nonzero coefficient has no shots.
  double estimate(const CellCounts& counts) const;
  // L(p) at cell probabilities p (same shape).
  double value_at(const CellCounts& probabilities) const;
  // Var(L^) = sum_s (1/N_s) [sum_j p_sj c_sj^2 - (sum_j p_sj c_sj)^2] at probabilities p for the
  // shot numbers of `counts`.
  double variance_at(const CellCounts& probabilities, const CellCounts& counts) const;
  // Standard error from the smoothed plug-in p_sj = (n_sj + 1/2) / (N_s + J_s / 2): never 0,
  // which keeps studentised statistics finite at the boundary.
  double smoothed_se(const CellCounts& counts) const;
  // Per-shot range of sequence s: (max_j c_sj - min_j c_sj) (the shot term is that / N_s).
  double shot_range(std::size_t s) const;
  bool uses(std::size_t s) const;         // any nonzero coefficient in sequence s
  // Smallest and largest value of L over all probability vectors.
  double min_value() const;
  double max_value() const;
};

// K_n = sum_k C_{k,k+1} - C_{1n} for the measurement names in `order` (n >= 3).
LinearFunctional lg_functional(const CampaignCounts& layout, const std::vector<std::string>& order);
// The pair correlator C_ij from runs of [i, j] only.
LinearFunctional correlator_functional(const CampaignCounts& layout, const std::string& i,
                                       const std::string& j);
// NSIT S = P_B(+) - sum_a P_AB(a, +) with A = from, B = to.
LinearFunctional nsit_functional(const CampaignCounts& layout, const std::string& from,
                                 const std::string& to);

struct ConstrainedFit {
  CellCounts probabilities;   // fitted p_sj (same shape as the counts)
  double lambda = 0.0;        // Lagrange multiplier of L(p) = target
  double achieved = 0.0;      // L(p) at the fit
  int iterations = 0;
  bool converged = false;
};

// Throws DomainError if target lies outside (min_value, max_value) or a constrained sequence
// has no shots.
ConstrainedFit constrained_fit(const CellCounts& counts, const LinearFunctional& functional,
                               double target, double pseudo_count = 0.5);

// One simulated campaign: every sequence redrawn from Multinomial(N_s, p_s) into `out`.
void simulate_counts(RandomEngine& g, const CellCounts& probabilities, const CellCounts& shots_like,
                     CellCounts& out);

}  // namespace macroreal
