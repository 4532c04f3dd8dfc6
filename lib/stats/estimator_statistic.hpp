// Adapter: selected quantities of a CampaignEstimator (estimator.hpp, the pooled MLE) as a
// CountStatistic for the bootstrap (bootstrap.hpp), with the estimator's delta-method
// standard errors for the studentised interval.
#pragma once

#include <memory>
#include <string>
#include <vector>

#include "stats/bootstrap.hpp"
#include "stats/estimator.hpp"
#include "stats/linear_functional.hpp"

namespace macroreal {

// The estimator must outlive the returned statistic. Throws DomainError naming an unknown
// quantity. An empty `names` selects every quantity.
CountStatistic estimator_statistic(const CampaignEstimator& estimator,
                                   const std::vector<std::string>& names = {});

// A LinearFunctional (linear_functional.hpp) as a CountStatistic (its non-pooled estimate and
// plug-in standard error sqrt(Var at p = n / N)). The functional is copied.
CountStatistic linear_statistic(const LinearFunctional& functional);

}  // namespace macroreal
