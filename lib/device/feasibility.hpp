// Feasibility of a temporal-quantumness test on a device (`macroreal reach`, issue 8): the
// best K (Leggett-Garg, K_3 = C_12 + C_23 - C_13) or |S| (NSIT A -> B) the mapped device can
// reach after optimising the settings its scheme leaves free (rotation angles between the
// interactions, i.e. their start times, and the Ramsey phases), and the lab time to a
// conclusive test.
//
// Routes. (1) The mode's own (thermal, Gaussian) state. The device realises the symmetric
// split, whose correlators on a Gaussian input equal those of a non-invasive classical point
// (DESIGN.md section 2): K <= 1 always, so no conclusive LG test exists on this route; its
// best K is reported next to K_classical. NSIT signalling from it is not reproduced by the
// classical point models (they give S = 0 for the symmetric split) but only shows that the
// measurement is invasive. (2) A Wigner-negative input prepared by post-selecting the dark
// (+) outcome of one extra modular measurement at time 0, with the measurement's interaction or
// (echo) 2x or 3x as many half periods (the best is kept); useful shots cost cycle / p_success.
//
// Time to a conclusive test: the estimate L^ (K or S, stats/linear_functional.hpp) with the
// optimum (Neyman) allocation over the run sequences for lab time T has variance V_1 / T
// (design/shot_allocation.hpp, allocate_for_time); a one-sided test at z = sigma standard
// errors with power 1 - b needs effect >= (sigma + z_{1-b}) sqrt(V_1 / T), so
//   T = (sigma + z_{1-b})^2 V_1 / effect^2,  effect = K - 1 (LG) or |S| (NSIT)
// (normal approximation with the variance at the model's probabilities).
#pragma once

#include <limits>
#include <string>
#include <vector>

#include "design/global_search.hpp"
#include "device/device_mapping.hpp"
#include "device/device_spec.hpp"
#include "phase_space/weyl_engine.hpp"

namespace macroreal {

enum class ReachTest { leggett_garg, nsit };
std::string to_string(ReachTest t);
ReachTest parse_reach_test(const std::string& s);  // "lg" | "nsit"; DomainError otherwise

struct ReachOptions {
  ReachTest test = ReachTest::leggett_garg;
  double sigma = 5.0;          // required significance in standard errors (one-sided)
  double power = 0.8;          // in (0, 1)
  SearchOptions search{4, 700, 1e-6, 1, GlobalStage::direct_l, LocalPolish::bobyqa, 0.5};
  WeylEngineOptions engine{};  // rotation_tolerance 1e-10, 3 initial nodes (constructor)
  bool elasticities = true;
  bool evaluate_thermal_route = true;  // off in maps: it can never be conclusive for LG
  ReachOptions() {
    engine.rotation_tolerance = 1e-10;
    engine.initial_hermite_nodes = 3;  // angle spreads of mechanics are small: 3, 6, 12 ... nodes
  }
  void validate() const;
};

struct RouteResult {
  std::string name;                   // "thermal input" | "post-selected input"
  std::string input;                  // the input state in words
  double value = 0.0;                 // K (LG) or S (NSIT) at the optimum
  double bound = 1.0;                 // 1 (LG) or 0 (NSIT)
  double effect = 0.0;                // K - 1 or |S|
  double value_classical = std::numeric_limits<double>::quiet_NaN();  // symmetric split's model
  bool classical_available = false;
  bool can_be_conclusive = false;     // not reproduced by a classical model of DESIGN.md
  std::string classical_note;
  std::vector<std::string> setting_names;
  std::vector<double> settings;       // optimum (angles in rad)
  std::vector<double> start_times_s;  // interaction start times of the measured steps
  double success_probability = 1.0;   // post-selection (1 on the thermal route)
  int preparation_multiple = 0;       // preparation interaction / measurement's (0: none)
  double seconds_per_shot = 0.0;      // per useful shot, including discarded preparations
  double variance_one_second = 0.0;   // V_1
  double seconds_needed = std::numeric_limits<double>::infinity();
  double shots_needed = std::numeric_limits<double>::infinity();  // useful shots
  long evaluations = 0;
  std::string search_method;
};

struct Elasticity {
  std::string parameter;   // device field (or "readout_errors")
  std::string change;      // "x2" or "/2"
  double seconds_after = std::numeric_limits<double>::infinity();
  double time_ratio = std::numeric_limits<double>::quiet_NaN();   // after / before
  double elasticity = std::numeric_limits<double>::quiet_NaN();   // -log2(time_ratio)
};

struct ReachResult {
  DevicePoint point;
  MappedDevice mapped;
  ReachOptions options;
  double z_total = 0.0;                  // sigma + z_power
  std::vector<RouteResult> routes;
  int best_route = -1;                   // shortest finite time among conclusive-capable routes
  double seconds_needed = std::numeric_limits<double>::infinity();
  bool conclusive = false;               // seconds_needed <= available
  std::string verdict;
  std::vector<Elasticity> elasticities;  // sorted: largest time reduction first
  std::string limiting_factor;
  std::vector<std::string> assumptions;
};

// The full analysis of one device point (validates; DomainError on bad parameters).
ReachResult reach(const DevicePoint& point, const ReachOptions& options = {});

// Only the shortest time to a conclusive test (seconds; infinity when none), for maps.
double time_to_conclusive(const DevicePoint& point, const ReachOptions& options);

// The optimum of the searched settings of each route at one point (by position: the thermal
// route when it is evaluated, then the preparations in order), to start the search at a
// neighbouring point of a map from. An empty entry means "no start".
struct RouteOptima {
  std::vector<std::vector<double>> x;
};
// time_to_conclusive with warm starts: a route that has a start in `optima` is searched by a
// local polish from it with `warm` (meant without a global stage) instead of
// options.search; on return `optima` holds the optima found at this point. The result
// depends on the start, so a map that uses this fixes the order of its points (reach_map.hpp).
double time_to_conclusive_from(const DevicePoint& point, const ReachOptions& options,
                               const SearchOptions& warm, RouteOptima& optima);

}  // namespace macroreal
