// The recorded runs given to `macroreal analyse`: a per-shot outcome table (CSV) or a counts
// JSON ("macroreal-counts/1"), DESIGN.md section 8, told apart by the caller's choice, the
// file extension (".json") or the content (a JSON object starts with '{'). Reads either into
// OutcomeTableRead and, for a table, also runs the drift check (drift_check.hpp).
#pragma once

#include <string>

#include "protocol/protocol.hpp"
#include "stats/drift_check.hpp"
#include "stats/outcome_table_reader.hpp"

namespace macroreal {

enum class RunsFormat { table, counts };
std::string to_string(RunsFormat f);  // "outcome table", "counts JSON"

// `head`: the first bytes of the content (any length, may be empty).
RunsFormat detect_runs_format(const std::string& name, const std::string& head, bool force_counts);

struct RunsInput {
  RunsFormat format = RunsFormat::table;
  OutcomeTableRead read;
  DriftCheck drift;
};

// From a file path. Throws InputError (file, line/column or JSON path, rule).
RunsInput read_runs_file(const std::string& path, const Protocol& protocol,
                         const OutcomeTableOptions& options, bool force_counts = false);
// From text in memory (standard input); `label` names it in messages.
RunsInput parse_runs_text(const std::string& text, const std::string& label, const Protocol& protocol,
                          const OutcomeTableOptions& options, bool force_counts = false);

}  // namespace macroreal
