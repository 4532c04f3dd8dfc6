// Monte Carlo check of a campaign plan (`macroreal plan --verify M`): M campaigns are drawn
// from the model at the planned shots and each is analysed with the statistics core's own test;
// the fraction that rejects at level alpha is the measured power, given with its
// Clopper-Pearson interval (Clopper & Pearson, Biometrika 26:404 (1934); stats/
// proportion_intervals.hpp).
//
// Count-level draws: the shots of one sequence are independent, so a campaign's counts are
// exactly Multinomial(N_s, p_s) per sequence (stats/linear_functional.hpp simulate_counts); no
// per-shot table is needed. Tests:
//   lg:          lg_z_test(K^, smoothed plug-in SE, bound) on the non-pooled K^
//                (stats/leggett_garg_tests.hpp), the statistic analyse's parametric bootstrap
//                studentises, judged by its normal reference distribution;
//   nsit:        nsit_score_test (stats/nsit_tests.hpp), two-sided;
//   equivalence: nsit_tost with the plan's margin.
// Campaign m draws from its own engine seeded derive_seed(seed, m) and campaigns run in
// parallel (OpenMP) in blocks, so the result does not depend on the number of threads. The
// progress callback is called between blocks from the calling thread only.
#pragma once

#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "design/campaign_plan.hpp"

namespace macroreal {

struct VerifyOptions {
  long campaigns = 1000;                 // M >= 1
  std::uint64_t seed = 20261202;
  int threads = 0;                       // 0: OpenMP default
  double level = 0.95;                   // Clopper-Pearson interval level
  std::function<void(long done, long total)> progress;  // optional
  void validate() const;                 // DomainError naming the option
};

struct PlanVerification {
  std::string method;                    // the test that analysed each campaign
  long campaigns = 0;
  long rejections = 0;
  long undefined = 0;                    // campaigns whose statistic was undefined (counted as
                                         // not rejecting)
  double power = 0.0;                    // rejections / campaigns
  double lo = 0.0, hi = 1.0, level = 0.95;   // Clopper-Pearson interval of the power
  double planned_power = 0.0;            // the normal approximation at the same shots
  bool planned_within_interval = false;
  std::uint64_t seed = 0;
  std::vector<long long> shots;          // the shots per sequence that were simulated
};

// At the plan's rounded shots; throws DomainError for an infeasible plan.
PlanVerification verify_plan(const CampaignPlan& plan, const VerifyOptions& options = {});
// At any shots per sequence (layout order), e.g. for a power curve check or a benchmark.
PlanVerification verify_plan_at(const CampaignPlan& plan, const std::vector<long long>& shots,
                                const VerifyOptions& options = {});

}  // namespace macroreal
