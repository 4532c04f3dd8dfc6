// Final-step readout correction (lib/detection/readout_correction.hpp): unbiased within Monte
// Carlo error on simulated shots with error rates 1e-3 (single-shot fluorescence error of
// that order for trapped ions: common practice, no source) and 1e-2, while the raw fraction
// is biased by e2 - (e1 + e2) p.
#include <catch2/catch.hpp>

#include <cmath>

#include "core/error.hpp"
#include "detection/readout_correction.hpp"
#include "stats/random_variates.hpp"
#include "support/compare.hpp"

using namespace macroreal;

TEST_CASE("readout correction: unbiased on simulated final-step outcomes", "[detection]") {
  const double p = 0.3;
  const long shots = 20000;
  const int campaigns = 400;
  for (const double e : {1e-3, 1e-2}) {
    const double e1 = e, e2 = 1.5 * e;
    RandomEngine g(derive_seed(31, static_cast<std::uint64_t>(e * 1e6)));
    double sum = 0, raw_sum = 0;
    for (int c = 0; c < campaigns; ++c) {
      const long dark = binomial(g, shots, p);
      // Each truly dark shot is read bright with e1; each bright shot is read dark with e2.
      const long read_dark = (dark - binomial(g, dark, e1)) + binomial(g, shots - dark, e2);
      const double f = static_cast<double>(read_dark) / static_cast<double>(shots);
      raw_sum += f;
      sum += corrected_dark_probability(f, e1, e2);
    }
    // MC standard error of the mean of `campaigns` corrected estimates.
    const double q = (1 - e1) * p + e2 * (1 - p);
    const double se = std::sqrt(q * (1 - q) / static_cast<double>(shots)) / (1 - e1 - e2) /
                      std::sqrt(static_cast<double>(campaigns));
    INFO("error rate " << e);
    CHECK_CLOSE(sum / campaigns, p, 3.5 * se, 0);
    if (e >= 1e-2) CHECK(std::abs(raw_sum / campaigns - p) > 10 * se);  // the raw fraction is biased
  }
  CHECK_THROWS_WITH(corrected_dark_probability(0.5, 0.6, 0.5), Catch::Contains("must be below 1"));
}
