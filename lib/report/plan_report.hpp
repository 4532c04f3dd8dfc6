// Writers for the result of `macroreal plan` (design/campaign_plan.hpp, and the Monte Carlo
// check of design/plan_verification.hpp when it was run):
//   - a fixed-width text report: the test and its method, the model's value, the shots per
//     sequence, totals and lab hours, the planned power, the measured power with its
//     Clopper-Pearson interval, and the assumptions the plan rests on (DESIGN.md section 7);
//   - one JSON object (--json);
//   - the power curve as CSV: total_shots,lab_hours,power (one row per point).
// The allocation file itself is design/allocation_file.hpp. Deterministic output.
#pragma once

#include <optional>
#include <string>

#include <nlohmann/json.hpp>

#include "design/allocation_file.hpp"
#include "design/campaign_plan.hpp"
#include "design/plan_verification.hpp"

namespace macroreal {

nlohmann::ordered_json plan_json(const CampaignPlan& plan,
                                 const std::optional<PlanVerification>& verification);
std::string plan_json_text(const CampaignPlan& plan,
                           const std::optional<PlanVerification>& verification);
std::string plan_text(const CampaignPlan& plan, const std::optional<PlanVerification>& verification);
std::string power_curve_csv(const CampaignPlan& plan);
// The allocation file of a plan: the rounded shots of every sequence with shots, and the
// plan's test, level, power and lab hours as extra fields.
AllocationFile plan_allocation(const CampaignPlan& plan);

}  // namespace macroreal
