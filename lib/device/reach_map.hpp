// A grid of time-to-conclusive over two device parameters given as ranges in the device file
// (`macroreal reach --map P1,P2`). Index = j * nx + i (i over P1, j over P2).
//
// Speed (issue 8: 50 x 50 on 2 threads <= 60 s): each row j (fixed P2) is a chain along P1.
// Its first point gets the single run's full search (MapOptions::reach.search: DIRECT-L and
// four polishes, 700 evaluations per route); every later point starts a local polish
// (MapOptions::warm_search, no global stage) from the optima of its left neighbour, whose
// settings (rotation angles, preparation phase) move little from one grid point to the next.
// A chain can also carry a better optimum along than an independent global search finds at a
// point: the landscape over the four settings has several basins. Rows are computed in parallel with OpenMP. A point
// therefore depends on its row's earlier points, never on other rows, the thread count or the
// shard: a shard k of N (1 <= k <= N) computes the whole rows with j % N == k - 1, and merging
// all shards gives the same grid as one run (so N > the number of rows leaves shards empty).
// tests/device/test_reach_map_speed.cpp checks the warm-started map against the full
// single-run search point by point. warm_start = false gives independent points (each with
// MapOptions::search).
#pragma once

#include <string>
#include <vector>

#include "device/device_spec.hpp"
#include "device/feasibility.hpp"

namespace macroreal {

struct MapPoint {
  long index = 0;
  int i = 0, j = 0;
  double x = 0.0, y = 0.0;
  double seconds = 0.0;  // time to a conclusive test (infinity: none)
};

struct ReachMap {
  std::string x_param, y_param;
  std::vector<double> xs, ys;
  double available_s = 0.0;     // of the base point (a scanned availability is per point)
  std::vector<MapPoint> points; // computed points, ordered by index
};

struct MapOptions {
  ReachOptions reach;  // elasticities are switched off for maps
  // The per-point search when warm_start is false (lighter than a single run's
  // ReachOptions::search; the previous method, kept as the benchmark's reference).
  SearchOptions search{2, 150, 1e-5, 1, GlobalStage::direct_l, LocalPolish::bobyqa, 0.5};
  // From a neighbour's optimum: one BOBYQA polish, then the final polish from the best point.
  SearchOptions warm_search{1, 60, 1e-5, 1, GlobalStage::none, LocalPolish::bobyqa, 0.0};
  bool warm_start = true;
  int shard = 1, shards = 1;
  int threads = 0;     // 0: OpenMP default
};

// Throws DomainError when a parameter is unknown, not a range in the file, or the two are equal,
// or the shard is not in 1..N.
ReachMap reach_map(const DeviceSpec& spec, const std::string& x_param, const std::string& y_param,
                   const MapOptions& options);

}  // namespace macroreal
