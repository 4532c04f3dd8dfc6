// A grid of time-to-conclusive over two device parameters given as ranges in the device file
// (`macroreal reach --map P1,P2`). Points are independent and computed with OpenMP; each point
// depends only on its parameters (fixed seeds), so the result does not depend on the number of
// threads. A shard k of N (1 <= k <= N) computes the points with index % N == k - 1 (index =
// j * nx + i, i over P1, j over P2); merging all shards gives the same grid as one run.
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
  // The per-point search of a map is lighter than a single run's (ReachOptions::search): the
  // map shows where the feasibility boundary lies, and the single run at a chosen point gives
  // the optimised figures.
  SearchOptions search{2, 150, 1e-5, 1, GlobalStage::direct_l, LocalPolish::bobyqa, 0.5};
  int shard = 1, shards = 1;
  int threads = 0;     // 0: OpenMP default
};

// Throws DomainError when a parameter is unknown, not a range in the file, or the two are equal,
// or the shard is not in 1..N.
ReachMap reach_map(const DeviceSpec& spec, const std::string& x_param, const std::string& y_param,
                   const MapOptions& options);

}  // namespace macroreal
