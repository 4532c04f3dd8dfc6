// Figures of merit of a protocol design, for the setting optimiser (issue 6):
//   K            the predicted K_n of the chosen Leggett-Garg test (or |S| for NSIT);
//   significance the expected one-sided z = (K - bound) / sqrt(Var K^) at a shot budget N with
//                the optimal allocation of shots among the sequences (design/shot_allocation.hpp,
//                Neyman 1934): Var K^ = (sum_s sqrt(v_s))^2 / (N p_prep), v_s the per-shot
//                variance of sequence s in the non-pooled functional of stats/linear_functional
//                at the model's cells (destructive-readout early ends are cells, so their loss
//                is included), p_prep the success probability of a post-selected preparation
//                (failed preparations use shots but give none);
//   shots        the total shots to reach a one-sided test at level alpha with the given power:
//                N = (z_{1-alpha} + z_power)^2 (sum_s sqrt v_s)^2 / ((K - bound)^2 p_prep)
//                (Chow, Shao & Wang, Sample Size Calculations in Clinical Research (2008),
//                sec. 3.1); its maximiser is that of `significance` (N is a monotone function of
//                the z per shot), so it is optimised as such and reported as shots;
//   conclusive   the margin K - max(bound, K_classical, K_classical_kicked) over the classical
//                explanations the engine knows (DESIGN.md section 2); where the classical
//                models cannot be built (Wigner function not known to be non-negative) the
//                margin is K - bound and the report says which explanation was beaten.
// NSIT tests use |S| with bound 0 (a two-sided effect).
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "design/shot_allocation.hpp"
#include "protocol/prediction.hpp"

namespace macroreal {

enum class ObjectiveKind { K, significance, shots, conclusive };
std::string to_string(ObjectiveKind k);
ObjectiveKind parse_objective_kind(const std::string& s);  // DomainError names the choices

struct ObjectiveOptions {
  ObjectiveKind kind = ObjectiveKind::K;
  std::size_t test_index = 0;       // which of the protocol's tests
  double budget_shots = 1e4;        // significance: total shots (> 0)
  double alpha = 0.00135;           // shots: one-sided level (z = 3)
  double power = 0.8;               // shots: target power
  PredictOptions predict = fast_predict_options();
  static PredictOptions fast_predict_options() {
    PredictOptions p;
    p.classical_models = false;     // speed inside loops; conclusive turns them on
    return p;
  }
};

// Everything one evaluation knows (the optimiser keeps the one at the optimum).
struct DesignFigures {
  std::string test_label;
  bool nsit = false;
  double value = 0.0;               // K (LG) or S (NSIT)
  double bound = 1.0;               // n - 2 for LG, 0 for NSIT
  double effect = 0.0;              // K - bound (LG) or |S| (NSIT)
  double variance_per_shot = 0.0;   // (sum_s sqrt v_s)^2: Var of the estimate times total shots
  double preparation_probability = 1.0;
  std::optional<double> K_classical, K_classical_kicked;
  std::string classical_note;       // why the classical values are absent, or which applies
  double margin = 0.0;              // conclusive: K - best classical explanation
  std::string best_explanation;     // "bound", "non-invasive classical model", "kicked ..."
  double z_at_budget = 0.0;         // significance at budget_shots
  double shots_needed = 0.0;        // for alpha and power (inf when effect <= 0)
  ShotAllocation allocation;        // at budget_shots (empty when not computed)
  double objective = 0.0;           // the value maximised (shots: -shots_needed)
};

// Evaluates the design; throws what predict / model_cells throw (DomainError, UnsupportedError).
// Returns objective = NaN when it is undefined (no variance, shots with effect <= 0).
DesignFigures evaluate_design(const Protocol& protocol, const ObjectiveOptions& options);

}  // namespace macroreal
