// The allocation file: how many shots each run sequence of a protocol gets. Written by
// `macroreal plan -o FILE`, read by `macroreal simulate --allocation FILE`. A JSON of our own:
//   {"format": "macroreal-allocation/1", "shots": {"AB+": 1200, "AB-": 1100, "B": 800}}
// "shots" maps sequence names of the protocol (listed or generated) to non-negative integer
// shot counts; a sequence not named gets none. Any other top-level field (the plan that made
// it: test, level, power, lab hours) is kept in `extra` and written back unchanged.
// Reader errors are InputError naming the file, the JSON path ("shots.AB+") and the rule.
#pragma once

#include <map>
#include <string>

#include <nlohmann/json.hpp>

#include "protocol/protocol.hpp"

namespace macroreal {

inline constexpr const char* kAllocationFileFormat = "macroreal-allocation/1";

struct AllocationFile {
  std::map<std::string, long long> shots;  // sequence name -> shots (named sequences only)
  nlohmann::ordered_json extra = nlohmann::ordered_json::object();  // other top-level fields
};

AllocationFile parse_allocation_file(const nlohmann::json& doc, const std::string& file_label,
                                     const Protocol& protocol);
AllocationFile read_allocation_file(const std::string& path, const Protocol& protocol);
// JSON text: "format", "shots" (in the protocol's sequence order), then `extra`; two-space
// indent, newline at the end. Throws DomainError for a name that is not a protocol sequence
// or a negative count.
std::string allocation_file_text(const AllocationFile& allocation, const Protocol& protocol);

}  // namespace macroreal
