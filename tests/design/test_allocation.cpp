// Shot allocation: closed-form optimum allocation of stratified sampling, optimality against
// perturbations, the per-shot variance against the statistics core, and the cycle-time model.
#include <catch2/catch.hpp>

#include <cmath>
#include <random>

#include "core/error.hpp"
#include "design/model_cells.hpp"
#include "design/shot_allocation.hpp"
#include "protocol/protocol_reader.hpp"
#include "stats/linear_functional.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

// A stratified mean ybar_st = sum_h W_h ybar_h has Var = sum_h W_h^2 S_h^2 / n_h (sampling with
// replacement), i.e. v_h = W_h^2 S_h^2 in our notation.
std::vector<SequenceCost> strata(const std::vector<double>& Nh, const std::vector<double>& Sh,
                                 const std::vector<double>& Ch) {
  double N = 0.0;
  for (double x : Nh) N += x;
  std::vector<SequenceCost> c;
  for (std::size_t h = 0; h < Nh.size(); ++h) {
    // Name appended in place: GCC 12 warns falsely (-Wrestrict) on "h" + std::to_string(h).
    std::string name = std::to_string(h);
    name.insert(name.begin(), 'h');
    c.push_back({name, (Nh[h] / N) * (Nh[h] / N) * Sh[h] * Sh[h], Ch[h]});
  }
  return c;
}

}  // namespace

TEST_CASE("allocation for fixed shots is Neyman's n_h = n N_h S_h / sum N_i S_i", "[design]") {
  // Neyman, J. R. Stat. Soc. 97:558 (1934); Cochran, Sampling Techniques, 3rd ed. (1977),
  // sec. 5.5: n_h = n N_h S_h / sum N_i S_i, V_min = (sum W_h S_h)^2 / n (without the finite
  // population correction). Strata N_h = 400, 300, 200, 100, S_h = 10, 15, 20, 30, n = 100 (an
  // invented case); by hand N_h S_h = 4000, 4500, 4000, 3000, sum 15500.
  const std::vector<double> Nh{400, 300, 200, 100}, Sh{10, 15, 20, 30};
  const auto costs = strata(Nh, Sh, {1, 1, 1, 1});
  const ShotAllocation a = allocate_for_shots(costs, 100.0);
  const double expect[] = {100.0 * 4000 / 15500, 100.0 * 4500 / 15500, 100.0 * 4000 / 15500,
                           100.0 * 3000 / 15500};
  for (int h = 0; h < 4; ++h) CHECK_CLOSE(a.shots[h], expect[h], 1e-12, 1e-12);
  const double sum_ws = (4000.0 + 4500.0 + 4000.0 + 3000.0) / 1000.0;  // sum W_h S_h = 15.5
  CHECK_CLOSE(a.variance, sum_ws * sum_ws / 100.0, 0.0, 1e-12);
  CHECK_CLOSE(a.lab_seconds, 100.0, 0.0, 1e-12);
  // Rounded up: 25.81, 29.03, 25.81, 19.35 -> 26, 30, 26, 20.
  CHECK(a.shots_rounded == std::vector<long long>{26, 30, 26, 20});
  CHECK(a.total_shots_rounded == 102);
  CHECK(a.variance_rounded <= a.variance);
}

TEST_CASE("allocation for fixed cost is n_h proportional to N_h S_h / sqrt(c_h)", "[design]") {
  // Cochran (1977) sec. 5.5, optimum allocation with the linear cost C = sum c_h n_h:
  // n_h = C (N_h S_h / sqrt(c_h)) / sum N_i S_i sqrt(c_i); V_min = (sum W_h S_h sqrt(c_h))^2 / C.
  const std::vector<double> Nh{400, 300, 200, 100}, Sh{10, 15, 20, 30}, Ch{1, 2, 3, 4};
  const auto costs = strata(Nh, Sh, Ch);
  const double C = 250.0;
  const ShotAllocation a = allocate_for_time(costs, C);
  double denom = 0.0, ws_sqrtc = 0.0;
  for (int h = 0; h < 4; ++h) {
    denom += Nh[h] * Sh[h] * std::sqrt(Ch[h]);
    ws_sqrtc += Nh[h] / 1000.0 * Sh[h] * std::sqrt(Ch[h]);
  }
  for (int h = 0; h < 4; ++h)
    CHECK_CLOSE(a.shots[h], C * Nh[h] * Sh[h] / std::sqrt(Ch[h]) / denom, 1e-12, 1e-12);
  CHECK_CLOSE(a.lab_seconds, C, 0.0, 1e-12);
  CHECK_CLOSE(a.variance, ws_sqrtc * ws_sqrtc / C, 0.0, 1e-12);
}

