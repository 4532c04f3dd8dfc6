// Portable variates used only by campaign simulation (campaign_simulation.hpp), next to the
// statistics core's uniform01 / binomial (stats/random_variates.hpp), on the same engine:
// only std::mt19937_64's raw output, which the C++ standard fixes, is used, so the same seed
// gives the same counts with any standard library (up to the platform's libm in exp/log).
//   poisson: inversion by sequential search from 0 for mean < 10 (Devroye, Non-Uniform
//            Random Variate Generation (1986), section X.3.3); otherwise PTRS, the
//            transformed rejection with squeeze of Hormann, "The transformed rejection method
//            for generating Poisson random variables", Insurance: Mathematics and Economics
//            12:39 (1993). Both exact.
#pragma once

#include "stats/random_variates.hpp"

namespace macroreal {

// One Poisson(mean) draw; mean >= 0 and finite (throws DomainError otherwise).
long poisson(RandomEngine& g, double mean);

// P(X <= k) for X ~ Poisson(mean), k >= 0 (regularised upper incomplete gamma Q(k+1, mean)).
double poisson_cdf(long k, double mean);

}  // namespace macroreal
