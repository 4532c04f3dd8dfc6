#include "report/plan_report.hpp"

#include <cmath>
#include <cstdio>

#include "report/text_layout.hpp"

namespace macroreal {

namespace {

std::string sci(double x) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.4g", x);
  return buf;
}

nlohmann::ordered_json number_or_null(double x) {
  return std::isfinite(x) ? nlohmann::ordered_json(x) : nlohmann::ordered_json(nullptr);
}

}  // namespace

AllocationFile plan_allocation(const CampaignPlan& plan) {
  AllocationFile a;
  for (const auto& s : plan.sequences)
    if (s.shots_rounded > 0) a.shots[s.name] = s.shots_rounded;
  a.extra["test"] = plan.test_label;
  a.extra["statistic"] = plan.quantity;
  a.extra["alpha"] = plan.alpha;
  a.extra["target_power"] = plan.target_power;
  a.extra["planned_power"] = plan.planned_power;
  a.extra["lab_hours"] = plan.lab_seconds / 3600.0;
  return a;
}

nlohmann::ordered_json plan_json(const CampaignPlan& plan,
                                 const std::optional<PlanVerification>& verification) {
  nlohmann::ordered_json j;
  j["protocol"] = plan.protocol_file;
  j["title"] = plan.title;
  j["test"] = {{"kind", to_string(plan.test)}, {"label", plan.test_label},
               {"statistic", plan.quantity}, {"method", plan.method}};
  j["alpha"] = plan.alpha;
  j["target_power"] = plan.target_power;
  j["model_value"] = plan.model_value;
  j["bound"] = plan.bound;
  j["margin"] = plan.margin ? nlohmann::ordered_json(*plan.margin) : nlohmann::ordered_json(nullptr);
  j["engine"] = plan.engine;
  j["feasible"] = plan.feasible;
  if (!plan.feasible) j["infeasible_reason"] = plan.infeasible_reason;
  j["cycle_time"] = {{"overhead_s", plan.cycle.overhead_s}, {"per_step_s", plan.cycle.per_step_s},
                     {"include_step_times", plan.cycle.include_step_times}};
  nlohmann::ordered_json seqs = nlohmann::ordered_json::array();
  for (const auto& s : plan.sequences)
    seqs.push_back({{"name", s.name}, {"listed", s.listed},
                    {"variance_per_shot", s.variance_per_shot},
                    {"seconds_per_shot", s.seconds_per_shot}, {"shots_optimum", s.shots},
                    {"shots", s.shots_rounded}});
  j["sequences"] = seqs;
  nlohmann::ordered_json shots = nlohmann::ordered_json::object();
  for (const auto& s : plan.sequences)
    if (s.shots_rounded > 0) shots[s.name] = s.shots_rounded;
  j["shots"] = shots;
  j["total_shots"] = plan.total_shots;
  j["lab_seconds"] = plan.lab_seconds;
  j["lab_hours"] = plan.lab_seconds / 3600.0;
  j["planned_power"] = plan.planned_power;
  j["se_model"] = plan.se_model;
  if (!plan.null_variance_lo.empty())
    j["se_null"] = {number_or_null(plan.se_null_lo), number_or_null(plan.se_null_hi)};
  nlohmann::ordered_json curve = nlohmann::ordered_json::array();
  for (const auto& p : plan.power_curve)
    curve.push_back({{"total_shots", p.total_shots}, {"lab_hours", p.lab_seconds / 3600.0},
                     {"power", p.power}});
  j["power_curve"] = curve;
  if (verification) {
    const auto& v = *verification;
    j["verification"] = {{"method", v.method},       {"campaigns", v.campaigns},
                         {"rejections", v.rejections}, {"undefined", v.undefined},
                         {"power", {{"estimate", v.power}, {"ci", {v.lo, v.hi}}, {"level", v.level},
                                    {"method", "clopper-pearson"}}},
                         {"planned_power", v.planned_power},
                         {"planned_within_interval", v.planned_within_interval},
                         {"seed", v.seed}};
  }
  j["assumptions"] = plan.assumptions;
  j["not_established"] = plan.not_established;
  return j;
}

