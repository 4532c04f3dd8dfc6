// The shot allocation of a campaign: how many shots each sequence gets. Written by
// `macroreal plan`, read by `macroreal simulate --allocation FILE`. A JSON of our own:
//   {"format": "macroreal-allocation/1", "shots": {"AB+": 1200, "AB-": 1100, "B": 800}}
// "shots" maps sequence names of the protocol (listed or generated) to non-negative integer
// shot counts; a sequence not named gets none. Other top-level fields (a plan's totals,
// its test, its hours) are allowed and ignored here. Every error is an InputError naming
// the file and the JSON path ("shots.AB+") and the rule.
#pragma once

#include <map>
#include <string>

#include <nlohmann/json.hpp>

#include "protocol/protocol.hpp"

namespace macroreal {

inline constexpr const char* kAllocationFormat = "macroreal-allocation/1";

struct ShotAllocation {
  std::map<std::string, long> shots;  // sequence name -> shots (only the named ones)
};

ShotAllocation read_shot_allocation(const std::string& path, const Protocol& protocol);
ShotAllocation parse_shot_allocation(const nlohmann::json& doc, const std::string& file_label,
                                     const Protocol& protocol);
// The JSON text of an allocation (two-space indent, sequences in protocol order).
std::string shot_allocation_json_text(const ShotAllocation& allocation, const Protocol& protocol);

}  // namespace macroreal
