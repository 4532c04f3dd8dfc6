// The protocol's model expressed in the cell layout of the statistics core
// (stats/campaign_counts.hpp): for every sequence of a counts layout, the predicted
// probability of each cell. This is the bridge the campaign tools (simulation, allocation,
// power, the optimiser's significance objective) use to treat a model as "the truth".
// Probabilities are those of the ideal +/-1 outcomes (DESIGN.md section 2), before any
// detection errors.
#pragma once

#include "protocol/prediction.hpp"
#include "stats/bootstrap.hpp"
#include "stats/campaign_counts.hpp"

namespace macroreal {

struct ModelCells {
  CampaignCounts layout;         // the cells (counts all zero)
  CellCounts probabilities;      // same shape as layout: p_sj
  PredictionResult prediction;   // the prediction they come from (engine, cautions)
};

// Layout of every sequence the protocol lists or its tests need (empty_counts), with the
// model's cell probabilities. Throws DomainError when the protocol has no state, or when a
// sequence's probabilities do not sum to 1 within options.sum_tolerance (a numerical failure
// must not be silently renormalised into a simulation).
ModelCells model_cells(const Protocol& protocol, const PredictOptions& options = {});

}  // namespace macroreal
