// The mixture fit, goodness of fit and calibration (lib/detection/mixture_fit, calibration):
// recovery of simulated parameters, the EM fixed point against the closed form for labelled
// data, and refusal of data that cannot identify two rates.
#include <catch2/catch.hpp>

#include <cmath>

#include "core/error.hpp"
#include "detection/calibration.hpp"
#include "detection/calibration_counts.hpp"
#include "detection/goodness_of_fit.hpp"
#include "detection/mixture_fit.hpp"
#include "detection/count_simulation.hpp"
#include "support/compare.hpp"

using namespace macroreal;
using test_support::simulate_calibration;

namespace {

std::string refusal(const std::string& csv) {
  try {
    const CountHistograms h = parse_calibration_counts(csv, "cal.csv");
    fit_mixture(h);
  } catch (const InputError& e) {
    return e.what();
  }
  return "(no error)";
}

}  // namespace

TEST_CASE("mixture fit: labelled data only gives the sample means (the Poisson MLE)", "[detection]") {
  // The MLE of a Poisson rate is the sample mean (any statistics text, e.g. Casella & Berger,
  // "Statistical Inference", 2nd ed., Example 7.2.7, from memory).
  const CountHistograms h = parse_calibration_counts(
      "label,count\ndark,0\ndark,0\ndark,1\ndark,0\nbright,7\nbright,9\nbright,11\nbright,8\n", "t.csv");
  const MixtureFit f = fit_mixture(h);
  CHECK_CLOSE(f.model.dark_rate, 0.25, 1e-12, 0);
  CHECK_CLOSE(f.model.bright_rate, 8.75, 1e-12, 0);
  CHECK(f.converged);
  CHECK(f.free_parameters == 2);
}

TEST_CASE("mixture fit: EM recovers simulated rates and the bright fraction", "[detection]") {
  // Simulated truth; tolerance 4 standard errors of the MLE (Poisson: sqrt(lambda / n), with
  // the unknown shots adding information), fixed seed.
  RandomEngine g(2024);
  const CountModel truth{0.3, 12.0, 0};
  const CountHistograms h = simulate_calibration(g, truth, 3000, 3000, 3000, 0.35);
  const MixtureFit f = fit_mixture(h);
  REQUIRE(f.converged);
  CHECK_CLOSE(f.model.dark_rate, 0.3, 4 * std::sqrt(0.3 / 4000), 0);
  CHECK_CLOSE(f.model.bright_rate, 12.0, 4 * std::sqrt(12.0 / 4000), 0);
  CHECK_CLOSE(f.bright_fraction, 0.35, 4 * std::sqrt(0.35 * 0.65 / 3000), 0);
  // EM increases the likelihood: the fit beats the truth on this sample.
  CHECK(f.log_likelihood >= mixture_log_likelihood(h, truth, 0.35) - 1e-9);
  const GoodnessOfFit gof = goodness_of_fit(h, f);
  CHECK(gof.df >= 5);
  CHECK(gof.pearson_p > 0.001);  // the model is true here
}

TEST_CASE("mixture fit: unknown shots alone are enough when two components show", "[detection]") {
  RandomEngine g(7);
  const CountModel truth{0.5, 9.0, 0};
  const CountHistograms h = simulate_calibration(g, truth, 0, 0, 6000, 0.5);
  const MixtureFit f = fit_mixture(h);
  CHECK_CLOSE(f.model.dark_rate, 0.5, 4 * std::sqrt(0.5 / 3000), 0);
  CHECK_CLOSE(f.model.bright_rate, 9.0, 4 * std::sqrt(9.0 / 3000), 0);
  CHECK_CLOSE(f.bright_fraction, 0.5, 4 * std::sqrt(0.25 / 6000) + 0.01, 0);
}

TEST_CASE("mixture fit with the decay model recovers the rates, the plain model misfits", "[detection]") {
  RandomEngine g(99);
  const CountModel truth{0.2, 10.0, 0.3};  // pumped within the window in 26% of dark shots
  const CountHistograms h = simulate_calibration(g, truth, 4000, 4000, 0, 0);
  MixtureFitOptions o;
  o.pump_per_window = 0.3;
  const MixtureFit f = fit_mixture(h, o);
  CHECK_CLOSE(f.model.dark_rate, 0.2, 0.04, 0);  // ~4 standard errors (Fisher information by simulation)
  CHECK_CLOSE(f.model.bright_rate, 10.0, 4 * std::sqrt(10.0 / 4000), 0);
  CHECK(goodness_of_fit(h, f).pearson_p > 0.001);
  const MixtureFit plain = fit_mixture(h);
  CHECK(goodness_of_fit(h, plain).pearson_p < 1e-6);  // a decaying dark state is not Poisson
}

