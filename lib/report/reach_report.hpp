// Reports of `macroreal reach`: the readable text, the --json object, and the CSV of a
// time-to-conclusive map (with the feasibility boundary), its shard parts and their merge.
// Deterministic: the same result gives the same bytes; merging the parts of a sharded map
// gives the same bytes as the map computed in one run (numbers cross the part files as
// 17-significant-digit text, which round-trips doubles exactly).
#pragma once

#include <string>
#include <vector>

#include "device/device_spec.hpp"
#include "device/feasibility.hpp"
#include "device/reach_map.hpp"

namespace macroreal {

std::string reach_text(const ReachResult& result, const DeviceSpec& spec);
std::string reach_json_text(const ReachResult& result, const DeviceSpec& spec);

// The final map CSV: '#' comment lines, then P1,P2,hours_to_conclusive,feasible,boundary with
// one row per grid point (i fastest). Throws DomainError if the map is not complete.
std::string map_csv_text(const ReachMap& map, const ReachOptions& options);
// One shard's part file (any subset of points).
std::string map_part_text(const ReachMap& map, const ReachOptions& options, int shard, int shards);
// Merges part files (texts with names for messages) into the final CSV; InputError when a part
// is malformed, the parts disagree on the grid or options, or points are missing or repeated.
std::string merge_map_parts(const std::vector<std::string>& texts,
                            const std::vector<std::string>& names);

}  // namespace macroreal
