#include "stats/leggett_garg_tests.hpp"

#include <algorithm>
#include <cmath>
#include <exception>
#include <omp.h>

#include <boost/math/distributions/normal.hpp>

#include "core/error.hpp"

namespace macroreal {

namespace {

constexpr double kPFloor = 1e-300;
constexpr long kBlock = 256;

double shots(const std::vector<double>& c) {
  double n = 0.0;
  for (double x : c) n += x;
  return n;
}

TestResult finish(TestResult r) {
  r.p_value = std::clamp(r.p_value, 0.0, 1.0);
  r.sigma = gaussian_sigma(r.p_value, Sidedness::one_sided, &r.sigma_capped);
  return r;
}

}  // namespace

double gaussian_sigma(double p_value, Sidedness sides, bool* capped) {
  if (!(p_value >= 0.0 && p_value <= 1.0))
    throw DomainError("p-value = " + std::to_string(p_value) + ", but must be in [0, 1]");
  const bool cap = p_value < kPFloor;
  if (capped) *capped = cap;
  const double p = std::max(p_value, kPFloor);
  // The upper-tail probability whose quantile is the significance.
  const double tail = sides == Sidedness::two_sided ? 0.5 * p : p;
  if (tail >= 0.5) return 0.0;
  return boost::math::quantile(boost::math::complement(boost::math::normal_distribution<double>(), tail));
}

TestResult lg_z_test(double estimate, double std_error, double bound) {
  if (!std::isfinite(estimate))
    throw DomainError("z test: estimate = " + std::to_string(estimate) + ", but must be finite");
  if (!(std_error >= 0.0) || !std::isfinite(std_error))
    throw DomainError("z test: standard error = " + std::to_string(std_error) +
                      ", but must be finite and >= 0");
  TestResult r;
  r.method = "z-asymptotic";
  if (std_error == 0.0) {
    r.statistic = estimate > bound ? std::numeric_limits<double>::infinity()
                                   : (estimate < bound ? -std::numeric_limits<double>::infinity() : 0.0);
    r.p_value = estimate > bound ? 0.0 : 1.0;
    r.note = "standard error is 0";
  } else {
    r.statistic = (estimate - bound) / std_error;
    r.p_value = 0.5 * std::erfc(r.statistic / std::sqrt(2.0));
  }
  return finish(r);
}

TestResult lg_hoeffding_test(const CellCounts& counts, const LinearFunctional& k, double bound) {
  MACROREAL_CHECK(counts.size() == k.coef.size());
  TestResult r;
  r.method = "hoeffding";
  const double est = k.estimate(counts);
  if (!std::isfinite(est)) throw DomainError("Hoeffding test: a sequence of " + k.name + " has no shots");
  double denom = 0.0;  // sum over shots of (range of the shot term)^2 = sum_s R_s^2 / N_s
  for (std::size_t s = 0; s < counts.size(); ++s)
    if (k.uses(s)) denom += k.shot_range(s) * k.shot_range(s) / shots(counts[s]);
  r.statistic = est - bound;
  if (r.statistic <= 0.0 || denom <= 0.0) r.p_value = r.statistic > 0.0 ? 0.0 : 1.0;
  else r.p_value = std::exp(-2.0 * r.statistic * r.statistic / denom);
  return finish(r);
}

TestResult lg_empirical_bernstein_test(const CellCounts& counts, const LinearFunctional& k,
                                       double bound) {
  MACROREAL_CHECK(counts.size() == k.coef.size());
  TestResult r;
  r.method = "empirical-bernstein";
  struct Part { double cmin, range, mean, var, n; };
  std::vector<Part> parts;
  double fixed = 0.0;
  for (std::size_t s = 0; s < counts.size(); ++s) {
    if (!k.uses(s)) continue;
    const double n = shots(counts[s]);
    if (!(n > 0.0)) throw DomainError("empirical Bernstein test: a sequence of " + k.name + " has no shots");
    const double cmin = *std::min_element(k.coef[s].begin(), k.coef[s].end());
    const double R = k.shot_range(s);
    if (R == 0.0) { fixed += cmin; continue; }
    double mean = 0.0;
    for (std::size_t j = 0; j < counts[s].size(); ++j) mean += counts[s][j] * (k.coef[s][j] - cmin) / R;
    mean /= n;
    double ss = 0.0;
    for (std::size_t j = 0; j < counts[s].size(); ++j) {
      const double y = (k.coef[s][j] - cmin) / R;
      ss += counts[s][j] * (y - mean) * (y - mean);
    }
    parts.push_back({cmin, R, mean, n > 1.0 ? ss / (n - 1.0) : 0.0, n});
  }
  const double S = static_cast<double>(std::max<std::size_t>(parts.size(), 1));
  auto lcb = [&](double delta) {
    double v = fixed;
    const double lg = std::log(2.0 * S / delta);
    for (const auto& p : parts) {
      double ey = 0.0;  // trivial bound E Y >= 0 when n < 2
      if (p.n >= 2.0)
        ey = std::max(0.0, p.mean - std::sqrt(2.0 * p.var * lg / p.n) - 7.0 * lg / (3.0 * (p.n - 1.0)));
      v += p.cmin + p.range * ey;
    }
    return v;
  };
  r.statistic = k.estimate(counts) - bound;
  if (!(lcb(1.0) > bound)) {
    r.p_value = 1.0;
  } else if (lcb(kPFloor) > bound) {
    r.p_value = 0.0;
  } else {
    double lo = std::log(kPFloor), hi = 0.0;  // lcb(exp(lo)) <= bound < lcb(exp(hi))
    for (int it = 0; it < 200; ++it) {
      const double mid = 0.5 * (lo + hi);
      (lcb(std::exp(mid)) > bound ? hi : lo) = mid;
    }
    r.p_value = std::exp(hi);
  }
  return finish(r);
}

TestResult lg_parametric_bootstrap_test(const CellCounts& counts, const LinearFunctional& k,
                                        double bound, const ParametricBootstrapOptions& options) {
  if (options.replicates < 1)
    throw DomainError("parametric bootstrap replicates = " + std::to_string(options.replicates) +
                      ", but must be >= 1");
  TestResult r;
  r.method = "parametric-bootstrap";
  const double est = k.estimate(counts);
  if (!std::isfinite(est)) throw DomainError("parametric bootstrap: a sequence of " + k.name + " has no shots");
  const double t_obs = (est - bound) / k.smoothed_se(counts);
  r.statistic = t_obs;
  const ConstrainedFit fit = constrained_fit(counts, k, bound, options.pseudo_count);
  const long B = options.replicates;
  const long blocks = (B + kBlock - 1) / kBlock;
  std::vector<long> exceed(static_cast<std::size_t>(blocks), 0);
  const int threads = options.threads > 0 ? options.threads : omp_get_max_threads();
  std::exception_ptr failure;
#pragma omp parallel num_threads(threads)
  {
    CellCounts draw = counts;
#pragma omp for schedule(static)
    for (long blk = 0; blk < blocks; ++blk) {
      try {
        RandomEngine g(derive_seed(options.seed, static_cast<std::uint64_t>(blk)));
        const long end = std::min(B, (blk + 1) * kBlock);
        long c = 0;
        for (long b = blk * kBlock; b < end; ++b) {
          simulate_counts(g, fit.probabilities, counts, draw);
          const double t = (k.estimate(draw) - bound) / k.smoothed_se(draw);
          c += (t >= t_obs);
        }
        exceed[static_cast<std::size_t>(blk)] = c;
      } catch (...) {
#pragma omp critical(macroreal_lg_pb_failure)
        if (!failure) failure = std::current_exception();
      }
    }
  }
  if (failure) std::rethrow_exception(failure);
  long total = 0;
  for (long c : exceed) total += c;
  r.p_value = (1.0 + static_cast<double>(total)) / (static_cast<double>(B) + 1.0);
  if (!fit.converged) r.note = "constrained fit did not reach the bound to 1e-9";
  return finish(r);
}

std::vector<TestResult> leggett_garg_tests(const CampaignCounts& campaign,
                                           const std::vector<std::string>& order, double estimate,
                                           double std_error, const ParametricBootstrapOptions& options) {
  const LinearFunctional k = lg_functional(campaign, order);
  CellCounts counts;
  for (const auto& s : campaign.sequences) counts.push_back(s.counts);
  const double bound = static_cast<double>(order.size()) - 2.0;
  return {lg_z_test(estimate, std_error, bound), lg_hoeffding_test(counts, k, bound),
          lg_empirical_bernstein_test(counts, k, bound),
          lg_parametric_bootstrap_test(counts, k, bound, options)};
}

}  // namespace macroreal
