#include "design/campaign_plan.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "core/error.hpp"
#include "design/power.hpp"

namespace macroreal {

namespace {

const TestSpec* find_test(const Protocol& protocol, TestSpec::Kind kind, const std::string& label) {
  for (const auto& t : protocol.tests) {
    if (t.kind != kind) continue;
    if (label.empty() || t.label() == label) return &t;
  }
  return nullptr;
}

// Per-shot variances of the functional at probabilities p (0 for unused sequences).
std::vector<double> per_shot_variances(const LinearFunctional& f, const CellCounts& p) {
  std::vector<double> secs(p.size(), 1.0);
  std::vector<double> v;
  for (const auto& c : sequence_costs(f, p, secs)) v.push_back(c.variance_per_shot);
  return v;
}

double variance_of(const std::vector<double>& v, const std::vector<double>& shots) {
  double s = 0.0;
  for (std::size_t i = 0; i < v.size(); ++i) {
    if (!(v[i] > 0.0)) continue;
    if (!(shots[i] > 0.0)) return std::numeric_limits<double>::infinity();
    s += v[i] / shots[i];
  }
  return s;
}

// The model's cells refitted under L = target (the null the score test uses), at the shot
// proportions `shape` scaled to 1e9 shots so the fit's pseudo count is negligible.
std::vector<double> null_variances(const ModelCells& cells, const LinearFunctional& f,
                                   const std::vector<double>& shape, double target) {
  double total = 0.0;
  for (double x : shape) total += x;
  CellCounts counts = cells.probabilities;
  for (std::size_t s = 0; s < counts.size(); ++s)
    for (double& x : counts[s]) x *= 1e9 * shape[s] / total;
  const ConstrainedFit fit = constrained_fit(counts, f, target);
  return per_shot_variances(f, fit.probabilities);
}

}  // namespace

std::string to_string(PlanTest t) {
  switch (t) {
    case PlanTest::leggett_garg: return "lg";
    case PlanTest::nsit: return "nsit";
    case PlanTest::equivalence: return "equivalence";
  }
  return "?";
}

PlanTest parse_plan_test(const std::string& s) {
  if (s == "lg") return PlanTest::leggett_garg;
  if (s == "nsit") return PlanTest::nsit;
  if (s == "equivalence") return PlanTest::equivalence;
  throw DomainError("test = '" + s + "', but must be lg, nsit or equivalence");
}

void PlanOptions::validate() const {
  if (!(alpha > 0.0 && alpha < 0.5))
    throw DomainError("alpha = " + std::to_string(alpha) + ", but must be in (0, 0.5)");
  if (!(power > alpha && power < 1.0))
    throw DomainError("power = " + std::to_string(power) + ", but must be in (alpha, 1)");
  if (margin && !(*margin > 0.0 && std::isfinite(*margin)))
    throw DomainError("margin = " + std::to_string(*margin) + ", but must be > 0");
  if (curve_points < 0 || curve_points > 10000)
    throw DomainError("curve points = " + std::to_string(curve_points) + ", but must be in [0, 10000]");
  cycle.validate();
}

double CampaignPlan::power_at(const std::vector<double>& shots) const {
  std::vector<double> v1;
  for (const auto& s : sequences) v1.push_back(s.variance_per_shot);
  const double se1 = std::sqrt(variance_of(v1, shots));
  if (!std::isfinite(se1)) return 0.0;
  switch (test) {
    case PlanTest::leggett_garg:
      return power_one_sided(model_value - bound, se1, alpha);
    case PlanTest::nsit:
      return power_two_sided(model_value, std::sqrt(variance_of(null_variance_lo, shots)), se1, alpha);
    case PlanTest::equivalence:
      return power_tost(model_value, *margin, std::sqrt(variance_of(null_variance_lo, shots)),
                        std::sqrt(variance_of(null_variance_hi, shots)), se1, alpha);
  }
  return 0.0;
}

CampaignPlan plan_campaign(const Protocol& protocol, const PlanOptions& options) {
  options.validate();
  if (!protocol.state)
    throw DomainError("plan: the protocol " + protocol.file + " has no \"state\", so there is no "
                      "model to plan with");
  CampaignPlan plan;
  plan.protocol_file = protocol.file;
  plan.title = protocol.title;
  plan.test = options.test;
  plan.alpha = options.alpha;
  plan.target_power = options.power;
  plan.cycle = options.cycle;

  const auto kind = options.test == PlanTest::leggett_garg ? TestSpec::Kind::leggett_garg
                                                            : TestSpec::Kind::nsit;
  const TestSpec* spec = find_test(protocol, kind, options.test_label);
  if (!spec)
    throw DomainError("plan: the protocol has no " +
                      std::string(kind == TestSpec::Kind::leggett_garg ? "leggett-garg" : "nsit") +
                      " test" + (options.test_label.empty() ? "" : " labelled '" + options.test_label + "'") +
                      " (needed by --test " + to_string(options.test) + ")");
  plan.test_label = spec->label();
  plan.cells = model_cells(protocol, options.predict);
  plan.engine = plan.cells.prediction.engine.name;
  for (const auto& t : plan.cells.prediction.tests) {
    if (t.spec.label() != plan.test_label) continue;
    if (t.lg) plan.model_verdict = t.lg->verdict;
    if (t.nsit) plan.model_verdict = t.nsit->verdict;
  }
  const CampaignCounts& layout = plan.cells.layout;
  if (options.test == PlanTest::leggett_garg) {
    plan.functional = lg_functional(layout, spec->order);
    plan.bound = static_cast<double>(spec->order.size()) - 2.0;
    plan.method = "one-sided z test of H0: " + plan.functional.name + " <= " +
                  std::to_string(static_cast<int>(plan.bound)) +
                  " on the non-pooled estimate with its plug-in standard error (normal "
                  "approximation of the studentised statistic of analyse's parametric-bootstrap test)";
  } else {
    plan.functional = nsit_functional(layout, spec->from, spec->to);
    if (options.test == PlanTest::nsit) {
      plan.bound = 0.0;
      plan.method = "two-sided score test of " + plan.functional.name +
                    " = 0, null variance from the constrained fit S = 0";
    } else {
      plan.margin = options.margin ? options.margin : spec->margin;
      if (!plan.margin)
        throw DomainError("plan: --test equivalence needs a margin (--margin or the test's "
                          "\"margin\" in the protocol)");
      if (!(*plan.margin < plan.functional.max_value() && -*plan.margin > plan.functional.min_value()))
        throw DomainError("plan: margin " + std::to_string(*plan.margin) + " lies outside the range of " +
                          plan.functional.name);
      plan.bound = *plan.margin;
      plan.method = "TOST (two one-sided score tests) of |" + plan.functional.name + "| < " +
                    std::to_string(*plan.margin) + ", null variances from the fits S = -+margin";
    }
  }
  plan.quantity = plan.functional.name;
  plan.model_value = plan.functional.value_at(plan.cells.probabilities);

  // Costs and the optimum shape per lab second.
  const auto seconds = mean_seconds_per_shot(layout, plan.cells.probabilities, options.cycle,
                                             step_times(protocol, layout));
  auto costs = sequence_costs(layout, plan.functional, plan.cells.probabilities, seconds);
  double vmax = 0.0;
  for (const auto& c : costs) vmax = std::max(vmax, c.variance_per_shot);
  if (!(vmax > 0.0)) {
    plan.feasible = false;
    plan.infeasible_reason = plan.quantity + " is deterministic under the model (variance 0)";
  }
  // A used sequence that is deterministic under the model still needs shots for the estimate
  // to exist (and has null variance > 0): floor its variance at 1e-12 of the largest.
  for (std::size_t s = 0; s < costs.size(); ++s)
    if (plan.functional.uses(s) && costs[s].variance_per_shot < 1e-12 * vmax)
      costs[s].variance_per_shot = 1e-12 * vmax;
  for (std::size_t s = 0; s < costs.size(); ++s) {
    PlannedSequence ps;
    ps.name = costs[s].name;
    ps.listed = !protocol.find_sequence(ps.name) || !protocol.find_sequence(ps.name)->generated;
    ps.variance_per_shot = costs[s].variance_per_shot;
    ps.seconds_per_shot = costs[s].seconds_per_shot;
    plan.sequences.push_back(ps);
  }
  plan.assumptions = {
      "The protocol's model is taken as the truth: the plan is only as good as the model's "
      "state, noise and settings.",
      "Shots are independent and the runs stationary (no drift over the campaign).",
      "Detection errors are not included: probabilities are those of the ideal outcomes.",
      "The power is a normal approximation; --verify measures it by simulating campaigns.",
  };
  plan.not_established = {
      "A plan does not make a violation conclusive: it only sizes the test of the model's value.",
  };
  if (!plan.model_verdict.empty()) plan.assumptions.push_back("Model: " + plan.model_verdict);
  if (!plan.feasible) return plan;

  const ShotAllocation unit = allocate_for_time(costs, 1.0);  // shots per lab second
  const double sd1 = std::sqrt(unit.variance);
  plan.sd_per_sqrt_second = sd1;
  const double effect = plan.model_value - plan.bound;
  double t = 0.0;
  if (options.test == PlanTest::leggett_garg) {
    if (!(effect > 0.0)) {
      plan.feasible = false;
      plan.infeasible_reason = "the model's " + plan.quantity + " = " + std::to_string(plan.model_value) +
                               " does not exceed the bound " + std::to_string(plan.bound) +
                               ", so no number of shots gives the test power above alpha";
      return plan;
    }
    t = units_one_sided(effect, sd1, options.alpha, options.power);
  } else if (options.test == PlanTest::nsit) {
    if (!(std::abs(plan.model_value) > 1e-12)) {
      plan.feasible = false;
      plan.infeasible_reason = "the model's " + plan.quantity + " is 0: there is no signalling to detect";
      return plan;
    }
    plan.null_variance_lo = plan.null_variance_hi = null_variances(plan.cells, plan.functional, unit.shots, 0.0);
    const double sd0 = std::sqrt(variance_of(plan.null_variance_lo, unit.shots));
    const double guess = units_two_sided(plan.model_value, sd0, sd1, options.alpha, options.power);
    t = solve_units([&](double u) { return power_two_sided(plan.model_value, sd0 / std::sqrt(u),
                                                           sd1 / std::sqrt(u), options.alpha); },
                    options.power, guess);
  } else {
    const double m = *plan.margin;
    if (!(std::abs(plan.model_value) < m)) {
      plan.feasible = false;
      plan.infeasible_reason = "the model's |" + plan.quantity + "| = " +
                               std::to_string(std::abs(plan.model_value)) +
                               " is not inside the margin " + std::to_string(m) +
                               ", so equivalence cannot be shown";
      return plan;
    }
    plan.null_variance_lo = null_variances(plan.cells, plan.functional, unit.shots, -m);
    plan.null_variance_hi = null_variances(plan.cells, plan.functional, unit.shots, +m);
    const double sdl = std::sqrt(variance_of(plan.null_variance_lo, unit.shots));
    const double sdh = std::sqrt(variance_of(plan.null_variance_hi, unit.shots));
    const double guess = units_tost(plan.model_value, m, sd1, options.alpha, options.power);
    t = solve_units([&](double u) {
          const double r = std::sqrt(u);
          return power_tost(plan.model_value, m, sdl / r, sdh / r, sd1 / r, options.alpha);
        },
        options.power, guess);
  }

  // The planned scale, rounded up.
  std::vector<double> rounded(costs.size(), 0.0);
  plan.total_shots = 0;
  for (std::size_t s = 0; s < costs.size(); ++s) {
    auto& ps = plan.sequences[s];
    ps.shots = unit.shots[s] * t;
    if (ps.shots > 0.0)
      ps.shots_rounded = std::max<long long>(1, static_cast<long long>(std::ceil(ps.shots * (1.0 - 1e-12))));
    rounded[s] = static_cast<double>(ps.shots_rounded);
    plan.total_shots += ps.shots_rounded;
  }
  plan.lab_seconds = allocation_seconds(costs, rounded);
  plan.planned_power = plan.power_at(rounded);
  plan.se_model = std::sqrt(allocation_variance(costs, rounded));
  if (!plan.null_variance_lo.empty()) {
    plan.se_null_lo = std::sqrt(variance_of(plan.null_variance_lo, rounded));
    plan.se_null_hi = std::sqrt(variance_of(plan.null_variance_hi, rounded));
  }
  // Power against total shots at the optimum shape.
  double unit_total = 0.0;
  for (double x : unit.shots) unit_total += x;
  for (int k = 1; k <= options.curve_points; ++k) {
    PowerCurvePoint pt;
    pt.total_shots = static_cast<double>(plan.total_shots) * k / 20.0;
    const double u = pt.total_shots / unit_total;
    std::vector<double> shots(unit.shots);
    for (double& x : shots) x *= u;
    pt.lab_seconds = u;
    pt.power = plan.power_at(shots);
    plan.power_curve.push_back(pt);
  }
  return plan;
}

}  // namespace macroreal
