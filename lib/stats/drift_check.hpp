// A simple stationarity check of a recorded outcome table: for every sequence, are the
// outcome frequencies of the first and the second half of its time span the same?
// Pearson's chi-square test of homogeneity of the 2 x J table (halves x cells; cells with no
// shot in either half dropped, df = J' - 1), and the sum over sequences (independent
// multinomials, so the statistics and their df add). Agresti, Categorical Data Analysis
// (2013), section 3.2. The halves are split at the midpoint of each sequence's time_s range
// (rows at or before it go to the first half); rows without time_s are left out of the
// check. Expected counts below 5 make the chi-square approximation rough; it is flagged.
// This detects slow drifts of the outcome probabilities; it does not detect fast
// fluctuations or drifts that are the same in both halves.
#pragma once

#include <string>
#include <vector>

#include "protocol/protocol.hpp"
#include "stats/outcome_table_reader.hpp"

namespace macroreal {

struct SequenceDrift {
  std::string name;
  double first_half = 0.0, second_half = 0.0;  // shots in each half
  double split_time_s = 0.0;                   // midpoint of the time_s range
  double chi_square = 0.0;
  int df = 0;
  double p_value = 1.0;
  bool small_expected = false;                 // an expected count below 5
  std::string note;                            // why a sequence is not tested
};

struct DriftCheck {
  bool checked = false;
  std::string not_checked;                     // the reason, when !checked
  std::string method = "chi-square homogeneity, first vs second half of the time span";
  std::vector<SequenceDrift> sequences;        // the tested ones
  double chi_square = 0.0;                     // sum over tested sequences
  int df = 0;
  double p_value = 1.0;
};

// Drift check of a table already read by read_outcome_table / parse_outcome_table (`first`,
// whose time ranges give the split points). `text` is the table's text; rows are re-parsed
// with the same protocol and options but policy skip (bad rows were already handled).
DriftCheck drift_check_text(const std::string& text, const std::string& file_label,
                            const Protocol& protocol, const OutcomeTableOptions& options,
                            const OutcomeTableRead& first);
// The same, streaming the file line by line (memory bounded by the chunk size).
DriftCheck drift_check_file(const std::string& path, const Protocol& protocol,
                            const OutcomeTableOptions& options, const OutcomeTableRead& first);
// The check for data without per-shot rows (counts JSON): not checked, with the reason.
DriftCheck drift_not_checked(const std::string& reason);

}  // namespace macroreal
