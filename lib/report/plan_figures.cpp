#include "report/plan_figures.hpp"
#include "report/text_layout.hpp"

#include <cstdio>

#include "core/error.hpp"

namespace macroreal {

Figure power_figure(const CampaignPlan& plan, const std::optional<PlanVerification>& verification) {
  if (!plan.feasible || plan.power_curve.empty())
    throw DomainError("figures: the plan for " + plan.quantity + " is not feasible (" +
                      plan.infeasible_reason + "), so it has no power curve");
  Figure f;
  f.title = "Power of the test of " + plan.quantity + " at level " + detail::fixed_decimals(plan.alpha, 3) +
            " against total shots";
  f.x_label = "total shots (all sequences, the plan's allocation)";
  f.y_label = "power (probability)";
  FigureSeries curve;
  curve.label = "normal approximation";
  curve.colour = PaletteColour::blue;
  for (const auto& p : plan.power_curve) {
    curve.x.push_back(p.total_shots);
    curve.y.push_back(p.power);
  }
  FigureSeries target;
  target.kind = FigureSeries::Kind::horizontal_line;
  target.label = "requested power " + detail::fixed_decimals(plan.target_power, 2);
  target.colour = PaletteColour::black;
  target.dashed = true;
  target.y = {plan.target_power};
  FigureSeries planned;
  planned.kind = FigureSeries::Kind::vertical_line;
  planned.label = "planned: " + std::to_string(plan.total_shots) + " shots, " +
                  (plan.lab_seconds < 360.0 ? detail::fixed_decimals(plan.lab_seconds, 1) + " s"
                                            : detail::fixed_decimals(plan.lab_seconds / 3600.0, 2) + " h") +
                  " of lab time";
  planned.colour = PaletteColour::vermillion;
  planned.x = {static_cast<double>(plan.total_shots)};
  FigureSeries reached;
  reached.kind = FigureSeries::Kind::points;
  reached.label = "power at the rounded shots " + detail::fixed_decimals(plan.planned_power, 3);
  reached.colour = PaletteColour::vermillion;
  reached.x = {static_cast<double>(plan.total_shots)};
  reached.y = {plan.planned_power};
  f.series = {curve, target, planned, reached};
  if (verification) {
    FigureSeries sim;
    sim.kind = FigureSeries::Kind::error_bars;
    sim.label = "simulated: " + std::to_string(verification->campaigns) + " campaigns, " +
                detail::fixed_decimals(100 * verification->level, 0) + " % Clopper-Pearson";
    sim.colour = PaletteColour::bluish_green;
    // Beside the planned point, so the two markers do not hide each other.
    sim.x = {static_cast<double>(plan.total_shots) * 1.02};
    sim.y = {verification->power};
    sim.y_low = {verification->lo};
    sim.y_high = {verification->hi};
    f.series.push_back(sim);
  }
  leave_room_for_legend(f);
  f.x_range = std::pair{0.0, plan.power_curve.back().total_shots};
  f.y_range = std::pair{0.0, 1.0};
  return f;
}

std::vector<NamedFigure> plan_figures(const CampaignPlan& plan,
                                      const std::optional<PlanVerification>& verification) {
  if (!plan.feasible || plan.power_curve.empty()) return {};
  return {{"power_vs_shots", power_figure(plan, verification)}};
}

}  // namespace macroreal
