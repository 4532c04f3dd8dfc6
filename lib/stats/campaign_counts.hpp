// Aggregated outcome counts of a campaign: for each run sequence, how many shots ended with
// each possible outcome string. This is all the statistics core needs from the data: the
// sequences are independent multinomials (DESIGN.md section 8), so tables of any size reduce
// to these counts while streaming.
//
// Cells of a sequence with n steps:
//   destructive readout: the full strings whose first n-1 signs are the dark ones
//     (2 cells), plus for each step k < n the string that ends at k with the bright sign
//     (n-1 cells): n+1 cells in all;
//   non-destructive readout: all 2^n full strings.
#pragma once

#include <map>
#include <string>
#include <vector>

#include "phase_space/sequence.hpp"
#include "protocol/protocol.hpp"

namespace macroreal {

struct SequenceCounts {
  std::string name;
  std::vector<std::string> steps;
  std::vector<int> dark_is;
  std::vector<OutcomeString> cells;  // the possible outcome strings (layout above)
  std::vector<double> counts;        // one per cell (double so bootstrap weights fit)

  double total() const;
  int cell_index(const OutcomeString& o) const;  // -1 if not a cell of this sequence
};

// Per-row bookkeeping for analyses: nothing is dropped silently.
struct RowSummary {
  long read = 0;
  long used = 0;
  long rejected = 0;
  std::map<std::string, long> reasons;  // reason -> rows
};

struct CampaignCounts {
  Readout readout = Readout::destructive;
  std::vector<SequenceCounts> sequences;
  RowSummary rows;

  const SequenceCounts* find(const std::string& name) const;
};

// Empty counts with the cell layout of every sequence the protocol lists (and generated ones).
CampaignCounts empty_counts(const Protocol& protocol);
std::vector<OutcomeString> cell_layout(std::size_t steps, const std::vector<int>& dark_is,
                                       Readout readout);

}  // namespace macroreal
