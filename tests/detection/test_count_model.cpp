// Photon-count distributions and thresholds (lib/detection/count_model, thresholds) against
// scipy.stats.poisson / scipy.integrate.quad (tests/reference/scipy_poisson_reference.py),
// a moment identity of the decay model, and brute-force threshold searches.
#include <catch2/catch.hpp>

#include <cmath>
#include <fstream>

#include <nlohmann/json.hpp>

#include "core/error.hpp"
#include "detection/count_model.hpp"
#include "detection/thresholds.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

nlohmann::json reference() {
  std::ifstream in(std::string(MACROREAL_SOURCE_DIR) + "/tests/reference/scipy_poisson_reference.json");
  REQUIRE(in);
  return nlohmann::json::parse(in);
}

}  // namespace

TEST_CASE("Poisson pmf, cdf and sf match scipy.stats.poisson", "[detection][reference]") {
  // Source: scipy.stats.poisson (SciPy 1.10), tests/reference/scipy_poisson_reference.json.
  const auto ref = reference();
  int checked = 0;
  for (const auto& r : ref["poisson"]) {
    const long n = r["n"].get<long>();
    const double lam = r["lambda"].get<double>();
    INFO("n = " << n << ", lambda = " << lam);
    CHECK_CLOSE(poisson_probability(n, lam), r["pmf"].get<double>(), 1e-300, 1e-11);
    CHECK_CLOSE(poisson_lower_tail(n, lam), r["cdf"].get<double>(), 1e-300, 1e-11);
    CHECK_CLOSE(poisson_upper_tail(n, lam), r["sf"].get<double>(), 1e-300, 1e-10);
    ++checked;
  }
  CHECK(checked == 88);
}

TEST_CASE("dark-pumped-to-bright pmf and tail match scipy quadrature", "[detection][reference]") {
  // Source: scipy.integrate.quad of the model integral (Acton et al. 2006, from memory).
  const auto ref = reference();
  for (const auto& r : ref["dark_pumped_to_bright"]) {
    const CountModel m{r["dark"].get<double>(), r["bright"].get<double>(), r["pump_per_window"].get<double>()};
    const auto& pmf = r["pmf"];
    const auto ours = dark_pmf(m, static_cast<long>(pmf.size()) - 1);
    for (std::size_t n = 0; n < pmf.size(); ++n) {
      INFO("model " << m.dark_rate << "/" << m.bright_rate << "/" << m.pump_per_window << ", n = " << n);
      CHECK_CLOSE(ours[n], pmf[n].get<double>(), 1e-15, 1e-9);
    }
    const auto& sf = r["sf"];
    for (std::size_t t = 0; t < sf.size(); ++t)
      CHECK_CLOSE(misassignment(m, static_cast<long>(t)).dark_read_bright, sf[t].get<double>(), 1e-16, 1e-9);
  }
}

TEST_CASE("dark-pumped-to-bright: probabilities sum to one and the mean is exact", "[detection]") {
  // Derived from the model: E[N] = d + (b - d) int_0^1 a e^{-a u} (1 - u) du
  //                              = d + (b - d) (1 - (1 - e^{-a}) / a).
  for (const CountModel m : {CountModel{0.1, 8, 0.02}, CountModel{0.4, 20, 0.5}, CountModel{0, 5, 2}}) {
    const auto p = dark_pmf(m, 200);
    double sum = 0, mean = 0;
    for (std::size_t n = 0; n < p.size(); ++n) {
      sum += p[n];
      mean += static_cast<double>(n) * p[n];
    }
    const double a = m.pump_per_window;
    CHECK_CLOSE(sum, 1.0, 1e-12, 0);
    CHECK_CLOSE(mean, m.dark_rate + (m.bright_rate - m.dark_rate) * (1 - (1 - std::exp(-a)) / a), 1e-10, 0);
  }
}

TEST_CASE("minimum-error threshold equals a brute-force search and the likelihood-ratio rule",
          "[detection]") {
  // Brute force: naive pmf by the recursion p(n) = p(n-1) lambda / n, errors by direct sums,
  // every t in 0..400 (ties within 1e-12 relative go to the smaller t). Closed form for two Poissons: t = floor((b - d) / ln(b / d))
  // (likelihood-ratio rule; common practice, no source).
  for (const double d : {0.02, 0.1, 0.5, 1.3, 3.0}) {
    for (const double b : {4.0, 7.5, 15.0, 33.0, 60.0}) {
      const CountModel m{d, b, 0};
      std::vector<double> pd(401), pb(401);
      pd[0] = std::exp(-d);
      pb[0] = std::exp(-b);
      for (int n = 1; n <= 400; ++n) {
        pd[n] = pd[n - 1] * d / n;
        pb[n] = pb[n - 1] * b / n;
      }
      // Upper tails summed from the far end, so that tiny errors keep their digits.
      std::vector<double> above(402, 0.0);
      for (int n = 400; n >= 0; --n) above[n] = above[n + 1] + pd[n];
      long best_t = 0, balanced_t = 0;
      double best = 2, best_gap = 2;
      double cb = 0;
      for (int t = 0; t <= 400; ++t) {
        cb += pb[t];
        const double e1 = above[t + 1], e2 = cb;
        if (e1 + e2 < best * (1 - 1e-12)) { best = e1 + e2; best_t = t; }
        if (std::abs(e1 - e2) < best_gap * (1 - 1e-12)) { best_gap = std::abs(e1 - e2); balanced_t = t; }
      }
      INFO("d = " << d << ", b = " << b);
      const ThresholdChoice c = minimum_error_threshold(m);
      CHECK(c.threshold == best_t);
      CHECK(c.threshold == static_cast<long>(std::floor((b - d) / std::log(b / d))));
      CHECK_CLOSE(c.errors.total(), best, 1e-12, 1e-9);
      CHECK(balanced_threshold(m).threshold == balanced_t);
    }
  }
}

TEST_CASE("minimum-error threshold with decay equals a brute-force search", "[detection]") {
  // Brute force over t with the model's pmf summed directly (not the tail functions).
  for (const CountModel m : {CountModel{0.1, 6, 0.05}, CountModel{0.3, 12, 0.4}, CountModel{1, 25, 1.5}}) {
    const auto pd = dark_pmf(m, 300);
    double cd = 0, cb = 0, best = 2;
    long best_t = 0;
    for (long t = 0; t <= 300; ++t) {
      cd += pd[static_cast<std::size_t>(t)];
      cb += poisson_probability(t, m.bright_rate);
      if ((1 - cd) + cb < best - 1e-15) { best = (1 - cd) + cb; best_t = t; }
    }
    CHECK(minimum_error_threshold(m).threshold == best_t);
  }
}

TEST_CASE("count model: invalid parameters are DomainErrors naming the value", "[detection]") {
  CHECK_THROWS_WITH(minimum_error_threshold(CountModel{2, 1, 0}),
                    Catch::Contains("bright rate = 1, but must be finite and above the dark rate 2"));
  CHECK_THROWS_WITH(minimum_error_threshold(CountModel{-1, 1, 0}), Catch::Contains("dark rate = -1"));
  CHECK_THROWS_WITH(scaled_window(CountModel{0.1, 1, 0}, 0), Catch::Contains("window factor = 0"));
}