TEST_CASE("no perturbation of the allocation reduces the variance at equal cost", "[design]") {
  // Numerical optimality check (common practice, no source): 2000 random perturbations that
  // keep the lab time fixed, of relative size up to 20 %, and 2 x S coordinate moves of 1e-3.
  const Protocol protocol =
      read_protocol(std::string(MACROREAL_SOURCE_DIR) + "/protocols/lg3_thermal.json");
  const ModelCells cells = model_cells(protocol);
  const TestSpec* lg = nullptr;
  for (const auto& t : protocol.tests)
    if (t.kind == TestSpec::Kind::leggett_garg) lg = &t;
  REQUIRE(lg);
  const LinearFunctional k = lg_functional(cells.layout, lg->order);
  const auto seconds = mean_seconds_per_shot(cells.layout, cells.probabilities, CycleTimeModel{},
                                             step_times(protocol, cells.layout));
  const auto costs = sequence_costs(cells.layout, k, cells.probabilities, seconds);
  const ShotAllocation a = allocate_for_time(costs, 3600.0);
  CHECK_CLOSE(a.lab_seconds, 3600.0, 0.0, 1e-12);
  std::mt19937_64 g(7);
  std::uniform_real_distribution<double> u(-0.2, 0.2);  // test-only draws, bytes not compared
  const std::size_t S = costs.size();
  int worse = 0, tried = 0;
  auto rescaled = [&](std::vector<double> n) {  // back onto the time budget
    const double t = allocation_seconds(costs, n);
    for (double& x : n) x *= 3600.0 / t;
    return n;
  };
  for (int trial = 0; trial < 2000; ++trial) {
    std::vector<double> n = a.shots;
    for (std::size_t s = 0; s < S; ++s) n[s] *= 1.0 + u(g);
    n = rescaled(n);
    ++tried;
    if (allocation_variance(costs, n) >= a.variance) ++worse;
  }
  for (std::size_t s = 0; s < S; ++s)
    for (double d : {-1e-3, 1e-3}) {
      std::vector<double> n = a.shots;
      n[s] *= 1.0 + d;
      n = rescaled(n);
      ++tried;
      if (allocation_variance(costs, n) >= a.variance * (1.0 - 1e-14)) ++worse;
    }
  CHECK(worse == tried);
  // The variance formula is the statistics core's: variance_at with counts N_s p_s.
  CellCounts counts = cells.probabilities;
  for (std::size_t s = 0; s < S; ++s)
    for (double& x : counts[s]) x *= a.shots[s];
  CHECK_CLOSE(k.variance_at(cells.probabilities, counts), a.variance, 0.0, 1e-12);
}

TEST_CASE("mean seconds per shot counts the steps a destructive shot runs", "[design]") {
  // A two-step destructive sequence AB+: cells [+,+], [+,-] run 2 steps, [-] ends after 1.
  // E[seconds] = overhead + P(2 steps) (2 per_step + t_B) + P(1 step) (per_step + t_A), by hand.
  CampaignCounts layout;
  SequenceCounts sq;
  sq.name = "AB+";
  sq.steps = {"A", "B"};
  sq.dark_is = {+1, +1};
  sq.cells = cell_layout(2, sq.dark_is, Readout::destructive);
  sq.counts.assign(sq.cells.size(), 0.0);
  layout.sequences.push_back(sq);
  REQUIRE(sq.cells.size() == 3);
  const CellCounts p{{0.3, 0.2, 0.5}};
  CycleTimeModel m;
  m.overhead_s = 0.01;
  m.per_step_s = 0.002;
  const auto t = mean_seconds_per_shot(layout, p, m, {{0.0, 1e-3}});
  CHECK_CLOSE(t[0], 0.01 + 0.5 * (0.004 + 1e-3) + 0.5 * 0.002, 1e-15, 0.0);
  m.include_step_times = false;
  CHECK_CLOSE(mean_seconds_per_shot(layout, p, m, {{0.0, 1e-3}})[0], 0.01 + 0.5 * 0.004 + 0.5 * 0.002,
              1e-15, 0.0);
}

TEST_CASE("allocation rejects budgets and costs outside their domain", "[design]") {
  const std::vector<SequenceCost> ok{{"a", 1.0, 1.0}, {"b", 0.0, 0.0}};
  CHECK(allocate_for_shots(ok, 10.0).shots[1] == 0.0);
  CHECK_THROWS_AS(allocate_for_shots(ok, 0.0), DomainError);
  CHECK_THROWS_AS(allocate_for_time(ok, -1.0), DomainError);
  CHECK_THROWS_AS(allocate_for_time({{"a", 1.0, 0.0}}, 10.0), DomainError);
  CHECK_THROWS_AS(allocate_for_time({{"a", -1.0, 1.0}}, 10.0), DomainError);
  CHECK_THROWS_WITH(allocate_for_shots({{"a", 0.0, 1.0}}, 10.0),
                    Catch::Contains("every sequence has variance 0"));
}
