// Point estimates of every named quantity of a campaign from its per-sequence outcome counts:
// joint probabilities of full outcome strings, single-time averages, pair correlators, the
// Leggett-Garg combinations and the NSIT differences (DESIGN.md section 2).
//
// Pooling under destructive readout. The sequences that share a step list (e.g. "AB+" and
// "AB-") are independent multinomials that observe different branches of one outcome tree:
// a shot that reaches step k with prefix o_1..o_{k-1} shows o_k, and ends if o_k is bright.
// Write the joint P(o_1..o_n) = prod_k P(o_k | o_1..o_{k-1}). Every cell of every sequence
// (a full string, or a string that ends at a bright step) has a probability that is a
// product of such conditionals, so the log-likelihood of all sequences of the step list is
//     sum over prefixes pi, signs x of  N(pi, x) log P(x | pi),
// where N(pi, x) counts the shots of all those sequences that reached step |pi|+1 with
// prefix pi and showed x there. The conditionals of distinct prefixes are free parameters
// of the saturated model (one simplex per prefix), so the likelihood separates and the exact
// MLE of the coarsened multinomials is P^(x | pi) = N(pi, x) / (N(pi, +) + N(pi, -)).
// Non-destructive readout is the special case where every shot reaches every step: the
// product telescopes to the pooled relative frequencies.
// Undefined branches: if N(pi, +) + N(pi, -) = 0 while the estimated prefix probability is
// positive, the joint probabilities below pi are not identified and come out NaN; a prefix
// of estimated probability 0 gives 0 for all its extensions (any conditional maximises).
//
// Standard errors (delta method): each sequence s is multinomial with n_s shots and cell
// probabilities p_s; Var(f^) = sum_s (1/n_s) [sum_j p_sj g_sj^2 - (sum_j p_sj g_sj)^2] with
// g_sj = d f / d p_sj at fixed n_s, taken here by central differences of evaluate() in the
// counts (step 1e-4 relative to the cell count; the estimator is a ratio of polynomials in
// the counts, so the truncation error is O(1e-8) relative).
// References: the multinomial delta method, e.g. Agresti, Categorical Data Analysis (2013),
// section 16.1; the factorisation of coarsened multinomial likelihoods, e.g. Little & Rubin,
// Statistical Analysis with Missing Data (2002), section 7.2 (monotone patterns).
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "protocol/protocol.hpp"
#include "stats/campaign_counts.hpp"

namespace macroreal {

enum class QuantityKind {
  joint_probability,  // "P[AB:+-]"  MLE joint probability of a full outcome string
  single_average,     // "Q[B]"      <Q_B> = P_B(+) - P_B(-) from runs of [B] alone
  correlator,         // "C[AB]"     C_AB = sum o_A o_B P_AB(o_A, o_B) from runs of [A, B]
  lg_k,               // "K[ABC]"    K_n = sum_k C_{k,k+1} - C_{1n}, bound n - 2 (upper)
  lg_family,          // "LGfamily[ABC:+-]"  1 + s1 C_12 + s2 C_23 + s1 s2 C_13, bound 0 (lower)
  nsit_s,             // "S[A->B]"   P_B(+) - sum_a P_AB(a, +), 0 under NSIT (two-sided)
};
std::string to_string(QuantityKind k);

// Which side of the bound a macrorealist model respects.
enum class BoundSide {
  none,      // no bound (probabilities, averages, correlators)
  upper,     // value <= bound (K)
  lower,     // value >= bound (LG family members)
  equality,  // value == bound (NSIT: S = 0; a test is two-sided unless asked otherwise)
};

struct QuantityInfo {
  std::string name;                 // e.g. "K[ABC]"
  QuantityKind kind = QuantityKind::joint_probability;
  std::vector<std::string> steps;   // the step list it is built from (K: the test's order)
  OutcomeString outcomes;           // joint_probability: the string; lg_family: (s1, s2)
  std::optional<double> bound;      // macrorealist bound, where one applies
  BoundSide bound_side = BoundSide::none;
  int test_index = -1;              // index into Protocol::tests, -1 if not a test statistic
};

enum class EstimateStatus {
  ok,
  no_sequence,      // no run sequence has the step list this quantity needs
  unobserved_branch // a branch with positive estimated probability has zero shots
};
std::string to_string(EstimateStatus s);

struct EstimateReport {
  std::vector<double> values;           // one per quantity (NaN where undefined)
  std::vector<EstimateStatus> status;   // one per quantity
  std::vector<std::string> messages;    // one per quantity ("" when ok), names the branch
};

// Built once from a protocol (its tests) and the cell layout of a CampaignCounts (the order
// of sequences and of their cells); then evaluated many times (bootstrap). Thread-safe:
// evaluate() is const and keeps its scratch space per thread.
class CampaignEstimator {
 public:
  // Throws DomainError if a test is malformed (LG order with fewer than 3 steps, NSIT
  // with from == to, a step that no measurement names) or the layout has a sequence whose
  // steps or cells do not match the protocol's readout.
  CampaignEstimator(const Protocol& protocol, const CampaignCounts& layout);

  std::vector<std::string> quantity_names() const;
  const std::vector<QuantityInfo>& quantities() const { return info_; }
  // Index of a quantity by name, -1 if absent.
  int index_of(const std::string& name) const;
  std::size_t size() const { return info_.size(); }

  // counts[s][j]: count of cell j of sequence s, in the layout's order (any non-negative
  // reals, so bootstrap weights fit). out is resized to size() (no allocation once it has
  // that size). Undefined quantities are NaN. Throws DomainError on a shape mismatch.
  void evaluate(const std::vector<std::vector<double>>& counts, std::vector<double>& out) const;
  // The same values with a status and message per quantity (for reports).
  EstimateReport estimate(const std::vector<std::vector<double>>& counts) const;
  // Delta-method standard error of every quantity (see the header comment). NaN where the
  // estimate is undefined or a sequence needed has no shots.
  std::vector<double> delta_method_se(const std::vector<std::vector<double>>& counts) const;

  // The per-sequence count vectors of a CampaignCounts with this estimator's layout.
  static std::vector<std::vector<double>> counts_of(const CampaignCounts& c);


 private:
  struct Contribution {  // cell (seq, cell) adds to node `node`, child `child` (0: +, 1: -)
    int seq, cell, node, child;
  };
  struct StepSet {
    std::vector<std::string> steps;
    int node_offset = 0;      // first node (prefix) of this step list in the scratch array
    int first_quantity = 0;   // index of P[..: ++..+] in the output
    bool has_sequence = false;
  };
  struct Combination {  // out[target] = constant + sum coef * out[source]
    int target;
    double constant;
    std::vector<std::pair<int, double>> terms;
  };

  Readout readout_ = Readout::destructive;
  std::vector<std::size_t> shape_;          // cells per sequence
  std::vector<QuantityInfo> info_;
  std::vector<StepSet> step_sets_;
  std::vector<Contribution> contributions_;
  std::vector<Combination> combinations_;   // in evaluation order
  int node_count_ = 0;

  void evaluate_into(const std::vector<std::vector<double>>& counts, double* out,
                     double* nodes) const;
};

}  // namespace macroreal
