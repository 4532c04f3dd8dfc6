#include "stats/nsit_tests.hpp"

#include <algorithm>
#include <cmath>
#include <vector>

#include "core/error.hpp"

namespace macroreal {

namespace {

double upper_tail(double z) { return 0.5 * std::erfc(z / std::sqrt(2.0)); }

TestResult with_sigma(TestResult r, Sidedness sides) {
  r.p_value = std::clamp(r.p_value, 0.0, 1.0);
  r.sigma = gaussian_sigma(r.p_value, sides, &r.sigma_capped);
  return r;
}

// Null standard error of the functional at the constrained fit functional == target.
double null_se(const CellCounts& counts, const LinearFunctional& f, double target) {
  // A vanishing pseudo count: the fit is then the plain constrained MLE (for two binomials,
  // the pooled proportion) while staying well defined when a cell is empty.
  const ConstrainedFit fit = constrained_fit(counts, f, target, 1e-12);
  return std::sqrt(f.variance_at(fit.probabilities, counts));
}

// max over pi in [0, 1] of P_pi((X1, X2) in region) for X1 ~ Bin(n1, pi), X2 ~ Bin(n2, pi)
// independent; region[a] lists the x2 values b with (a, b) in the region. A grid of 400
// points plus golden-section refinement around the three best (scipy.stats.barnard_exact
// and boschloo_exact maximise the same function with shgo).
double max_null_probability(const std::vector<std::vector<long>>& region, long n1, long n2) {
  auto log_comb = [](long n) {
    std::vector<double> lc(static_cast<std::size_t>(n + 1));
    for (long k = 0; k <= n; ++k)
      lc[static_cast<std::size_t>(k)] = std::lgamma(n + 1.0) - std::lgamma(k + 1.0) - std::lgamma(n - k + 1.0);
    return lc;
  };
  const std::vector<double> lc1 = log_comb(n1), lc2 = log_comb(n2);
  std::vector<double> b1(static_cast<std::size_t>(n1 + 1)), b2(static_cast<std::size_t>(n2 + 1));
  auto pmf = [](std::vector<double>& out, const std::vector<double>& lc, long n, double pi) {
    for (long k = 0; k <= n; ++k) {
      double l = lc[static_cast<std::size_t>(k)];
      if (k > 0) l += k * std::log(pi);
      if (n - k > 0) l += (n - k) * std::log1p(-pi);
      out[static_cast<std::size_t>(k)] = std::exp(l);
    }
  };
  auto prob = [&](double pi) {
    if (pi <= 0.0 || pi >= 1.0) {  // all mass on the table (0, 0) or (n1, n2)
      const long a = pi <= 0.0 ? 0 : n1, b = pi <= 0.0 ? 0 : n2;
      const auto& row = region[static_cast<std::size_t>(a)];
      return std::find(row.begin(), row.end(), b) != row.end() ? 1.0 : 0.0;
    }
    pmf(b1, lc1, n1, pi);
    pmf(b2, lc2, n2, pi);
    double p = 0.0;
    for (long a = 0; a <= n1; ++a) {
      double s = 0.0;
      for (long b : region[static_cast<std::size_t>(a)]) s += b2[static_cast<std::size_t>(b)];
      p += b1[static_cast<std::size_t>(a)] * s;
    }
    return p;
  };
  constexpr int kGrid = 400;
  std::vector<std::pair<double, double>> values;  // (p, pi)
  for (int i = 0; i <= kGrid; ++i) {
    const double pi = static_cast<double>(i) / kGrid;
    values.emplace_back(prob(pi), pi);
  }
  std::sort(values.begin(), values.end(), std::greater<>());
  double best = values.front().first;
  const double h = 1.0 / kGrid, g = 0.5 * (std::sqrt(5.0) - 1.0);
  for (int k = 0; k < 3; ++k) {  // golden-section refinement around the three best grid points
    double a = std::max(0.0, values[static_cast<std::size_t>(k)].second - h);
    double b = std::min(1.0, values[static_cast<std::size_t>(k)].second + h);
    double c = b - g * (b - a), d = a + g * (b - a), fc = prob(c), fd = prob(d);
    for (int it = 0; it < 60; ++it) {
      if (fc > fd) { b = d; d = c; fd = fc; c = b - g * (b - a); fc = prob(c); }
      else { a = c; c = d; fc = fd; d = a + g * (b - a); fd = prob(d); }
    }
    best = std::max({best, fc, fd});
  }
  return best;
}

}  // namespace

TestResult nsit_score_test(const CellCounts& counts, const LinearFunctional& s) {
  TestResult r;
  r.method = "score";
  const double est = s.estimate(counts);
  if (!std::isfinite(est)) throw DomainError("score test: a sequence of " + s.name + " has no shots");
  const double se0 = null_se(counts, s, 0.0);
  if (!(se0 > 0.0)) {
    r.statistic = 0.0;
    r.p_value = 1.0;
    r.note = "null variance is 0 (every shot in one cell)";
  } else {
    r.statistic = est / se0;
    r.p_value = 2.0 * upper_tail(std::abs(r.statistic));
  }
  return with_sigma(r, Sidedness::two_sided);
}

namespace {

// Shared argument checks of the exact unconditional tests, which enumerate all
// (n1 + 1)(n2 + 1) tables.
void check_exact_test_counts(const std::string& test, long x1, long n1, long x2, long n2) {
  if (n1 < 1 || n2 < 1 || x1 < 0 || x2 < 0 || x1 > n1 || x2 > n2)
    throw DomainError(test + " test: counts (" + std::to_string(x1) + "/" + std::to_string(n1) +
                      ", " + std::to_string(x2) + "/" + std::to_string(n2) +
                      ") must satisfy 0 <= x <= n, n >= 1");
  if (static_cast<double>(n1 + 1) * static_cast<double>(n2 + 1) > 4e6)
    throw UnsupportedError(test + " exact test: " + std::to_string(n1) + " x " +
                           std::to_string(n2) +
                           " shots is too large for the exact enumeration; use the score test");
}

}  // namespace

TestResult barnard_exact_test(long x1, long n1, long x2, long n2) {
  check_exact_test_counts("Barnard", x1, n1, x2, n2);
  auto wald = [&](long a, long b) {
    const double p1 = static_cast<double>(a) / n1, p2 = static_cast<double>(b) / n2;
    if (p1 == p2) return 0.0;
    const double p = static_cast<double>(a + b) / (n1 + n2);
    return (p1 - p2) / std::sqrt(p * (1.0 - p) * (1.0 / n1 + 1.0 / n2));
  };
  const double w_obs = std::abs(wald(x1, x2));
  // The rejection region, as (x1, x2) index pairs flattened per x1.
  std::vector<std::vector<long>> region(static_cast<std::size_t>(n1 + 1));
  for (long a = 0; a <= n1; ++a)
    for (long b = 0; b <= n2; ++b)
      if (std::abs(wald(a, b)) >= w_obs * (1.0 - 1e-12)) region[static_cast<std::size_t>(a)].push_back(b);
  const double best = max_null_probability(region, n1, n2);
  TestResult r;
  r.method = "barnard-exact";
  r.statistic = wald(x1, x2);
  r.p_value = best;
  return with_sigma(r, Sidedness::two_sided);
}

TestResult boschloo_exact_test(long x1, long n1, long x2, long n2) {
  check_exact_test_counts("Boschloo", x1, n1, x2, n2);
  // Fisher's one-sided p-values of every table given its margin s = a + b: the hypergeometric
  // tails P(X1 <= a | s) ("less") and P(X1 >= a | s) ("greater"). The pmf over a comes from
  // the ratio recurrence pmf(a + 1) / pmf(a) = (n1 - a)(s - a) / ((a + 1)(n2 - s + a + 1)),
  // normalised per s; tails are summed from their own end.
  const std::size_t w = static_cast<std::size_t>(n2 + 1);
  std::vector<double> less(static_cast<std::size_t>(n1 + 1) * w), greater(less.size());
  std::vector<double> pmf;
  for (long sm = 0; sm <= n1 + n2; ++sm) {
    const long lo = std::max(0L, sm - n2), hi = std::min(n1, sm);
    pmf.assign(static_cast<std::size_t>(hi - lo + 1), 0.0);
    double v = 1.0, total = 0.0;
    for (long a = lo; a <= hi; ++a) {
      pmf[static_cast<std::size_t>(a - lo)] = v;
      total += v;
      if (a < hi)
        v *= static_cast<double>(n1 - a) * static_cast<double>(sm - a) /
             (static_cast<double>(a + 1) * static_cast<double>(n2 - sm + a + 1));
      if (v > 1e250) {  // rescale to stay finite
        for (auto& q : pmf) q *= 1e-250;
        total *= 1e-250;
        v *= 1e-250;
      }
    }
    for (auto& q : pmf) q /= total;
    double run = 0.0;
    for (long a = lo; a <= hi; ++a) {
      run += pmf[static_cast<std::size_t>(a - lo)];
      less[static_cast<std::size_t>(a) * w + static_cast<std::size_t>(sm - a)] = std::min(1.0, run);
    }
    run = 0.0;
    for (long a = hi; a >= lo; --a) {
      run += pmf[static_cast<std::size_t>(a - lo)];
      greater[static_cast<std::size_t>(a) * w + static_cast<std::size_t>(sm - a)] = std::min(1.0, run);
    }
  }
  // One-sided Boschloo p-value: the largest null probability of the tables whose Fisher
  // p-value is at most the observed one (ties within 1e-12 relative count as extreme).
  auto one_sided = [&](const std::vector<double>& fisher, double& observed) {
    observed = fisher[static_cast<std::size_t>(x1) * w + static_cast<std::size_t>(x2)];
    std::vector<std::vector<long>> region(static_cast<std::size_t>(n1 + 1));
    for (long a = 0; a <= n1; ++a)
      for (long b = 0; b <= n2; ++b)
        if (fisher[static_cast<std::size_t>(a) * w + static_cast<std::size_t>(b)] <= observed * (1.0 + 1e-12))
          region[static_cast<std::size_t>(a)].push_back(b);
    return max_null_probability(region, n1, n2);
  };
  double f_less = 0.0, f_greater = 0.0;
  const double p_less = one_sided(less, f_less), p_greater = one_sided(greater, f_greater);
  TestResult r;
  r.method = "boschloo-exact";
  // As scipy.stats.boschloo_exact(alternative="two-sided"): twice the smaller one-sided
  // p-value, and the Fisher p-value of that side as the statistic.
  r.statistic = p_less < p_greater ? f_less : f_greater;
  r.p_value = std::min(1.0, 2.0 * std::min(p_less, p_greater));
  r.note = "two-sided: twice the smaller one-sided p-value";
  return with_sigma(r, Sidedness::two_sided);
}

TestResult nsit_hoeffding_test(const CellCounts& counts, const LinearFunctional& s) {
  const TestResult up = lg_hoeffding_test(counts, s, 0.0);  // H0: S <= 0
  LinearFunctional neg = s;
  for (auto& row : neg.coef)
    for (auto& c : row) c = -c;
  const TestResult down = lg_hoeffding_test(counts, neg, 0.0);  // H0: S >= 0
  TestResult r;
  r.method = "hoeffding";
  r.statistic = s.estimate(counts);
  r.p_value = std::min(1.0, 2.0 * std::min(up.p_value, down.p_value));
  r.note = "finite-sample bound (Hoeffding 1963) over the independent sequences, any readout; "
           "two-sided: twice the smaller one-sided bound";
  return with_sigma(r, Sidedness::two_sided);
}

BinomialArms nsit_binomial_arms(const CampaignCounts& counts, const std::string& from,
                                const std::string& to) {
  if (counts.readout == Readout::destructive)
    throw UnsupportedError("NSIT " + from + "->" + to +
                           ": under destructive readout sum_a P_AB(a, +) comes from two sequences "
                           "and is not one binomial, so no exact (Barnard / Boschloo) test applies; "
                           "the score test and the finite-sample Hoeffding bound do");
  BinomialArms arms;
  bool one = false, two = false;
  for (const auto& s : counts.sequences) {
    if (s.steps == std::vector<std::string>{to}) {
      one = true;
      for (std::size_t c = 0; c < s.cells.size(); ++c) {
        arms.n1 += static_cast<long>(s.counts[c]);
        if (s.cells[c][0] > 0) arms.x1 += static_cast<long>(s.counts[c]);
      }
    } else if (s.steps == std::vector<std::string>{from, to}) {
      two = true;
      for (std::size_t c = 0; c < s.cells.size(); ++c) {
        arms.n2 += static_cast<long>(s.counts[c]);
        if (s.cells[c].size() == 2 && s.cells[c][1] > 0) arms.x2 += static_cast<long>(s.counts[c]);
      }
    }
  }
  if (!one || !two)
    throw DomainError("NSIT " + from + "->" + to + ": needs run sequences of [" + to + "] and [" +
                      from + ", " + to + "]");
  return arms;
}

TestResult nsit_tost(const CellCounts& counts, const LinearFunctional& s, double margin) {
  if (!(margin > 0.0)) throw DomainError("TOST margin = " + std::to_string(margin) + ", but must be > 0");
  const double est = s.estimate(counts);
  if (!std::isfinite(est)) throw DomainError("TOST: a sequence of " + s.name + " has no shots");
  const double se_hi = null_se(counts, s, margin), se_lo = null_se(counts, s, -margin);
  // H0a: S >= margin (reject for small S^); H0b: S <= -margin (reject for large S^).
  const double p_hi = se_hi > 0.0 ? upper_tail((margin - est) / se_hi) : (est < margin ? 0.0 : 1.0);
  const double p_lo = se_lo > 0.0 ? upper_tail((est + margin) / se_lo) : (est > -margin ? 0.0 : 1.0);
  TestResult r;
  r.method = "tost";
  r.statistic = est;
  r.p_value = std::max(p_hi, p_lo);
  r.note = "equivalence |S| < " + std::to_string(margin) + " is concluded when p < alpha";
  return with_sigma(r, Sidedness::one_sided);  // the larger of two one-sided p-values
}

std::vector<TestResult> nsit_tests(const CampaignCounts& campaign, const std::string& from,
                                   const std::string& to, std::optional<double> margin) {
  const LinearFunctional s = nsit_functional(campaign, from, to);
  CellCounts counts;
  for (const auto& q : campaign.sequences) counts.push_back(q.counts);
  std::vector<TestResult> out{nsit_score_test(counts, s)};
  if (campaign.readout == Readout::nondestructive) {
    const BinomialArms a = nsit_binomial_arms(campaign, from, to);
    if (a.n1 > 0 && a.n2 > 0 && static_cast<double>(a.n1 + 1) * static_cast<double>(a.n2 + 1) <= 4e6)
    {
      out.push_back(barnard_exact_test(a.x1, a.n1, a.x2, a.n2));
      out.push_back(boschloo_exact_test(a.x1, a.n1, a.x2, a.n2));
    }
  }
  out.push_back(nsit_hoeffding_test(counts, s));
  if (margin) out.push_back(nsit_tost(counts, s, *margin));
  return out;
}

}  // namespace macroreal