std::string plan_json_text(const CampaignPlan& plan,
                           const std::optional<PlanVerification>& verification) {
  return plan_json(plan, verification).dump(2) + "\n";
}

std::string plan_text(const CampaignPlan& plan, const std::optional<PlanVerification>& verification) {
  std::string out;
  out += "Campaign plan: " + plan.title + "\n";
  out += "  protocol   " + plan.protocol_file + " (model engine: " + plan.engine + ")\n";
  out += "  test       " + plan.test_label + ", " + plan.quantity + " (" + to_string(plan.test) + ")\n";
  out += detail::wrap(plan.method, "  method     ", "             ");
  out += "  level      alpha = " + detail::fixed_decimals(plan.alpha, 3) + ", target power " + detail::fixed_decimals(plan.target_power, 3) + "\n";
  out += "  model      " + plan.quantity + " = " + detail::fixed_decimals(plan.model_value, 5) +
         (plan.test == PlanTest::leggett_garg ? ", bound " + detail::fixed_decimals(plan.bound, 0)
          : plan.margin ? ", margin " + detail::fixed_decimals(*plan.margin, 4) : std::string()) + "\n";
  out += "  cycle      " + sci(plan.cycle.overhead_s) + " s per shot + " + sci(plan.cycle.per_step_s) +
         " s per step run" + (plan.cycle.include_step_times ? " + the protocol's waits" : "") + "\n\n";
  if (!plan.feasible) {
    out += detail::wrap("No plan: " + plan.infeasible_reason + ".", "  ", "  ");
  } else {
    detail::Table t({false, true, true, true});
    t.row({"sequence", "variance/shot", "s/shot", "shots"});
    for (const auto& s : plan.sequences)
      t.row({s.name + (s.listed ? "" : " (generated)"), sci(s.variance_per_shot),
             sci(s.seconds_per_shot), std::to_string(s.shots_rounded)});
    out += t.str();
    out += "\n  total      " + std::to_string(plan.total_shots) + " shots, " +
           detail::fixed_decimals(plan.lab_seconds / 3600.0, 3) + " h of lab time (" + sci(plan.lab_seconds) + " s)\n";
    out += "  power      " + detail::fixed_decimals(plan.planned_power, 4) + " (normal approximation at the rounded shots; SE of " +
           plan.quantity + " " + sci(plan.se_model) + ")\n";
    if (verification) {
      const auto& v = *verification;
      out += "  verified   " + detail::fixed_decimals(v.power, 4) + " [" + detail::fixed_decimals(v.lo, 4) + ", " + detail::fixed_decimals(v.hi, 4) + "] (" +
             std::to_string(v.rejections) + " of " + std::to_string(v.campaigns) +
             " simulated campaigns rejected; " + detail::fixed_decimals(v.level * 100.0, 0) +
             "% Clopper-Pearson interval; test: " + v.method + "; seed " + std::to_string(v.seed) + ")\n";
      if (v.undefined > 0)
        out += "             " + std::to_string(v.undefined) +
               " campaigns had an undefined statistic (counted as not rejecting)\n";
      out += std::string("             the planned power ") +
             (v.planned_within_interval ? "lies inside" : "lies OUTSIDE") + " the interval\n";
    }
  }
  out += "\nAssumptions\n";
  for (const auto& a : plan.assumptions) out += detail::wrap(a, "  - ", "    ");
  out += "Not established\n";
  for (const auto& a : plan.not_established) out += detail::wrap(a, "  - ", "    ");
  return out;
}

std::string power_curve_csv(const CampaignPlan& plan) {
  std::string out = "total_shots,lab_hours,power\n";
  char buf[128];
  for (const auto& p : plan.power_curve) {
    std::snprintf(buf, sizeof buf, "%.0f,%.6g,%.6f\n", p.total_shots, p.lab_seconds / 3600.0, p.power);
    out += buf;
  }
  return out;
}

}  // namespace macroreal
