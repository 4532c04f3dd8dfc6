// Time-to-conclusive grid over two device parameters (reach_map.hpp).
#include "device/reach_map.hpp"

#include <omp.h>

#include "core/error.hpp"

namespace macroreal {

ReachMap reach_map(const DeviceSpec& spec, const std::string& x_param, const std::string& y_param,
                   const MapOptions& options) {
  if (x_param == y_param) throw DomainError("--map needs two different parameters");
  for (const auto& p : {x_param, y_param}) {
    spec.base.get(p);  // DomainError for an unknown name
    if (!spec.ranges.count(p))
      throw DomainError("map parameter \"" + p + "\" is not a range in the device file " +
                        "(give it as {\"from\", \"to\", \"steps\"})");
  }
  if (options.shards < 1 || options.shard < 1 || options.shard > options.shards)
    throw DomainError("shard " + std::to_string(options.shard) + "/" +
                      std::to_string(options.shards) + ", but must be k/N with 1 <= k <= N");
  options.reach.validate();
  ReachMap map;
  map.x_param = x_param;
  map.y_param = y_param;
  map.xs = spec.ranges.at(x_param).values;
  map.ys = spec.ranges.at(y_param).values;
  map.available_s = spec.base.measurement_time_available_h * 3600.0;
  const long nx = static_cast<long>(map.xs.size()), ny = static_cast<long>(map.ys.size());
  // Whole rows per shard (see the header: a row is one warm-start chain).
  std::vector<long> rows;
  for (long j = 0; j < ny; ++j)
    if (j % options.shards == options.shard - 1) rows.push_back(j);
  for (long j : rows)
    for (long i = 0; i < nx; ++i) {
      MapPoint p;
      p.index = j * nx + i;
      p.i = static_cast<int>(i);
      p.j = static_cast<int>(j);
      p.x = map.xs[static_cast<std::size_t>(i)];
      p.y = map.ys[static_cast<std::size_t>(j)];
      map.points.push_back(p);
    }
  ReachOptions ro = options.reach;
  ro.elasticities = false;
  ro.search = options.search;
  ro.evaluate_thermal_route = ro.test == ReachTest::nsit;  // LG: the thermal route never is
  const long n = static_cast<long>(map.points.size());
  const long nrows = static_cast<long>(rows.size());
  const int threads = options.threads > 0 ? options.threads : omp_get_max_threads();
  std::vector<std::string> errors(static_cast<std::size_t>(n));
#pragma omp parallel for schedule(dynamic, 1) num_threads(threads)
  for (long r = 0; r < nrows; ++r) {
    RouteOptima optima;  // the chain's memory: optima of the previous point of this row
    for (long i = 0; i < nx; ++i) {
      const long k = r * nx + i;
      MapPoint& p = map.points[static_cast<std::size_t>(k)];
      DevicePoint q = spec.base;
      q.set(x_param, p.x);
      q.set(y_param, p.y);
      try {
        if (!options.warm_start) {
          p.seconds = time_to_conclusive(q, ro);
        } else if (optima.x.empty()) {
          // A row's first point: the single run's full search (its optima start the chain).
          ReachOptions first = ro;
          first.search = options.reach.search;
          p.seconds = time_to_conclusive_from(q, first, options.warm_search, optima);
        } else {
          p.seconds = time_to_conclusive_from(q, ro, options.warm_search, optima);
        }
      } catch (const std::exception& e) {
        errors[static_cast<std::size_t>(k)] = e.what();
        optima.x.clear();  // the next point starts afresh
      }
    }
  }
  for (long k = 0; k < n; ++k)
    if (!errors[static_cast<std::size_t>(k)].empty())
      throw DomainError("map point " + std::to_string(map.points[static_cast<std::size_t>(k)].index) +
                        ": " + errors[static_cast<std::size_t>(k)]);
  return map;
}

}  // namespace macroreal
