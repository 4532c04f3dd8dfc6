// The Poisson sampler of campaign simulation (design/simulation_variates.hpp) against the
// Poisson law itself: frequencies of each count against the pmf e^-m m^k / k! (Johnson, Kemp
// & Kotz, Univariate Discrete Distributions (2005), eq. 4.1), and the sample mean and
// variance (both m). Means below and above 10 exercise inversion and PTRS.
// Tolerance: each count's frequency within 4.5 binomial standard deviations, the mean within
// 4.5 sqrt(m / N), the variance within 4.5 sqrt(m (1 + 2m) / N) (the variance of the sample
// variance of a Poisson: mu4 - sigma^4 = m + 2 m^2). Fixed seeds.
#include <catch2/catch.hpp>

#include <cmath>
#include <map>

#include "core/error.hpp"
#include "design/simulation_variates.hpp"
#include "support/compare.hpp"

using namespace macroreal;

TEST_CASE("poisson draws follow the Poisson pmf", "[design][simulation]") {
  const long N = 200000;
  for (const double m : {0.3, 4.5, 9.99, 10.0, 23.0, 150.0}) {
    INFO("mean " << m);
    RandomEngine g(derive_seed(4242, static_cast<std::uint64_t>(m * 100)));
    std::map<long, long> hist;
    double sum = 0, sum2 = 0;
    for (long i = 0; i < N; ++i) {
      const long k = poisson(g, m);
      REQUIRE(k >= 0);
      ++hist[k];
      sum += static_cast<double>(k);
      sum2 += static_cast<double>(k) * static_cast<double>(k);
    }
    const double mean = sum / N, var = sum2 / N - mean * mean;
    CHECK_CLOSE(mean, m, 4.5 * std::sqrt(m / N), 0.0);
    CHECK_CLOSE(var, m, 4.5 * std::sqrt(m * (1 + 2 * m) / N), 0.0);
    const long lo = static_cast<long>(std::max(0.0, m - 4 * std::sqrt(m)));
    const long hi = static_cast<long>(m + 4 * std::sqrt(m)) + 2;
    for (long k = lo; k <= hi; ++k) {
      const double p = std::exp(-m + k * std::log(m) - std::lgamma(k + 1.0));
      const double n = static_cast<double>(hist[k]);
      INFO("k = " << k << ": " << n << " vs " << N * p);
      CHECK(std::fabs(n - N * p) <= 4.5 * std::sqrt(N * p * (1 - p)) + 1e-9);
    }
  }
}

TEST_CASE("poisson_cdf against direct summation, bad means are refused", "[design][simulation]") {
  // P(X <= 2) = e^-m (1 + m + m^2/2) (Johnson, Kemp & Kotz 2005, eq. 4.1 summed).
  for (const double m : {0.1, 2.0, 8.0})
    CHECK_CLOSE(poisson_cdf(2, m), std::exp(-m) * (1 + m + m * m / 2), 1e-14, 1e-13);
  CHECK(poisson_cdf(-1, 2.0) == 0.0);
  CHECK(poisson_cdf(3, 0.0) == 1.0);
  RandomEngine g(1);
  CHECK(poisson(g, 0.0) == 0);
  CHECK_THROWS_AS(poisson(g, -1.0), DomainError);
  CHECK_THROWS_AS(poisson(g, std::nan("")), DomainError);
}
