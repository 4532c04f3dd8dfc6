// How many shots each run sequence gets: the allocation that minimises the variance of a
// linear test statistic L^ = sum_s sum_j c_sj n_sj / N_s (stats/linear_functional.hpp) for a
// given lab time or a given total number of shots.
//
// The sequences are independent strata, so Var(L^) = sum_s v_s / N_s with v_s the per-shot
// variance of sequence s's contribution, v_s = sum_j p_sj c_sj^2 - (sum_j p_sj c_sj)^2.
// Under destructive readout a shot that ends early is one of the cells of the sequence, so v_s
// already accounts for it; its cost is the mean duration of a shot given the early ends.
//   fixed lab time T = sum_s N_s c_s:  N_s = T sqrt(v_s / c_s) / sum_r sqrt(v_r c_r),
//                                      Var = (sum_r sqrt(v_r c_r))^2 / T;
//   fixed total shots N = sum_s N_s:   N_s = N sqrt(v_s) / sum_r sqrt(v_r),
//                                      Var = (sum_r sqrt(v_r))^2 / N.
// This is optimum allocation in stratified sampling with a linear cost function (Neyman,
// J. R. Stat. Soc. 97:558 (1934); Cochran, Sampling Techniques, 3rd ed. (1977), sec. 5.5),
// found by Lagrange multipliers or the Cauchy-Schwarz inequality.
//
// Sequences with v_s = 0 (not used by the functional, or deterministic under the model) get 0
// shots. Rounding: shots_rounded = ceil(shots) for every sequence with shots > 0, so the
// rounded plan never has a larger variance than the continuous one; its lab time may exceed
// the continuous one by at most sum_s c_s.
#pragma once

#include <string>
#include <vector>

#include "stats/bootstrap.hpp"
#include "stats/campaign_counts.hpp"
#include "stats/linear_functional.hpp"

namespace macroreal {

struct SequenceCost {
  std::string name;
  double variance_per_shot = 0.0;  // v_s (dimension of L^2)
  double seconds_per_shot = 0.0;   // c_s, mean lab seconds of one shot (> 0 where v_s > 0)
};

struct ShotAllocation {
  std::vector<double> shots;             // continuous optimum N_s
  std::vector<long long> shots_rounded;  // ceil(N_s)
  double variance = 0.0;                 // sum_s v_s / N_s at the continuous optimum
  double lab_seconds = 0.0;              // sum_s N_s c_s at the continuous optimum
  double variance_rounded = 0.0;         // the same at shots_rounded
  double lab_seconds_rounded = 0.0;
  long long total_shots_rounded = 0;
};

// Throws DomainError when the budget is not > 0 and finite, a v_s is negative or non-finite,
// a c_s is not > 0 where v_s > 0, or every v_s is 0 (nothing to estimate).
ShotAllocation allocate_for_time(const std::vector<SequenceCost>& costs, double lab_seconds);
ShotAllocation allocate_for_shots(const std::vector<SequenceCost>& costs, double total_shots);

// Variance and lab time of any allocation (e.g. a perturbed one); a sequence with v_s > 0 and
// N_s <= 0 gives an infinite variance.
double allocation_variance(const std::vector<SequenceCost>& costs, const std::vector<double>& shots);
double allocation_seconds(const std::vector<SequenceCost>& costs, const std::vector<double>& shots);

// One cost per sequence of the functional (same order as its coef), v_s from the
// probabilities; names "sequence <s>" (the overload with a layout uses the layout's names).
// seconds_per_shot has one entry per sequence. Throws DomainError on mismatched shapes.
std::vector<SequenceCost> sequence_costs(const LinearFunctional& functional,
                                         const CellCounts& probabilities,
                                         const std::vector<double>& seconds_per_shot);
std::vector<SequenceCost> sequence_costs(const CampaignCounts& layout,
                                         const LinearFunctional& functional,
                                         const CellCounts& probabilities,
                                         const std::vector<double>& seconds_per_shot);

// The lab time of one shot: a fixed overhead (cooling, state preparation, reset) plus a time per
// step that is run (modular measurement and detection), plus, optionally, the protocol's own
// waiting time up to the last step that is run (time_s of that step). Invented defaults of the
// order of a trapped-ion cycle; set them from the lab's own cycle.
struct CycleTimeModel {
  double overhead_s = 5e-3;
  double per_step_s = 1e-3;
  bool include_step_times = true;
  void validate() const;  // DomainError: negative or non-finite values, or every part zero
};

// Mean seconds per shot of every sequence of `layout` at the cell probabilities: a cell whose
// outcome string has k signs ran k steps (destructive readout ends a shot at its bright
// result), so E[seconds] = overhead + sum_j p_sj (k_j per_step + t_s(k_j)), with t_s(k) the
// time_s of step k of sequence s (step_times[s][k - 1]; pass {} to leave the waits out).
std::vector<double> mean_seconds_per_shot(const CampaignCounts& layout,
                                          const CellCounts& probabilities,
                                          const CycleTimeModel& model,
                                          const std::vector<std::vector<double>>& step_times = {});

// time_s of every step of every sequence of `layout`, from the protocol's measurements
// (DomainError if a step names no measurement).
std::vector<std::vector<double>> step_times(const Protocol& protocol, const CampaignCounts& layout);

}  // namespace macroreal
