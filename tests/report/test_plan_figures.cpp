// The figure of plan (lib/report/plan_figures.hpp) as data: the power curve rises and, at the
// planned shots, equals design/power.hpp's normal-approximation power recomputed here.
#include <catch2/catch.hpp>

#include <cmath>

#include "design/campaign_plan.hpp"
#include "design/power.hpp"
#include "protocol/protocol_reader.hpp"
#include "report/plan_figures.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

Protocol shipped(const std::string& name) {
  return read_protocol(std::string(MACROREAL_SOURCE_DIR) + "/protocols/" + name);
}

const FigureSeries& series_labelled(const Figure& f, const std::string& start) {
  for (const auto& s : f.series)
    if (s.label.rfind(start, 0) == 0) return s;
  FAIL("no series labelled '" << start << "...' in figure '" << f.title << "'");
  throw;  // unreachable
}

}  // namespace

TEST_CASE("plan figure: the power curve rises and equals the normal-approximation power at the plan",
          "[report][figure]") {
  const CampaignPlan plan = plan_campaign(shipped("lg3_thermal.json"));
  REQUIRE(plan.feasible);
  const Figure f = power_figure(plan);
  const auto& curve = series_labelled(f, "normal approximation");
  REQUIRE(curve.y.size() >= 20);
  for (std::size_t k = 1; k < curve.y.size(); ++k) CHECK(curve.y[k] >= curve.y[k - 1]);
  CHECK(curve.y.front() < plan.target_power);
  CHECK(curve.y.back() > plan.target_power);
  // At the planned total (the 20th point, the plan's allocation shape) the curve is
  // design/power.hpp's one-sided power with se^2 = sum_s v_s / n_s, recomputed here.
  double continuous = 0;
  for (const auto& s : plan.sequences) continuous += s.shots;
  const double scale = static_cast<double>(plan.total_shots) / continuous;
  double var = 0, var_rounded = 0;
  for (const auto& s : plan.sequences)
    if (s.shots > 0) {
      var += s.variance_per_shot / (s.shots * scale);
      var_rounded += s.variance_per_shot / static_cast<double>(s.shots_rounded);
    }
  REQUIRE(curve.x[19] == static_cast<double>(plan.total_shots));
  CHECK_CLOSE(curve.y[19], power_one_sided(plan.model_value - plan.bound, std::sqrt(var), plan.alpha), 1e-12, 0.0);
  const auto& reached = series_labelled(f, "power at the rounded shots");
  CHECK_CLOSE(reached.y[0], power_one_sided(plan.model_value - plan.bound, std::sqrt(var_rounded), plan.alpha),
              1e-12, 0.0);
  CHECK(series_labelled(f, "requested power").y[0] == plan.target_power);
  CHECK(series_labelled(f, "planned:").x[0] == static_cast<double>(plan.total_shots));
}

