// The portable samplers of random_variates.hpp against exact distributions.
#include <cmath>
#include <vector>

#include <boost/math/distributions/binomial.hpp>
#include <boost/math/distributions/chi_squared.hpp>
#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "stats/random_variates.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

// Pearson chi-square of `draws` Binomial(n, p) samples against the exact pmf (Boost.Math),
// tail cells merged until each expected count is >= 5. Returns {statistic, degrees of freedom}.
std::pair<double, int> chi_square(long n, double p, long draws, std::uint64_t seed) {
  RandomEngine g(seed);
  std::vector<double> hist(static_cast<std::size_t>(n + 1), 0.0);
  for (long i = 0; i < draws; ++i) {
    const long k = binomial(g, n, p);
    REQUIRE(k >= 0);
    REQUIRE(k <= n);
    hist[static_cast<std::size_t>(k)] += 1.0;
  }
  boost::math::binomial_distribution<double> dist(static_cast<double>(n), p);
  double stat = 0.0, obs = 0.0, expct = 0.0;
  int cells = 0;
  for (long k = 0; k <= n; ++k) {
    obs += hist[static_cast<std::size_t>(k)];
    expct += draws * boost::math::pdf(dist, static_cast<double>(k));
    if (expct >= 5.0 && draws * boost::math::cdf(boost::math::complement(dist, static_cast<double>(k))) >= 5.0) {
      stat += (obs - expct) * (obs - expct) / expct;
      ++cells;
      obs = expct = 0.0;
    }
  }
  if (expct > 0.0) {  // the remaining upper tail
    stat += (obs - expct) * (obs - expct) / expct;
    ++cells;
  }
  return {stat, cells - 1};
}

}  // namespace

TEST_CASE("Binomial sampler: distribution matches the exact pmf (chi-square)", "[stats]") {
  // Source of the exact pmf: Boost.Math binomial_distribution. Cases cover inversion
  // (n p < 10), BTRD (n p >= 10, Hormann 1993) and the p > 1/2 reflection. With 2e5 draws a
  // chi-square above its 1 - 1e-4 quantile would flag a wrong algorithm; fixed seeds.
  const struct { long n; double p; } cases[] = {
      {20, 0.3}, {30, 0.02}, {200, 0.06}, {1000, 0.4}, {100000, 0.5}, {50, 0.9}, {5000, 0.997}, {17, 0.5}};
  std::uint64_t seed = 11;
  for (const auto& c : cases) {
    const auto [stat, dof] = chi_square(c.n, c.p, 200000, seed++);
    const double crit = boost::math::quantile(
        boost::math::complement(boost::math::chi_squared_distribution<double>(dof), 1e-4));
    INFO("n = " << c.n << ", p = " << c.p << ": chi2 = " << stat << " on " << dof << " dof, crit " << crit);
    CHECK(stat < crit);
  }
}

TEST_CASE("Binomial sampler: mean and variance of a large-n case", "[stats]") {
  // Mean n p and variance n p (1 - p) (textbook binomial moments, common practice, no source).
  // 1e5 draws of Bin(1e5, 0.3): SE of the mean = sqrt(npq / 1e5) = 0.458; tolerance 5 SE.
  RandomEngine g(99);
  const long n = 100000, M = 100000;
  const double p = 0.3;
  double s = 0.0, ss = 0.0;
  for (long i = 0; i < M; ++i) {
    const double k = static_cast<double>(binomial(g, n, p));
    s += k;
    ss += k * k;
  }
  const double mean = s / M, var = ss / M - mean * mean, npq = n * p * (1 - p);
  CHECK_CLOSE(mean, n * p, 5.0 * std::sqrt(npq / M), 0.0);
  // SE of the sample variance ~ npq * sqrt(2 / M) (near-normal counts); tolerance 5 SE.
  CHECK_CLOSE(var, npq, 5.0 * npq * std::sqrt(2.0 / M), 0.0);
}

TEST_CASE("Binomial and multinomial samplers: reproducible, edge cases, errors", "[stats]") {
  RandomEngine g1(5), g2(5);
  for (int i = 0; i < 1000; ++i) REQUIRE(binomial(g1, 123456, 0.37) == binomial(g2, 123456, 0.37));
  RandomEngine g(1);
  CHECK(binomial(g, 0, 0.5) == 0);
  CHECK(binomial(g, 10, 0.0) == 0);
  CHECK(binomial(g, 10, 1.0) == 10);
  CHECK_THROWS_AS(binomial(g, -1, 0.5), DomainError);
  CHECK_THROWS_AS(binomial(g, 10, 1.5), DomainError);
  std::vector<double> w{3.0, 0.0, 5.0, 2.0}, out(4);
  for (int i = 0; i < 200; ++i) {
    multinomial(g, 1000, w, out);
    CHECK(out[1] == 0.0);  // a zero-weight cell never receives a count
    CHECK(out[0] + out[1] + out[2] + out[3] == 1000.0);
  }
  std::vector<double> last_zero{1.0, 2.0, 0.0};
  std::vector<double> o3(3);
  for (int i = 0; i < 200; ++i) {
    multinomial(g, 50, last_zero, o3);
    CHECK(o3[2] == 0.0);
  }
  std::vector<double> bad{1.0, -1.0};
  std::vector<double> o2(2);
  CHECK_THROWS_AS(multinomial(g, 5, bad, o2), DomainError);
  CHECK(derive_seed(1, 0) != derive_seed(1, 1));
  CHECK(derive_seed(1, 0) != derive_seed(2, 0));
}

TEST_CASE("Multinomial sampler: cell means match n w / sum w", "[stats]") {
  // Each cell of Multinomial(n, w) is Binomial(n, w_j / sum w) (textbook, common practice, no
  // source): mean n w_j / W, SD sqrt(n p (1 - p)); 20000 draws, tolerance 5 SE of the mean.
  RandomEngine g(314);
  const std::vector<double> w{0.2, 1.3, 0.5, 2.0};
  const double W = 4.0, n = 500;
  const long M = 20000;
  std::vector<double> out(4), mean(4, 0.0);
  for (long i = 0; i < M; ++i) {
    multinomial(g, 500, w, out);
    for (int j = 0; j < 4; ++j) mean[static_cast<std::size_t>(j)] += out[static_cast<std::size_t>(j)] / M;
  }
  for (int j = 0; j < 4; ++j) {
    const double p = w[static_cast<std::size_t>(j)] / W;
    CHECK_CLOSE(mean[static_cast<std::size_t>(j)], n * p, 5.0 * std::sqrt(n * p * (1 - p) / M), 0.0);
  }
}
