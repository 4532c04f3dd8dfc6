// Shared inputs of the analysis-report tests: the demo table of example_runs/ read as analyse
// reads it, and campaigns drawn from a protocol's own model with a fixed seed (multinomial
// per sequence, no detection errors) for the scan figures.
#pragma once

#include <string>

#include "design/model_cells.hpp"
#include "protocol/protocol_reader.hpp"
#include "stats/analysis.hpp"
#include "stats/linear_functional.hpp"
#include "stats/random_variates.hpp"
#include "stats/runs_input.hpp"

namespace macroreal::test_support {

inline std::string source_path(const std::string& rel) { return std::string(MACROREAL_SOURCE_DIR) + "/" + rel; }

inline Protocol analysis_protocol(const std::string& rel) {
  ProtocolReadOptions read;
  read.generate_needed_sequences = true;
  read.require_state = false;
  return read_protocol(source_path(rel), read);
}

// Counts of every sequence of `protocol` drawn from its model with `shots` per sequence.
inline CampaignCounts simulated_counts(const Protocol& protocol, double shots, std::uint64_t seed) {
  const ModelCells model = model_cells(protocol);
  CampaignCounts c = model.layout;
  CellCounts like(c.sequences.size()), out;
  for (std::size_t s = 0; s < c.sequences.size(); ++s) {
    like[s].assign(c.sequences[s].cells.size(), 0.0);
    like[s][0] = shots;
  }
  out = like;
  RandomEngine g(seed);
  simulate_counts(g, model.probabilities, like, out);
  for (std::size_t s = 0; s < c.sequences.size(); ++s) c.sequences[s].counts = out[s];
  c.rows.read = c.rows.used = static_cast<long>(shots * static_cast<double>(c.sequences.size()));
  return c;
}

inline AnalysisOptions quick_options(std::uint64_t seed = 7) {
  AnalysisOptions o;
  o.replicates = 1000;  // seconds, not minutes; the figures only need the replicates kept
  o.seed = seed;
  o.keep_replicates = true;
  return o;
}

}  // namespace macroreal::test_support
