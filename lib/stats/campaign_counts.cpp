// Cell layouts and empty counts (see campaign_counts.hpp). The order of the cells is part of
// the interface between the readers and the estimator:
//   destructive, n steps: [dark_1..dark_{n-1}, +], [dark_1..dark_{n-1}, -], then for
//     k = 1..n-1 the string dark_1..dark_{k-1}, bright_k (bright_k = -dark_k);
//   non-destructive: all 2^n strings in lexicographic order with + before - ("++", "+-",
//     "-+", "--" for n = 2).
#include "stats/campaign_counts.hpp"

#include <numeric>

#include "core/error.hpp"

namespace macroreal {

double SequenceCounts::total() const { return std::accumulate(counts.begin(), counts.end(), 0.0); }

int SequenceCounts::cell_index(const OutcomeString& o) const {
  for (std::size_t j = 0; j < cells.size(); ++j)
    if (cells[j] == o) return static_cast<int>(j);
  return -1;
}

const SequenceCounts* CampaignCounts::find(const std::string& name) const {
  for (const auto& s : sequences)
    if (s.name == name) return &s;
  return nullptr;
}

std::vector<OutcomeString> cell_layout(std::size_t steps, const std::vector<int>& dark_is,
                                       Readout readout) {
  if (steps == 0) throw DomainError("cell layout: a sequence needs at least one step");
  if (steps > 20) throw DomainError("cell layout: " + std::to_string(steps) +
                                    " steps, but at most 20 are supported");
  std::vector<OutcomeString> cells;
  if (readout == Readout::nondestructive) {
    const std::size_t m = std::size_t{1} << steps;
    for (std::size_t bits = 0; bits < m; ++bits) {
      OutcomeString o(steps);
      for (std::size_t k = 0; k < steps; ++k)
        o[k] = (bits >> (steps - 1 - k)) & 1u ? -1 : +1;
      cells.push_back(std::move(o));
    }
    return cells;
  }
  if (dark_is.size() < steps - 1)
    throw DomainError("cell layout: dark_is has " + std::to_string(dark_is.size()) +
                      " entries, but a destructive sequence of " + std::to_string(steps) +
                      " steps needs at least " + std::to_string(steps - 1));
  for (std::size_t k = 0; k + 1 < steps; ++k)
    if (dark_is[k] != 1 && dark_is[k] != -1)
      throw DomainError("cell layout: dark_is[" + std::to_string(k) + "] = " +
                        std::to_string(dark_is[k]) + ", but must be +1 or -1");
  OutcomeString prefix(dark_is.begin(), dark_is.begin() + static_cast<long>(steps - 1));
  for (int last : {+1, -1}) {
    OutcomeString o = prefix;
    o.push_back(last);
    cells.push_back(std::move(o));
  }
  for (std::size_t k = 0; k + 1 < steps; ++k) {
    OutcomeString o(prefix.begin(), prefix.begin() + static_cast<long>(k));
    o.push_back(-dark_is[k]);
    cells.push_back(std::move(o));
  }
  return cells;
}

CampaignCounts empty_counts(const Protocol& protocol) {
  CampaignCounts c;
  c.readout = protocol.readout;
  for (const auto& s : protocol.sequences) {
    SequenceCounts sc;
    sc.name = s.name;
    sc.steps = s.steps;
    sc.dark_is = s.dark_is;
    sc.cells = cell_layout(s.steps.size(), s.dark_is, protocol.readout);
    sc.counts.assign(sc.cells.size(), 0.0);
    c.sequences.push_back(std::move(sc));
  }
  return c;
}

}  // namespace macroreal
