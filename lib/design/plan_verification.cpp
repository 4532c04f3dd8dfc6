#include "design/plan_verification.hpp"

#include <algorithm>
#include <cmath>

#include <omp.h>

#include "core/error.hpp"
#include "stats/leggett_garg_tests.hpp"
#include "stats/nsit_tests.hpp"
#include "stats/proportion_intervals.hpp"
#include "stats/random_variates.hpp"

namespace macroreal {

void VerifyOptions::validate() const {
  if (campaigns < 1 || campaigns > 100000000)
    throw DomainError("verify: campaigns = " + std::to_string(campaigns) + ", but must be in [1, 1e8]");
  if (threads < 0) throw DomainError("verify: threads = " + std::to_string(threads) + ", but must be >= 0");
  if (!(level > 0.0 && level < 1.0))
    throw DomainError("verify: level = " + std::to_string(level) + ", but must be in (0, 1)");
}

PlanVerification verify_plan(const CampaignPlan& plan, const VerifyOptions& options) {
  std::vector<long long> shots;
  for (const auto& s : plan.sequences) shots.push_back(s.shots_rounded);
  return verify_plan_at(plan, shots, options);
}

PlanVerification verify_plan_at(const CampaignPlan& plan, const std::vector<long long>& shots,
                                const VerifyOptions& options) {
  options.validate();
  if (!plan.feasible)
    throw DomainError("verify: the plan is not feasible (" + plan.infeasible_reason + ")");
  const std::size_t S = plan.cells.probabilities.size();
  if (shots.size() != S)
    throw DomainError("verify: " + std::to_string(shots.size()) + " shot numbers for " +
                      std::to_string(S) + " sequences");
  PlanVerification out;
  out.campaigns = options.campaigns;
  out.seed = options.seed;
  out.level = options.level;
  out.shots = shots;
  switch (plan.test) {
    case PlanTest::leggett_garg: out.method = "z-asymptotic on the non-pooled estimate (plug-in SE)"; break;
    case PlanTest::nsit: out.method = "score (two-sided)"; break;
    case PlanTest::equivalence: out.method = "tost (score tests at -+margin)"; break;
  }
  // shots_like: the first cell of every sequence carries its shot number.
  CellCounts shots_like = plan.cells.probabilities;
  std::vector<double> shots_d(S, 0.0);
  for (std::size_t s = 0; s < S; ++s) {
    if (shots[s] < 0) throw DomainError("verify: negative shot number");
    std::fill(shots_like[s].begin(), shots_like[s].end(), 0.0);
    shots_like[s][0] = static_cast<double>(shots[s]);
    shots_d[s] = static_cast<double>(shots[s]);
  }
  out.planned_power = plan.power_at(shots_d);

  const long M = options.campaigns;
  std::vector<signed char> verdict(static_cast<std::size_t>(M), 0);  // 1 reject, 0 not, -1 undefined
  const int threads = options.threads > 0 ? options.threads : omp_get_max_threads();
  const long block = std::max<long>(64, M / 100);
  for (long start = 0; start < M; start += block) {
    const long end = std::min(M, start + block);
#pragma omp parallel num_threads(threads)
    {
      CellCounts counts = plan.cells.probabilities;
#pragma omp for schedule(dynamic, 4)
      for (long m = start; m < end; ++m) {
        RandomEngine g(derive_seed(options.seed, static_cast<std::uint64_t>(m)));
        simulate_counts(g, plan.cells.probabilities, shots_like, counts);
        signed char v = -1;
        try {
          TestResult r;
          if (plan.test == PlanTest::leggett_garg) {
            const double est = plan.functional.estimate(counts);
            const double se = plan.functional.smoothed_se(counts);
            r = lg_z_test(est, se, plan.bound);
          } else if (plan.test == PlanTest::nsit) {
            r = nsit_score_test(counts, plan.functional);
          } else {
            r = nsit_tost(counts, plan.functional, *plan.margin);
          }
          if (std::isfinite(r.p_value)) v = r.p_value < plan.alpha ? 1 : 0;
        } catch (const DomainError&) {
          v = -1;  // e.g. a constrained fit that cannot exist for this draw
        }
        verdict[static_cast<std::size_t>(m)] = v;
      }
    }
    if (options.progress) options.progress(end, M);
  }
  for (signed char v : verdict) {
    if (v == 1) ++out.rejections;
    if (v < 0) ++out.undefined;
  }
  out.power = static_cast<double>(out.rejections) / static_cast<double>(M);
  const ProportionInterval ci =
      clopper_pearson_interval(static_cast<double>(out.rejections), static_cast<double>(M), options.level);
  out.lo = ci.lower;
  out.hi = ci.upper;
  out.planned_within_interval = out.planned_power >= out.lo && out.planned_power <= out.hi;
  return out;
}

}  // namespace macroreal
