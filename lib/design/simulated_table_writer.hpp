// Streaming writer of simulated outcome tables (DESIGN.md section 8 CSV: `# ` comment lines,
// the header `sequence,shot,time_s,r1,..,rN`, one row per shot, empty fields where a shot had
// ended). Rows go through one large buffer written with fwrite when full, so a table of 10^7
// rows never sits in memory; the text of each (sequence, recorded string) row tail is built
// once, numbers are written by hand-rolled integer formatting (no locale, no printf per row).
// time_s is printed from whole nanoseconds, with the trailing zeros of the fraction dropped
// down to three decimals ("0.002", "1.0000375").
#pragma once

#include <cstdint>
#include <cstdio>
#include <string>
#include <string_view>
#include <vector>

#include "design/campaign_simulation.hpp"

namespace macroreal {

// 64-bit FNV-1a of a byte string (Fowler, Noll & Vo; offset basis 14695981039346656037,
// prime 1099511628211): the protocol checksum recorded in a simulated table's header.
std::uint64_t fnv1a64(std::string_view bytes);

struct SimulatedTableContext {
  std::string command;          // the command that made the table (as the user would type it)
  std::string protocol_label;   // protocol file name
  std::uint64_t protocol_checksum = 0;
  std::string detection_source; // where the error rates came from ("protocol detection", ...)
};

// The # comment lines (without "# " and newline): provenance, seed, checksum, assumptions.
std::vector<std::string> simulated_table_comments(const SimulationPlan& plan,
                                                  const SimulatedTableContext& context);

class SimulatedTableWriter : public ShotSink {
 public:
  // Writes to `out` (not owned; `label` names it in errors), or appends to `*text`.
  SimulatedTableWriter(std::FILE* out, std::string label, const SimulationPlan& plan,
                       const std::vector<std::string>& comments,
                       std::size_t buffer_bytes = std::size_t{1} << 22);
  SimulatedTableWriter(std::string* text, const SimulationPlan& plan,
                       const std::vector<std::string>& comments);
  void shot(const SimulatedShot& s) override;
  void finish() override;  // flushes; throws InputError(label, "", ...) if writing failed

 private:
  void start(const SimulationPlan& plan, const std::vector<std::string>& comments);
  void flush();
  void put(std::string_view s);

  std::FILE* out_ = nullptr;
  std::string* text_ = nullptr;
  std::string label_;
  std::vector<char> buffer_;
  std::size_t used_ = 0;
  int max_steps_ = 1;
  std::vector<std::string> prefix_;              // "AB+," per sequence
  std::vector<std::vector<std::string>> tails_;  // ",dark,bright,\n" per sequence, pattern
};

// The whole table as text (tests, small demos).
std::string simulated_table_text(const SimulationPlan& plan,
                                 const std::vector<std::string>& comments);

}  // namespace macroreal
