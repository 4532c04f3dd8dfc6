#include "design/objectives.hpp"

#include <cmath>
#include <limits>

#include "core/error.hpp"
#include "design/model_cells.hpp"
#include "design/power.hpp"
#include "phase_space/prepared_state.hpp"
#include "stats/linear_functional.hpp"

namespace macroreal {

std::string to_string(ObjectiveKind k) {
  switch (k) {
    case ObjectiveKind::K: return "K";
    case ObjectiveKind::significance: return "significance";
    case ObjectiveKind::shots: return "shots";
    case ObjectiveKind::conclusive: return "conclusive";
  }
  return "?";
}

ObjectiveKind parse_objective_kind(const std::string& s) {
  if (s == "K" || s == "k") return ObjectiveKind::K;
  if (s == "significance") return ObjectiveKind::significance;
  if (s == "shots") return ObjectiveKind::shots;
  if (s == "conclusive") return ObjectiveKind::conclusive;
  throw DomainError("objective = '" + s + "', but must be K, significance, shots or conclusive");
}

namespace {

const TestPrediction& find_test(const PredictionResult& r, std::size_t index) {
  if (index >= r.tests.size())
    throw DomainError("test index " + std::to_string(index) + ", but the protocol has " +
                      std::to_string(r.tests.size()) + " tests");
  return r.tests[index];
}

}  // namespace

DesignFigures evaluate_design(const Protocol& protocol, const ObjectiveOptions& options) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  if (options.test_index >= protocol.tests.size())
    throw DomainError("test index " + std::to_string(options.test_index) +
                      ", but the protocol has " + std::to_string(protocol.tests.size()) +
                      " tests");
  if (!(options.budget_shots > 0.0) || !std::isfinite(options.budget_shots))
    throw DomainError("budget_shots must be > 0 and finite");
  PredictOptions predict_options = options.predict;
  if (options.kind == ObjectiveKind::conclusive) predict_options.classical_models = true;

  const ModelCells cells = model_cells(protocol, predict_options);
  const TestPrediction& t = find_test(cells.prediction, options.test_index);
  DesignFigures f;
  f.test_label = t.spec.label();
  LinearFunctional functional;
  if (t.lg) {
    f.value = t.lg->K;
    f.bound = t.lg->bound;
    f.effect = f.value - f.bound;
    f.K_classical = t.lg->K_classical;
    f.K_classical_kicked = t.lg->K_classical_kicked;
    f.classical_note = t.lg->classical_unavailable;
    functional = lg_functional(cells.layout, t.spec.order);
  } else if (t.nsit) {
    f.nsit = true;
    f.value = t.nsit->S;
    f.bound = 0.0;
    f.effect = std::abs(f.value);
    f.K_classical = t.nsit->S_classical;
    f.K_classical_kicked = t.nsit->S_classical_kicked;
    f.classical_note = t.nsit->classical_unavailable;
    functional = nsit_functional(cells.layout, t.spec.from, t.spec.to);
  } else {
    throw InvariantError("test prediction has neither an LG nor an NSIT part");
  }
  if (const auto* prepared = dynamic_cast<const PreparedState*>(protocol.state.get()))
    f.preparation_probability = prepared->preparation_probability();

  // The best classical explanation: the bound itself, and each classical model that exists.
  f.margin = f.effect;
  f.best_explanation = f.nsit ? "no signalling (S = 0)" : "the macrorealist bound";
  auto consider = [&](const std::optional<double>& v, const char* name) {
    if (!v) return;
    const double m = f.nsit ? f.effect - std::abs(*v) : f.value - *v;
    if (m < f.margin) {
      f.margin = m;
      f.best_explanation = name;
    }
  };
  consider(f.K_classical, "the non-invasive classical model");
  consider(f.K_classical_kicked, "the kicked classical model");

  // Per-shot variance with the optimal allocation (unit cost per shot).
  const std::vector<double> seconds(cells.layout.sequences.size(), 1.0);
  const std::vector<SequenceCost> costs = sequence_costs(functional, cells.probabilities, seconds);
  double root_sum = 0.0;
  for (const auto& c : costs) root_sum += std::sqrt(std::max(0.0, c.variance_per_shot));
  f.variance_per_shot = root_sum * root_sum;
  const double useful = options.budget_shots * f.preparation_probability;
  const double effect = options.kind == ObjectiveKind::conclusive ? f.margin : f.effect;
  if (root_sum > 0.0) {
    f.allocation = allocate_for_shots(costs, useful);
    f.z_at_budget = effect / std::sqrt(f.variance_per_shot / useful);
    const double zz = z_quantile(1.0 - options.alpha) + z_quantile(options.power);
    f.shots_needed = effect > 0.0 ? zz * zz * f.variance_per_shot /
                                        (effect * effect * f.preparation_probability)
                                  : std::numeric_limits<double>::infinity();
  } else {
    f.z_at_budget = nan;
    f.shots_needed = nan;
  }
  switch (options.kind) {
    case ObjectiveKind::K: f.objective = f.nsit ? f.effect : f.value; break;
    case ObjectiveKind::significance: f.objective = f.z_at_budget; break;
    // Same maximiser as significance (see the header); the z per root shot keeps the
    // objective finite and smooth where the effect changes sign.
    case ObjectiveKind::shots:
      f.objective = root_sum > 0.0 ? effect * std::sqrt(f.preparation_probability) / root_sum : nan;
      break;
    case ObjectiveKind::conclusive: f.objective = f.margin; break;
  }
  return f;
}

}  // namespace macroreal
