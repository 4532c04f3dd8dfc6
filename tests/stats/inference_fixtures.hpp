// Shared fixtures of the inference tests: campaign layouts built by hand (DESIGN.md section 8
// cell layout) and the SciPy reference file.
#pragma once

#include <fstream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "stats/bootstrap.hpp"
#include "stats/campaign_counts.hpp"

namespace macroreal::testing {

inline SequenceCounts make_sequence(const std::string& name, std::vector<std::string> steps,
                                    std::vector<int> dark_is, std::vector<double> counts,
                                    Readout readout = Readout::destructive) {
  SequenceCounts s;
  s.name = name;
  s.steps = std::move(steps);
  s.dark_is = std::move(dark_is);
  s.cells = cell_layout(s.steps.size(), s.dark_is, readout);
  s.counts = std::move(counts);
  if (s.counts.empty()) s.counts.assign(s.cells.size(), 0.0);
  return s;
}

// Destructive three-time LG campaign: AB+, AB-, BC+, BC-, AC+, AC- (cells "d+", "d-", "bright").
inline CampaignCounts lg3_campaign(const CellCounts& counts) {
  CampaignCounts c;
  c.readout = Readout::destructive;
  const char* names[6] = {"AB+", "AB-", "BC+", "BC-", "AC+", "AC-"};
  const std::vector<std::string> steps[6] = {{"A", "B"}, {"A", "B"}, {"B", "C"},
                                             {"B", "C"}, {"A", "C"}, {"A", "C"}};
  for (int s = 0; s < 6; ++s)
    c.sequences.push_back(make_sequence(names[s], steps[s], {s % 2 == 0 ? +1 : -1, +1},
                                        counts.empty() ? std::vector<double>{} : counts[static_cast<std::size_t>(s)]));
  return c;
}

// Destructive NSIT A->B campaign: B (cells "+", "-"), AB+, AB-.
inline CampaignCounts nsit_campaign(const CellCounts& counts) {
  CampaignCounts c;
  c.readout = Readout::destructive;
  c.sequences.push_back(make_sequence("B", {"B"}, {+1}, counts.empty() ? std::vector<double>{} : counts[0]));
  c.sequences.push_back(make_sequence("AB+", {"A", "B"}, {+1, +1}, counts.empty() ? std::vector<double>{} : counts[1]));
  c.sequences.push_back(make_sequence("AB-", {"A", "B"}, {-1, +1}, counts.empty() ? std::vector<double>{} : counts[2]));
  return c;
}

inline CellCounts counts_of(const CampaignCounts& c) {
  CellCounts out;
  for (const auto& s : c.sequences) out.push_back(s.counts);
  return out;
}

inline nlohmann::json scipy_stats_reference() {
  std::ifstream in(std::string(MACROREAL_SOURCE_DIR) + "/tests/reference/scipy_stats_reference.json");
  if (!in) throw std::runtime_error("tests/reference/scipy_stats_reference.json missing");
  return nlohmann::json::parse(in);
}

inline CellCounts json_counts(const nlohmann::json& j) {
  CellCounts c;
  for (const auto& row : j) {
    std::vector<double> r;
    for (const auto& x : row) r.push_back(x.get<double>());
    c.push_back(r);
  }
  return c;
}

}  // namespace macroreal::testing
