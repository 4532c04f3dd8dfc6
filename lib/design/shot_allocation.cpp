#include "design/shot_allocation.hpp"

#include <cmath>
#include <limits>
#include <string>

#include "core/error.hpp"

namespace macroreal {

namespace {

void check_costs(const std::vector<SequenceCost>& costs) {
  bool any = false;
  for (const auto& c : costs) {
    if (!std::isfinite(c.variance_per_shot) || c.variance_per_shot < 0.0)
      throw DomainError("shot allocation: variance per shot of '" + c.name + "' = " +
                        std::to_string(c.variance_per_shot) + ", but must be finite and >= 0");
    if (c.variance_per_shot > 0.0) {
      any = true;
      if (!std::isfinite(c.seconds_per_shot) || !(c.seconds_per_shot > 0.0))
        throw DomainError("shot allocation: seconds per shot of '" + c.name + "' = " +
                          std::to_string(c.seconds_per_shot) + ", but must be finite and > 0");
    }
  }
  if (!any)
    throw DomainError("shot allocation: every sequence has variance 0 per shot (the statistic "
                      "does not depend on any sequence's outcomes)");
}

void check_budget(double b, const char* what) {
  if (!std::isfinite(b) || !(b > 0.0))
    throw DomainError(std::string("shot allocation: ") + what + " = " + std::to_string(b) +
                      ", but must be finite and > 0");
}

void finish(const std::vector<SequenceCost>& costs, ShotAllocation& a) {
  a.variance = allocation_variance(costs, a.shots);
  a.lab_seconds = allocation_seconds(costs, a.shots);
  a.shots_rounded.assign(a.shots.size(), 0);
  std::vector<double> rounded(a.shots.size(), 0.0);
  a.total_shots_rounded = 0;
  for (std::size_t s = 0; s < a.shots.size(); ++s) {
    if (a.shots[s] > 0.0) {
      // The relative 1e-12 keeps an exactly integral optimum from rounding up by round-off.
      a.shots_rounded[s] = static_cast<long long>(std::ceil(a.shots[s] * (1.0 - 1e-12)));
      if (a.shots_rounded[s] < 1) a.shots_rounded[s] = 1;
    }
    rounded[s] = static_cast<double>(a.shots_rounded[s]);
    a.total_shots_rounded += a.shots_rounded[s];
  }
  a.variance_rounded = allocation_variance(costs, rounded);
  a.lab_seconds_rounded = allocation_seconds(costs, rounded);
}

}  // namespace

double allocation_variance(const std::vector<SequenceCost>& costs, const std::vector<double>& shots) {
  MACROREAL_CHECK(costs.size() == shots.size());
  double v = 0.0;
  for (std::size_t s = 0; s < costs.size(); ++s) {
    if (!(costs[s].variance_per_shot > 0.0)) continue;
    if (!(shots[s] > 0.0)) return std::numeric_limits<double>::infinity();
    v += costs[s].variance_per_shot / shots[s];
  }
  return v;
}

double allocation_seconds(const std::vector<SequenceCost>& costs, const std::vector<double>& shots) {
  MACROREAL_CHECK(costs.size() == shots.size());
  double t = 0.0;
  for (std::size_t s = 0; s < costs.size(); ++s)
    if (shots[s] > 0.0) t += shots[s] * costs[s].seconds_per_shot;
  return t;
}

ShotAllocation allocate_for_time(const std::vector<SequenceCost>& costs, double lab_seconds) {
  check_costs(costs);
  check_budget(lab_seconds, "lab time in seconds");
  double sum = 0.0;  // sum_r sqrt(v_r c_r)
  for (const auto& c : costs)
    if (c.variance_per_shot > 0.0) sum += std::sqrt(c.variance_per_shot * c.seconds_per_shot);
  ShotAllocation a;
  a.shots.assign(costs.size(), 0.0);
  for (std::size_t s = 0; s < costs.size(); ++s)
    if (costs[s].variance_per_shot > 0.0)
      a.shots[s] = lab_seconds * std::sqrt(costs[s].variance_per_shot / costs[s].seconds_per_shot) / sum;
  finish(costs, a);
  return a;
}

ShotAllocation allocate_for_shots(const std::vector<SequenceCost>& costs, double total_shots) {
  check_costs(costs);
  check_budget(total_shots, "total shots");
  double sum = 0.0;  // sum_r sqrt(v_r)
  for (const auto& c : costs) sum += std::sqrt(c.variance_per_shot);
  ShotAllocation a;
  a.shots.assign(costs.size(), 0.0);
  for (std::size_t s = 0; s < costs.size(); ++s)
    if (costs[s].variance_per_shot > 0.0)
      a.shots[s] = total_shots * std::sqrt(costs[s].variance_per_shot) / sum;
  finish(costs, a);
  return a;
}

std::vector<SequenceCost> sequence_costs(const LinearFunctional& functional,
                                         const CellCounts& probabilities,
                                         const std::vector<double>& seconds_per_shot) {
  const std::size_t S = functional.coef.size();
  if (probabilities.size() != S || seconds_per_shot.size() != S)
    throw DomainError("sequence costs: the functional has " + std::to_string(S) +
                      " sequences, the probabilities " + std::to_string(probabilities.size()) +
                      " and the seconds per shot " + std::to_string(seconds_per_shot.size()));
  std::vector<SequenceCost> out(S);
  for (std::size_t s = 0; s < S; ++s) {
    const auto& c = functional.coef[s];
    const auto& p = probabilities[s];
    if (p.size() != c.size())
      throw DomainError("sequence costs: sequence " + std::to_string(s) + " has " +
                        std::to_string(c.size()) + " cells in the functional but " +
                        std::to_string(p.size()) + " probabilities");
    double m1 = 0.0, m2 = 0.0;
    for (std::size_t j = 0; j < c.size(); ++j) {
      m1 += p[j] * c[j];
      m2 += p[j] * c[j] * c[j];
    }
    out[s].name = "sequence " + std::to_string(s);
    // Same formula as LinearFunctional::variance_at, per shot; clamp round-off below 0.
    out[s].variance_per_shot = functional.uses(s) ? std::max(0.0, m2 - m1 * m1) : 0.0;
    out[s].seconds_per_shot = seconds_per_shot[s];
  }
  return out;
}

std::vector<SequenceCost> sequence_costs(const CampaignCounts& layout,
                                         const LinearFunctional& functional,
                                         const CellCounts& probabilities,
                                         const std::vector<double>& seconds_per_shot) {
  if (layout.sequences.size() != functional.coef.size())
    throw DomainError("sequence costs: the layout has " + std::to_string(layout.sequences.size()) +
                      " sequences but the functional " + std::to_string(functional.coef.size()));
  auto out = sequence_costs(functional, probabilities, seconds_per_shot);
  for (std::size_t s = 0; s < out.size(); ++s) out[s].name = layout.sequences[s].name;
  return out;
}

void CycleTimeModel::validate() const {
  auto check = [](double x, const char* name) {
    if (!std::isfinite(x) || x < 0.0)
      throw DomainError(std::string("cycle time: ") + name + " = " + std::to_string(x) +
                        ", but must be finite and >= 0");
  };
  check(overhead_s, "overhead_s");
  check(per_step_s, "per_step_s");
  if (overhead_s == 0.0 && per_step_s == 0.0 && !include_step_times)
    throw DomainError("cycle time: overhead_s and per_step_s are both 0 and step times are "
                      "left out, so a shot would cost no time");
}

std::vector<double> mean_seconds_per_shot(const CampaignCounts& layout,
                                          const CellCounts& probabilities,
                                          const CycleTimeModel& model,
                                          const std::vector<std::vector<double>>& times) {
  model.validate();
  if (probabilities.size() != layout.sequences.size())
    throw DomainError("mean seconds per shot: " + std::to_string(layout.sequences.size()) +
                      " sequences but " + std::to_string(probabilities.size()) +
                      " probability vectors");
  const bool waits = model.include_step_times && !times.empty();
  if (waits && times.size() != layout.sequences.size())
    throw DomainError("mean seconds per shot: step times for " + std::to_string(times.size()) +
                      " sequences, but the layout has " + std::to_string(layout.sequences.size()));
  std::vector<double> out(layout.sequences.size(), 0.0);
  for (std::size_t s = 0; s < layout.sequences.size(); ++s) {
    const auto& seq = layout.sequences[s];
    const auto& p = probabilities[s];
    if (p.size() != seq.cells.size())
      throw DomainError("mean seconds per shot: sequence '" + seq.name + "' has " +
                        std::to_string(seq.cells.size()) + " cells but " +
                        std::to_string(p.size()) + " probabilities");
    double t = model.overhead_s;
    for (std::size_t j = 0; j < p.size(); ++j) {
      const std::size_t k = seq.cells[j].size();
      double shot = static_cast<double>(k) * model.per_step_s;
      if (waits) {
        MACROREAL_CHECK(times[s].size() >= k && k >= 1);
        shot += times[s][k - 1];
      }
      t += p[j] * shot;
    }
    out[s] = t;
  }
  return out;
}

std::vector<std::vector<double>> step_times(const Protocol& protocol, const CampaignCounts& layout) {
  std::vector<std::vector<double>> out;
  for (const auto& seq : layout.sequences) {
    std::vector<double> t;
    for (const auto& step : seq.steps) t.push_back(protocol.measurement(step).time_s);
    out.push_back(std::move(t));
  }
  return out;
}

}  // namespace macroreal
