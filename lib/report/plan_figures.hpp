// The figure of `macroreal plan` as data (figure.hpp): the planned test's power against the
// total number of shots at the plan's allocation shape (CampaignPlan::power_curve, the
// normal approximation of design/power.hpp), the planned total marked as a vertical line, the
// power reached at the rounded shots as a point, the requested power as a horizontal line,
// and, after `plan --verify`, the simulated power with its Clopper-Pearson interval.
#pragma once

#include <optional>
#include <vector>

#include "design/campaign_plan.hpp"
#include "design/plan_verification.hpp"
#include "report/command_figures.hpp"

namespace macroreal {

// Throws DomainError for a plan that is not feasible (it has no power curve).
Figure power_figure(const CampaignPlan& plan,
                    const std::optional<PlanVerification>& verification = std::nullopt);

// {"power_vs_shots"}; empty for an infeasible plan (the report says why).
std::vector<NamedFigure> plan_figures(const CampaignPlan& plan,
                                      const std::optional<PlanVerification>& verification = std::nullopt);

}  // namespace macroreal
