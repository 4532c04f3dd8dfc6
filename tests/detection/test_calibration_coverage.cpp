// Interval coverage of the calibration (lib/detection/calibration.hpp) on simulated
// calibrations with known truth: the fraction of percentile-bootstrap intervals that contain
// the true misassignment probability (at each calibration's own threshold) and the true rates.
// Tolerance: 3.5 Monte Carlo standard errors of a coverage fraction, sqrt(c (1 - c) / n), with
// c = 0.95 nominal; the percentile bootstrap is first-order accurate, so a small deficit is
// expected (Efron & Tibshirani 1993, ch. 13-14). Also: the goodness-of-fit p-value is roughly
// uniform under the true model (rejection rate at 0.05 within 3.5 MC standard errors).
#include <catch2/catch.hpp>

#include <cmath>
#include <cstdio>

#include "detection/calibration.hpp"
#include "detection/count_simulation.hpp"

using namespace macroreal;
using test_support::simulate_calibration;

namespace {

struct Coverage {
  long n = 0, e1 = 0, e2 = 0, dark = 0, bright = 0, gof_reject = 0;
};

Coverage study(const CountModel& truth, int calibrations, int replicates, std::uint64_t seed,
               long shots) {
  Coverage c;
  for (int i = 0; i < calibrations; ++i) {
    RandomEngine g(derive_seed(seed, static_cast<std::uint64_t>(i)));
    const CountHistograms h = simulate_calibration(g, truth, shots, shots, shots, 0.4);
    CalibrationOptions o;
    o.seed = derive_seed(seed + 1, static_cast<std::uint64_t>(i));
    o.bootstrap_replicates = replicates;
    const CalibrationResult r = calibrate_counts(h, o);
    const Misassignment e = misassignment(truth, r.threshold);
    ++c.n;
    c.e1 += r.dark_read_bright.lo <= e.dark_read_bright && e.dark_read_bright <= r.dark_read_bright.hi;
    c.e2 += r.bright_read_dark.lo <= e.bright_read_dark && e.bright_read_dark <= r.bright_read_dark.hi;
    c.dark += r.dark_rate.lo <= truth.dark_rate && truth.dark_rate <= r.dark_rate.hi;
    c.bright += r.bright_rate.lo <= truth.bright_rate && truth.bright_rate <= r.bright_rate.hi;
    c.gof_reject += r.gof.pearson_p < 0.05;
  }
  return c;
}

void check_coverage(const Coverage& c, const char* label) {
  const double n = static_cast<double>(c.n);
  const double tol = 3.5 * std::sqrt(0.95 * 0.05 / n);
  const double gof_tol = 3.5 * std::sqrt(0.05 * 0.95 / n);
  auto f = [&](long k) { return static_cast<double>(k) / n; };
  std::printf("coverage %s (n = %ld, tolerance +-%.3f): dark_read_bright %.3f, bright_read_dark %.3f, "
              "dark rate %.3f, bright rate %.3f; GOF rejections at 0.05: %.3f\n",
              label, c.n, tol, f(c.e1), f(c.e2), f(c.dark), f(c.bright), f(c.gof_reject));
  INFO(label);
  CHECK(std::abs(f(c.e1) - 0.95) <= tol);
  CHECK(std::abs(f(c.e2) - 0.95) <= tol);
  CHECK(std::abs(f(c.dark) - 0.95) <= tol);
  CHECK(std::abs(f(c.bright) - 0.95) <= tol);
  CHECK(std::abs(f(c.gof_reject) - 0.05) <= gof_tol);
}

}  // namespace

TEST_CASE("calibration intervals: coverage on 600 simulated calibrations, 3 rate pairs",
          "[detection][long]") {
  // 200 calibrations per rate pair, each 1000 dark + 1000 bright + 1000 unknown shots (40 %
  // bright), B = 400. Per pair tolerance 3.5 * 0.0154 = 0.054; pooled 3.5 * 0.0089 = 0.031.
  Coverage all;
  int k = 0;
  for (const CountModel truth : {CountModel{0.1, 6.0, 0}, CountModel{0.3, 12.0, 0}, CountModel{1.0, 20.0, 0}}) {
    const Coverage c = study(truth, 200, 400, 1000 + 17 * static_cast<std::uint64_t>(k++), 1000);
    char label[64];
    std::snprintf(label, sizeof label, "dark %.1f bright %.0f", truth.dark_rate, truth.bright_rate);
    check_coverage(c, label);
    all.n += c.n; all.e1 += c.e1; all.e2 += c.e2; all.dark += c.dark; all.bright += c.bright;
    all.gof_reject += c.gof_reject;
  }
  check_coverage(all, "pooled");
}

TEST_CASE("calibration intervals: coverage on 120 simulated calibrations (quick)", "[detection]") {
  // n = 120, B = 200: tolerance 3.5 * sqrt(0.95 * 0.05 / 120) = 0.070.
  check_coverage(study(CountModel{0.2, 9.0, 0}, 120, 200, 77, 600), "quick dark 0.2 bright 9");
}