TEST_CASE("calibration: recovered errors, thresholds and model-free fractions agree", "[detection]") {
  RandomEngine g(5);
  const CountModel truth{0.15, 7.0, 0};
  const CountHistograms h = simulate_calibration(g, truth, 5000, 5000, 0, 0);
  CalibrationOptions o;
  o.bootstrap_replicates = 300;
  o.seed = 11;
  const CalibrationResult r = calibrate_counts(h, o);
  CHECK(r.threshold == static_cast<long>(std::floor((7.0 - 0.15) / std::log(7.0 / 0.15))));
  CHECK(r.dark_read_bright.lo <= r.dark_read_bright.estimate);
  CHECK(r.dark_read_bright.hi >= r.dark_read_bright.estimate);
  // The model's error and the observed fraction of misread reference shots agree within
  // 4 binomial standard errors (the model is true).
  const double e2 = r.bright_read_dark.estimate;
  CHECK_CLOSE(static_cast<double>(r.bright_at_or_below) / 5000, e2, 4 * std::sqrt(e2 * (1 - e2) / 5000), 0);
  // Same seed, same result; another seed, other bootstrap draws.
  const CalibrationResult again = calibrate_counts(h, o);
  CHECK(again.dark_read_bright.lo == r.dark_read_bright.lo);
  o.seed = 12;
  CHECK(calibrate_counts(h, o).bright_read_dark.hi != r.bright_read_dark.hi);
  // Window table: the calibration window reproduces the fit; a longer window has less error.
  REQUIRE(r.window_table.size() == 5);
  CHECK(r.window_table[2].factor == 1.0);
  CHECK(r.window_table[2].best.threshold == r.threshold);
  CHECK(r.window_table[4].best.errors.total() < r.window_table[2].best.errors.total());
}

TEST_CASE("calibration counts: bad rows are InputErrors naming file, line and field", "[detection]") {
  auto msg = [](const std::string& csv) {
    try {
      parse_calibration_counts(csv, "cal.csv");
    } catch (const InputError& e) {
      return std::string(e.what());
    }
    return std::string("(no error)");
  };
  CHECK(msg("label,count\ndark,-1\n").find("cal.csv: line 2, field count: `-1` is negative") != std::string::npos);
  CHECK(msg("label,count\ndark,1.5\n").find("line 2, field count: `1.5` is not a non-negative integer") != std::string::npos);
  CHECK(msg("label,count\n# c\ngrey,3\n").find("line 3, field label: `grey` is not one of") != std::string::npos);
  CHECK(msg("label,n\ndark,3\n").find("line 1: header has no `count` column") != std::string::npos);
  CHECK(msg("label,count\n").find("no data rows") != std::string::npos);
  CHECK(msg("label,count,window_s\ndark,1,1e-3\nbright,5,2e-3\n").find("line 3, field window_s") != std::string::npos);
  CHECK(msg("label,count,window_s,note\ndark,1,1e-3,x\nbright,5,,y\n") == "(no error)");
}

TEST_CASE("mixture fit: unidentifiable data get a message, not a fit", "[detection]") {
  CHECK(refusal("label,count\ndark,3\nbright,3\nunknown,3\n").find("cal.csv: all 3 shots have 3 counts") != std::string::npos);
  CHECK(refusal("label,count\ndark,0\ndark,1\n").find("no bright evidence: there are no `bright` or `unknown` rows") != std::string::npos);
  CHECK(refusal("label,count\nbright,5\nbright,7\n").find("no dark evidence") != std::string::npos);
  CHECK(refusal("label,count\ndark,5\ndark,6\nbright,1\nbright,2\n").find("labels swapped") != std::string::npos);
  {  // equal rates: labelled groups drawn from the same Poisson
    RandomEngine g(3);
    CountHistograms h = simulate_calibration(g, CountModel{4.0, 4.0001, 0}, 500, 500, 0, 0);
    CHECK_THROWS_WITH(fit_mixture(h), Catch::Contains("equal rates cannot be told apart") ||
                                          Catch::Contains("labels swapped"));
  }
  {  // dark references plus unknown shots that are all dark: no bright evidence
    RandomEngine g(4);
    CountHistograms h = simulate_calibration(g, CountModel{0.4, 9, 0}, 1000, 0, 1000, 0.0);
    CHECK_THROWS_WITH(fit_mixture(h), Catch::Contains("no bright evidence: the unknown shots are consistent with all dark"));
  }
  {  // unknown only, one Poisson
    RandomEngine g(6);
    CountHistograms h = simulate_calibration(g, CountModel{3.0, 9, 0}, 0, 0, 2000, 0.0);
    CHECK_THROWS_WITH(fit_mixture(h), Catch::Contains("unidentifiable mixture"));
  }
}
