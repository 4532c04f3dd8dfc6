// Reading recorded outcomes into CampaignCounts (DESIGN.md section 8): the per-shot CSV
// outcome table, streamed, and the aggregated counts JSON ("macroreal-counts/1").
//
// CSV: header required; lines starting with '#' are comments; columns `sequence`, optional
// `shot` (non-negative integer) and `time_s` (a number), `r1`..`rN` (detector result of step
// k: "dark" / "bright", or a non-negative integer photon count read dark when count <=
// threshold); other columns are kept in the header check and ignored. A row with fewer
// fields than the header has the missing trailing fields empty. Fields are not quoted (no
// field of this format contains a comma); an empty `shot` or `time_s` means "not given".
// Each row is validated against its sequence (unknown sequence, a result after the shot had
// ended under destructive readout, a missing result where the shot had to go on, a malformed
// result / shot / time_s, a duplicated shot index within a sequence, too many fields). With
// BadRowPolicy::error the first bad row throws InputError(file, "line L, column C (field)",
// rule); with BadRowPolicy::skip the row is counted in RowSummary::reasons under the reason
// names below and left out; nothing is dropped silently.
//
// Memory does not grow with the number of rows: besides the counts, the reader keeps one
// bit per shot index per sequence for the duplicate check (max shot index / 8 bytes per
// sequence: 1.25 MB for indices up to 10^7), the current 1 MiB block and one carried-over
// partial line. Shot indices must be below 2^32 (else "malformed shot"). A regular file is
// read by OutcomeTableOptions::threads threads in chunks of block_bytes: at most 8 chunk
// tallies (counts, time ranges and the shot indices of up to a block's rows, 8 bytes each)
// and one block buffer per thread are held at a time.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "protocol/protocol.hpp"
#include "stats/campaign_counts.hpp"

namespace macroreal {

enum class BadRowPolicy { error, skip };
std::string to_string(BadRowPolicy p);
BadRowPolicy parse_bad_row_policy(const std::string& s);  // "error" | "skip"; DomainError

// Reason names used in RowSummary::reasons (stable: reports print them).
namespace row_reason {
inline constexpr const char* kUnknownSequence = "unknown sequence";
inline constexpr const char* kResultAfterEnd = "result after shot ended";
inline constexpr const char* kMissingResult = "missing result";
inline constexpr const char* kMalformedResult = "malformed result";
inline constexpr const char* kMalformedShot = "malformed shot";
inline constexpr const char* kDuplicatedShot = "duplicated shot";
inline constexpr const char* kMalformedTime = "malformed time_s";
inline constexpr const char* kTooManyFields = "too many fields";
inline constexpr const char* kMalformedCount = "malformed count";  // counts JSON values
inline constexpr const char* kResultBeyondSteps = "result beyond the last step";
}  // namespace row_reason

struct OutcomeTableOptions {
  BadRowPolicy bad_rows = BadRowPolicy::error;
  // Photon-count threshold (count <= threshold reads dark); overrides the protocol's
  // detection.threshold. Counts in a table with no threshold at all are an InputError.
  std::optional<double> threshold;
  std::size_t block_bytes = std::size_t{1} << 20;  // read block (and chunk) size
  // Threads for a regular file of more than two blocks: it is cut into chunks at line
  // starts, tallied in parallel and merged in file order (results, messages and skip
  // counts do not depend on the number of threads). 1: one thread reads the stream.
  int threads = 2;
};

// First and last time_s seen per sequence (drift checks); `any` false if none was given.
// The values are the correctly rounded doubles of the decimal text; which row is first or
// last is decided on an approximation within 2^-52 relative, so two times closer than
// that may be taken in either order.
struct ShotTimeRange {
  bool any = false;
  double first = 0.0;  // smallest time_s
  double last = 0.0;   // largest time_s
};

struct OutcomeTableRead {
  CampaignCounts counts;                   // layout of empty_counts(protocol), rows filled
  std::vector<ShotTimeRange> time_ranges;  // parallel to counts.sequences
  long photon_count_results = 0;           // photon-count results (thresholded) of used rows
};

// Streams the CSV file. Throws InputError for an unreadable file, a bad header, and (policy
// error) the first bad row.
OutcomeTableRead read_outcome_table(const std::string& path, const Protocol& protocol,
                                    const OutcomeTableOptions& options = {});
// The same parser over text in memory (tests, stdin); `file_label` names it in messages.
OutcomeTableRead parse_outcome_table(const std::string& text, const std::string& file_label,
                                     const Protocol& protocol,
                                     const OutcomeTableOptions& options = {});

// Counts JSON: {"format": "macroreal-counts/1", "counts": {"<sequence>": {"dark,bright": n}}}
// where each key lists the detector results ("dark"/"bright") of the steps reached. The same
// validation as the CSV (unknown sequence, result after the end, missing result, malformed
// result, a count that is not a non-negative integer); `where` is the JSON path. With policy
// skip, RowSummary counts shots (a rejected key rejects its count of shots).
OutcomeTableRead read_counts_json(const std::string& path, const Protocol& protocol,
                                  const OutcomeTableOptions& options = {});
OutcomeTableRead parse_counts_json(const nlohmann::json& doc, const std::string& file_label,
                                   const Protocol& protocol,
                                   const OutcomeTableOptions& options = {});

}  // namespace macroreal
