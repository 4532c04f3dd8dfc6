#include "design/model_cells.hpp"

#include <cmath>
#include <string>

#include "core/error.hpp"

namespace macroreal {

ModelCells model_cells(const Protocol& protocol, const PredictOptions& options) {
  ModelCells out;
  out.layout = empty_counts(protocol);
  out.prediction = predict(protocol, options);
  out.probabilities.resize(out.layout.sequences.size());
  for (std::size_t s = 0; s < out.layout.sequences.size(); ++s) {
    const SequenceCounts& seq = out.layout.sequences[s];
    const SequencePrediction* predicted = nullptr;
    for (const auto& sp : out.prediction.sequences)
      if (sp.name == seq.name) predicted = &sp;
    if (!predicted)
      throw DomainError("model_cells: the prediction has no sequence '" + seq.name + "'");
    auto& p = out.probabilities[s];
    p.assign(seq.cells.size(), 0.0);
    double total = 0.0;
    for (const auto& o : predicted->outcomes) {
      const int j = seq.cell_index(o.outcomes);
      if (j < 0)
        throw DomainError("model_cells: outcome " + to_string(o.outcomes) +
                          " of sequence '" + seq.name + "' is not a cell of its layout");
      p[static_cast<std::size_t>(j)] += o.p;
      total += o.p;
    }
    if (!(std::abs(total - 1.0) <= options.sum_tolerance))
      throw DomainError("model_cells: the probabilities of sequence '" + seq.name +
                        "' sum to " + std::to_string(total) + ", not 1");
    // Round-off can leave -1e-17 in a cell; a multinomial draw needs p >= 0.
    for (double& x : p) x = std::max(x, 0.0);
  }
  return out;
}

}  // namespace macroreal
