#include "report/optimisation_report.hpp"

#include <cmath>
#include <cstdio>
#include <sstream>

#include "report/text_layout.hpp"

namespace macroreal {
namespace {

std::string num(double x, int digits = 6) {
  if (std::isnan(x)) return "n/a";
  if (std::isinf(x)) return x > 0 ? "inf" : "-inf";
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*g", digits, x);
  return buf;
}

nlohmann::ordered_json number_or_null(double x) {
  if (!std::isfinite(x)) return nullptr;
  return x;
}

nlohmann::ordered_json optional_json(const std::optional<double>& v) {
  if (!v) return nullptr;
  return *v;
}

std::string objective_words(const OptimisationResult& r) {
  switch (r.objective_kind) {
    case ObjectiveKind::K: return r.figures.nsit ? "|S|" : "K";
    case ObjectiveKind::significance: return "expected one-sided z at the shot budget";
    case ObjectiveKind::shots: return "z per square-root shot (shots to target reported)";
    case ObjectiveKind::conclusive: return "margin over the best classical explanation";
  }
  return "?";
}

}  // namespace

nlohmann::ordered_json optimisation_json(const OptimisationResult& r) {
  nlohmann::ordered_json j;
  j["objective"] = {{"kind", to_string(r.objective_kind)},
                    {"robust", to_string(r.robust)},
                    {"value", number_or_null(r.objective)},
                    {"start_value", number_or_null(r.start_objective)}};
  const DesignFigures& f = r.figures;
  nlohmann::ordered_json t;
  t["test"] = f.test_label;
  t[f.nsit ? "S" : "K"] = f.value;
  t["bound"] = f.bound;
  t["variance_per_shot"] = number_or_null(f.variance_per_shot);
  t["K_classical"] = optional_json(f.K_classical);
  t["K_classical_kicked"] = optional_json(f.K_classical_kicked);
  t["margin"] = f.margin;
  t["best_classical_explanation"] = f.best_explanation;
  t["preparation_probability"] = f.preparation_probability;
  t["z_at_budget"] = number_or_null(f.z_at_budget);
  t["shots_needed"] = number_or_null(f.shots_needed);
  j["figures"] = t;
  j["input"] = r.input;
  nlohmann::ordered_json cands = nlohmann::ordered_json::array();
  for (const auto& c : r.candidates)
    cands.push_back({{"input", c.input}, {"objective", number_or_null(c.objective)},
                     {"evaluations", c.evaluations}});
  j["inputs_tried"] = cands;
  nlohmann::ordered_json params = nlohmann::ordered_json::array();
  for (const auto& p : r.parameters)
    params.push_back({{"setting", p.label}, {"unit", p.unit}, {"lower", p.lower},
                      {"upper", p.upper}, {"start", p.start}, {"value", p.value}});
  j["settings"] = params;
  nlohmann::ordered_json tol = nlohmann::ordered_json::array();
  for (const auto& row : r.tolerance)
    tol.push_back({{"setting", row.label}, {"value", row.value}, {"step", row.step},
                   {"objective_minus", number_or_null(row.minus)},
                   {"objective_plus", number_or_null(row.plus)},
                   {"drop", number_or_null(row.drop)}});
  j["tolerance"] = tol;
  j["search"] = {{"method", r.search.method},
                 {"evaluations", r.evaluations},
                 {"converged", r.search.converged}};
  j["notes"] = r.notes;
  j["protocol"] = r.protocol_json;
  return j;
}

std::string optimisation_json_text(const OptimisationResult& r) {
  return optimisation_json(r).dump(2) + "\n";
}

std::string optimised_protocol_text(const OptimisationResult& r) {
  return r.protocol_json.dump(2) + "\n";
}

std::string optimisation_text(const OptimisationResult& r) {
  std::ostringstream os;
  const DesignFigures& f = r.figures;
  os << "Setting optimisation: " << f.test_label << "\n";
  os << "  objective: " << objective_words(r) << " (" << to_string(r.objective_kind);
  if (r.robust != RobustMode::none) os << ", robust " << to_string(r.robust) << " over the noise uncertainty";
  os << ")\n";
  os << "  value at the optimum: " << num(r.objective) << "   at the file's settings: "
     << num(r.start_objective) << "\n";
  os << "  input state: " << r.input << "\n";
  os << "  search: " << r.search.method << "; " << r.evaluations << " evaluations\n\n";

  detail::Table fig({false, true});
  fig.row({f.nsit ? "S" : "K", num(f.value)});
  fig.row({"bound", num(f.bound)});
  fig.row({"per-shot variance (optimal allocation)", num(f.variance_per_shot)});
  fig.row({"K_classical (non-invasive)", f.K_classical ? num(*f.K_classical) : "n/a"});
  fig.row({"K_classical_kicked", f.K_classical_kicked ? num(*f.K_classical_kicked) : "n/a"});
  fig.row({"margin over " + f.best_explanation, num(f.margin)});
  fig.row({"preparation success probability", num(f.preparation_probability)});
  fig.row({"expected z at the shot budget", num(f.z_at_budget)});
  fig.row({"shots to reach the target level and power", num(f.shots_needed)});
  os << "Figures at the optimum (noise at its central values)\n" << fig.str() << "\n";

  detail::Table set({false, false, true, true, true, true});
  set.row({"setting", "unit", "lower", "upper", "file", "optimum"});
  for (const auto& p : r.parameters)
    set.row({p.label, p.unit.empty() ? "-" : p.unit, num(p.lower), num(p.upper), num(p.start),
             num(p.value, 8)});
  os << "Settings\n" << set.str() << "\n";

  detail::Table tol({false, true, true, true, true});
  tol.row({"setting", "change", "objective -", "objective +", "drop"});
  for (const auto& row : r.tolerance)
    tol.row({row.label, "+/-" + num(row.step, 3), num(row.minus), num(row.plus), num(row.drop)});
  os << "Tolerance (one setting changed at a time: magnitudes by 5 % of their value, angles and "
        "phases by 5 % of a quarter turn)\n"
     << tol.str() << "\n";

  os << "What this rests on\n";
  for (const auto& n : r.notes) os << detail::wrap(n, "  - ", "    ");
  return os.str();
}

}  // namespace macroreal
