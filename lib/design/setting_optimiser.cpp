#include "design/setting_optimiser.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>
#include <sstream>

#include <boost/math/quadrature/gauss.hpp>

#include "core/error.hpp"
#include "phase_space/hermite_rule.hpp"
#include "protocol/protocol_reader.hpp"

namespace macroreal {

std::string to_string(RobustMode m) {
  switch (m) {
    case RobustMode::none: return "none";
    case RobustMode::mean: return "mean";
    case RobustMode::worst: return "worst";
  }
  return "?";
}

RobustMode parse_robust_mode(const std::string& s) {
  if (s == "none") return RobustMode::none;
  if (s == "mean") return RobustMode::mean;
  if (s == "worst") return RobustMode::worst;
  throw DomainError("robust = '" + s + "', but must be none, mean or worst");
}

namespace {

constexpr double kDeg = std::numbers::pi / 180.0;
const double kNaN = std::numeric_limits<double>::quiet_NaN();

nlohmann::json cat_state_json(double beta0) {
  return {{"kind", "prepared"},
          {"from", {{"kind", "fock"}, {"n", 0}}},
          {"steps", nlohmann::json::array({{{"beta", {beta0, 0.0}},
                                            {"phase_deg", 0.0},
                                            {"split", "symmetric"}}})},
          {"outcomes", "+"}};
}

// One noise realisation of the robust grid with its weight.
struct NoiseNode {
  std::vector<std::pair<std::string, double>> values;
  double weight = 1.0;
};

std::vector<NoiseNode> noise_nodes(const Protocol& p, RobustMode mode, int n) {
  std::vector<NoiseNode> grid{NoiseNode{}};
  if (mode == RobustMode::none || p.uncertain_noise.empty()) return grid;
  if (n < 1 || n > 20) throw DomainError("robust_nodes must be in [1, 20]");
  for (const UncertainValue& u : p.uncertain_noise) {
    std::vector<std::pair<double, double>> rule;  // (value, weight)
    if (u.is_range()) {
      const double lo = *u.low, hi = *u.high, mid = 0.5 * (lo + hi), half = 0.5 * (hi - lo);
      // Gauss-Legendre on [-1, 1] (Boost.Math), weights summing to 2: halve them.
      auto add = [&](double x, double w) { rule.emplace_back(mid + half * x, 0.5 * w); };
      switch (n) {  // the Boost rule is a compile-time size
        case 1: rule.emplace_back(mid, 1.0); break;
        case 2: for (std::size_t i = 0; i < 1; ++i) {
            const auto& a = boost::math::quadrature::gauss<double, 2>::abscissa();
            const auto& w = boost::math::quadrature::gauss<double, 2>::weights();
            add(a[0], w[0]); add(-a[0], w[0]);
          } break;
        case 3: case 4: {
            const auto& a = boost::math::quadrature::gauss<double, 3>::abscissa();
            const auto& w = boost::math::quadrature::gauss<double, 3>::weights();
            add(a[0], w[0]); add(a[1], w[1]); add(-a[1], w[1]);
          } break;
        default: {
            const auto& a = boost::math::quadrature::gauss<double, 5>::abscissa();
            const auto& w = boost::math::quadrature::gauss<double, 5>::weights();
            add(a[0], w[0]);
            for (int i = 1; i < 3; ++i) { add(a[i], w[i]); add(-a[i], w[i]); }
          } break;
      }
      if (mode == RobustMode::worst) {  // the ends too: the worst case is often there
        rule.emplace_back(lo, 0.0);
        rule.emplace_back(hi, 0.0);
      }
    } else {
      const auto& h = detail::gauss_hermite_rule(n);
      for (std::size_t i = 0; i < h.nodes.size(); ++i)
        rule.emplace_back(std::max(0.0, u.mean + u.sd * h.nodes[i]), h.weights[i]);
    }
    std::vector<NoiseNode> next;
    for (const NoiseNode& g : grid)
      for (const auto& [v, w] : rule) {
        NoiseNode node = g;
        node.values.emplace_back(u.field, v);
        node.weight *= w;
        next.push_back(std::move(node));
      }
    grid = std::move(next);
  }
  return grid;
}

double aggregate(const Protocol& p, const OptimiseOptions& o, const std::vector<NoiseNode>& grid) {
  if (grid.size() == 1 && grid[0].values.empty())
    return evaluate_design(p, o.objective).objective;
  double mean = 0.0, worst = std::numeric_limits<double>::infinity();
  for (const NoiseNode& node : grid) {
    Protocol q = p;
    for (const auto& [field, v] : node.values) q = with_noise_value(q, field, v);
    const double f = evaluate_design(q, o.objective).objective;
    if (!std::isfinite(f)) return kNaN;
    mean += node.weight * f;
    worst = std::min(worst, f);
  }
  return o.robust == RobustMode::worst ? worst : mean;
}

// The parameters of one input candidate, with their bounds and the protocol's values.
std::vector<SettingParameter> parameters_of(const Protocol& p, const OptimiseOptions& o,
                                            bool cat) {
  std::vector<SettingParameter> out;
  auto wanted = [&](const std::string& name, const std::string& kind) {
    for (const std::string& f : o.free)
      if (f == kind || f == name + "." + kind) return true;
    return false;
  };
  for (const std::string& f : o.free) {
    const auto dot = f.find('.');
    const std::string kind = dot == std::string::npos ? f : f.substr(dot + 1);
    if (kind != "beta" && kind != "angle" && kind != "phase")
      throw DomainError("free setting '" + f + "', but must be beta, angle or phase, optionally "
                        "prefixed by a measurement name (A.beta)");
    if (dot != std::string::npos && !p.measurements.count(f.substr(0, dot)))
      throw DomainError("free setting '" + f + "' names no measurement of the protocol");
  }
  for (const auto& [name, spec] : p.measurements) {
    const double mod = std::abs(spec.measurement.beta);
    const double ang = std::arg(spec.measurement.beta) / kDeg;
    const double ph = spec.measurement.phase_rad / kDeg;
    if (wanted(name, "beta"))
      out.push_back({name + ".beta", name, "beta", "", o.min_beta, o.max_beta, mod, mod});
    const double sa = o.angle_span_deg, sp = o.phase_span_deg;
    if (wanted(name, "angle"))
      out.push_back({name + ".angle", name, "angle", "deg", ang - sa, ang + sa, ang, ang});
    if (wanted(name, "phase"))
      out.push_back({name + ".phase", name, "phase", "deg", ph - sp, ph + sp, ph, ph});
  }
  if (cat) {
    // Start from the protocol's own preparation when it is a one-step prepared state.
    double start = std::min(4.0, o.max_preparation_beta);
    const nlohmann::json& sj = p.state_json;
    if (sj.is_object() && sj.value("kind", "") == "prepared" && sj.contains("steps") &&
        sj["steps"].size() == 1) {
      const nlohmann::json& st = sj["steps"][0];
      if (st.contains("beta")) start = std::abs(cplx(st["beta"][0].get<double>(),
                                                     st["beta"][1].get<double>()));
      if (st.contains("beta_polar")) start = st["beta_polar"][0].get<double>();
    }
    out.push_back({"preparation.beta", "", "preparation", "", 0.5, o.max_preparation_beta, start,
                   start});
  }
  for (auto& s : out) s.start = std::clamp(s.start, s.lower, s.upper);
  return out;
}

Protocol apply(const Protocol& base, const std::vector<SettingParameter>& params,
               const std::vector<double>& x, bool cat) {
  Protocol p = base;
  for (std::size_t i = 0; i < params.size(); ++i) {
    const SettingParameter& s = params[i];
    if (s.kind == "preparation") {
      p.state_json = cat_state_json(x[i]);
      p.state = parse_state(p.state_json, p.file, "state");
      continue;
    }
    ModularMeasurement& m = p.measurements.at(s.measurement).measurement;
    if (s.kind == "beta") m.beta = std::polar(std::max(0.0, x[i]), std::arg(m.beta));
    if (s.kind == "angle") m.beta = std::polar(std::abs(m.beta), x[i] * kDeg);
    if (s.kind == "phase") m.phase_rad = x[i] * kDeg;
  }
  (void)cat;
  return p;
}

// The optimised protocol as a file: the original document with the changed fields.
nlohmann::json patch_json(const nlohmann::json& original, const Protocol& p,
                          const std::vector<SettingParameter>& params, bool cat,
                          const std::string& note) {
  nlohmann::json j = original;
  for (const SettingParameter& s : params) {
    if (s.kind == "preparation") continue;
    const ModularMeasurement& m = p.measurements.at(s.measurement).measurement;
    nlohmann::json& mj = j["measurements"][s.measurement];
    mj.erase("beta");
    double ang = std::arg(m.beta) / kDeg;
    mj["beta_polar"] = {std::abs(m.beta), ang};
    double ph = std::fmod(m.phase_rad / kDeg, 360.0);
    if (ph < 0) ph += 360.0;
    mj["phase_deg"] = ph;
  }
  if (cat) j["state"] = p.state_json;
  const std::string title = j.value("title", std::string("protocol"));
  j["title"] = title + " (" + note + ")";
  return j;
}

}  // namespace

double robust_objective(const Protocol& protocol, const OptimiseOptions& options) {
  return aggregate(protocol, options,
                   noise_nodes(protocol, options.robust, options.robust_nodes));
}

OptimisationResult optimise_settings(const Protocol& protocol, const nlohmann::json& original,
                                     const OptimiseOptions& options) {
  if (!(options.max_beta > 0.0) || !std::isfinite(options.max_beta))
    throw DomainError("max_beta must be > 0 and finite");
  if (!(options.max_preparation_beta > 0.5))
    throw DomainError("max_preparation_beta must be > 0.5");
  if (!(options.angle_span_deg > 0.0 && options.angle_span_deg <= 180.0) ||
      !(options.phase_span_deg > 0.0 && options.phase_span_deg <= 180.0))
    throw DomainError("angle_span_deg and phase_span_deg must be in (0, 180]");
  if (!(options.min_beta >= 0.0 && options.min_beta < options.max_beta))
    throw DomainError("min_beta must be in [0, max_beta)");
  if (options.inputs.empty()) throw DomainError("no input state allowed (inputs is empty)");
  if (!(options.tolerance_step > 0.0 && options.tolerance_step < 1.0))
    throw DomainError("tolerance_step must be in (0, 1)");
  if (!protocol.state) throw DomainError("the protocol has no state: nothing to optimise for");
  const std::vector<NoiseNode> grid =
      noise_nodes(protocol, options.robust, options.robust_nodes);

  OptimisationResult best;
  best.objective = -std::numeric_limits<double>::infinity();
  long total_evaluations = 0;
  bool have = false;
  for (const std::string& input : options.inputs) {
    if (input != "protocol" && input != "cat")
      throw DomainError("input state '" + input + "', but must be protocol or cat");
    const bool cat = input == "cat";
    std::vector<SettingParameter> params = parameters_of(protocol, options, cat);
    if (params.empty())
      throw DomainError("no free setting: give --free beta,angle,phase (or A.beta, ...)");
    auto f = [&](const std::vector<double>& x) {
      try {
        return aggregate(apply(protocol, params, x, cat), options, grid);
      } catch (const DomainError&) {
        return kNaN;  // e.g. a preparation outcome of vanishing probability
      } catch (const UnsupportedError&) {
        return kNaN;
      }
    };
    SearchProblem problem;
    for (const auto& s : params) {
      problem.lower.push_back(s.lower);
      problem.upper.push_back(s.upper);
      problem.start.push_back(s.start);
    }
    problem.objective = f;
    const SearchResult r = maximise(problem, options.search);
    total_evaluations += r.evaluations;
    best.candidates.push_back({input, r.value, r.evaluations});
    if (!std::isfinite(r.value)) continue;
    if (!have || r.value > best.objective) {
      have = true;
      best.objective = r.value;
      best.search = r;
      best.input = input;
      for (std::size_t i = 0; i < params.size(); ++i) params[i].value = r.x[i];
      best.parameters = params;
      best.protocol = apply(protocol, params, r.x, cat);
      best.start_objective = cat ? kNaN : f(problem.start);
      ++total_evaluations;
    }
  }
  if (!have)
    throw DomainError("the objective is undefined at every point the search evaluated (for "
                      "the shots objective: no setting gives an effect above the bound)");

  const bool cat = best.input == "cat";
  best.objective_kind = options.objective.kind;
  best.robust = grid.size() > 1 ? options.robust : RobustMode::none;
  ObjectiveOptions full = options.objective;
  full.predict.classical_models = true;
  best.figures = evaluate_design(best.protocol, full);
  if (options.objective.kind == ObjectiveKind::conclusive) {
    // evaluate_design with conclusive already uses the margin; keep its objective.
  }

  // Tolerance table: each setting changed by -/+ step of its value, the others at the optimum.
  std::vector<double> x = best.search.x;
  for (std::size_t i = 0; i < best.parameters.size(); ++i) {
    ToleranceRow row;
    row.label = best.parameters[i].label;
    row.value = x[i];
    const std::string& kind = best.parameters[i].kind;
    const bool magnitude = kind == "beta" || kind == "preparation";
    row.step = magnitude ? options.tolerance_step * std::abs(x[i]) : options.tolerance_step * 90.0;
    auto at = [&](double sign) {
      std::vector<double> y = x;
      y[i] = x[i] + sign * row.step;
      try {
        ++total_evaluations;
        return aggregate(apply(protocol, best.parameters, y, cat), options, grid);
      } catch (const DomainError&) {
        return kNaN;
      }
    };
    row.minus = at(-1.0);
    row.plus = at(+1.0);
    row.drop = best.objective - std::min(row.minus, row.plus);
    best.tolerance.push_back(row);
  }
  best.evaluations = total_evaluations;

  std::ostringstream note;
  note.precision(6);
  note << "optimised for " << to_string(options.objective.kind);
  if (best.robust != RobustMode::none) note << ", robust " << to_string(best.robust);
  best.protocol_json = patch_json(original, best.protocol, best.parameters, cat, note.str());

  // What the result rests on.
  if (!best.search.converged)
    best.notes.push_back("The search stopped on its evaluation budget; the optimum may improve "
                         "with a larger budget.");
  const DesignFigures& fig = best.figures;
  if (!fig.nsit) {
    if (fig.K_classical || fig.K_classical_kicked) {
      if (fig.margin <= 1e-9)
        best.notes.push_back(
            "No margin over the classical explanations: for this input (non-negative Wigner "
            "function) the classical point model with the split's kick reproduces the quantum "
            "correlators, so no setting gives a conclusive test; use a Wigner-negative input "
            "(e.g. --inputs cat).");
    } else {
      best.notes.push_back("The classical models cannot be built for this input (" +
                           fig.classical_note +
                           "): the margin is over the macrorealist bound only.");
    }
  }
  if (fig.preparation_probability < 1.0)
    best.notes.push_back("The input is prepared by post-selection; the shot figures charge its "
                         "success probability to the budget.");
  best.notes.push_back("The figures assume the noise model of the protocol file; the tolerance "
                       "table changes one setting at a time.");
  return best;
}

}  // namespace macroreal
