// The figures of `macroreal optimise` as data (figure.hpp): K (or S) of the optimised test
// against |beta| along the optimised setting (every displacement of the test scaled by one
// common factor, prediction_figures.hpp), with the optimised setting, the curve's own optimum,
// the classical bound and the search limit max |beta| marked; and the Wigner function of the
// input the optimiser chose (the file's state or the prepared cat).
#pragma once

#include <vector>

#include "design/setting_optimiser.hpp"
#include "report/prediction_figures.hpp"

namespace macroreal {

// K_vs_beta_optimised_<test> (S_vs_... for NSIT) and the Wigner figures of the optimised
// protocol's input. `scan.beta_max` 0 means 1.25 x the search limit.
std::vector<NamedFigure> optimisation_figures(const OptimisationResult& result,
                                              const OptimiseOptions& options,
                                              const PredictionFigureOptions& figures = {});

}  // namespace macroreal
