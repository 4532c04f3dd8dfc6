// The figure of calibrate (lib/report/calibration_figures.hpp) as data: the fitted counts
// sum to the shots and each component is the Poisson law of the fit, computed directly.
#include <catch2/catch.hpp>

#include <cmath>

#include "detection/calibration.hpp"
#include "detection/calibration_counts.hpp"
#include "report/calibration_figures.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

const FigureSeries& series_labelled(const Figure& f, const std::string& start) {
  for (const auto& s : f.series)
    if (s.label.rfind(start, 0) == 0) return s;
  FAIL("no series labelled '" << start << "...' in figure '" << f.title << "'");
  throw;  // unreachable
}

}  // namespace

TEST_CASE("calibration figure: the fitted counts sum to the shots and follow the Poisson law",
          "[report][figure]") {
  const CountHistograms h =
      read_calibration_counts(std::string(MACROREAL_SOURCE_DIR) + "/example_runs/calibration_counts.csv");
  CalibrationOptions o;
  o.bootstrap_replicates = 100;
  const CalibrationResult r = calibrate_counts(h, o);
  const FittedCounts c = fitted_counts(h, r, 200);
  double total = 0, observed = 0;
  for (std::size_t n = 0; n < c.total.size(); ++n) {
    total += c.total[n];
    observed += c.observed[n];
    CHECK_CLOSE(c.total[n], c.dark[n] + c.bright[n], 1e-12, 1e-12);
  }
  CHECK(c.shots == 6000.0);
  CHECK(observed == 6000.0);
  CHECK_CLOSE(total, 6000.0, 1e-9, 0.0);
  // No decay model here: each component is a Poisson law, n! e^{-l} l^n computed directly
  // (Johnson, Kemp & Kotz, Univariate Discrete Distributions, 3rd ed. (2005), eq. 4.1).
  const double nd = static_cast<double>(histogram_shots(h.dark)), nb = static_cast<double>(histogram_shots(h.bright));
  const double nu = static_cast<double>(histogram_shots(h.unknown));
  const double w = r.fit.has_unknown ? r.fit.bright_fraction : 0.0;
  for (int n : {0, 1, 3, 9, 15}) {
    const double ld = r.fit.model.dark_rate, lb = r.fit.model.bright_rate;
    const double pd = std::exp(-ld + n * std::log(ld) - std::lgamma(n + 1.0));
    const double pb = std::exp(-lb + n * std::log(lb) - std::lgamma(n + 1.0));
    CHECK_CLOSE(c.dark[n], (nd + nu * (1 - w)) * pd, 1e-300, 1e-10);
    CHECK_CLOSE(c.bright[n], (nb + nu * w) * pb, 1e-300, 1e-10);
  }
  const Figure f = count_histogram_figure(h, r);
  CHECK(f.log_y);
  const auto& line = series_labelled(f, "threshold used");
  CHECK(line.x[0] == r.threshold + 0.5);
}

