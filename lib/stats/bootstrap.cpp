#include "stats/bootstrap.hpp"

#include <algorithm>
#include <cmath>
#include <exception>
#include <limits>
#include <omp.h>

#include <boost/math/distributions/normal.hpp>

#include "core/error.hpp"

namespace macroreal {

namespace {

constexpr long kBlock = 256;  // replicates per engine stream (thread-count independent)
const double kNaN = std::numeric_limits<double>::quiet_NaN();

double phi(double z) { return 0.5 * std::erfc(-z / std::sqrt(2.0)); }
double phi_inv(double p) {
  if (p <= 0.0) return -std::numeric_limits<double>::infinity();
  if (p >= 1.0) return std::numeric_limits<double>::infinity();
  return boost::math::quantile(boost::math::normal_distribution<double>(), p);
}

void check_counts(const CellCounts& c) {
  if (c.empty()) throw DomainError("bootstrap: no sequences in the counts");
  for (std::size_t h = 0; h < c.size(); ++h) {
    if (c[h].empty()) throw DomainError("bootstrap: sequence " + std::to_string(h) + " has no cells");
    for (double x : c[h])
      if (!(x >= 0.0) || x != std::floor(x) || x > 9.0e15)
        throw DomainError("bootstrap: count = " + std::to_string(x) +
                          ", but must be a non-negative integer");
  }
}

void set_envelope(BootstrapQuantity& r) {
  bool any = false;
  for (const Interval* iv : {&r.percentile, &r.basic, &r.studentized, &r.bca}) {
    if (!iv->valid) continue;
    if (!any) r.envelope = *iv;
    r.envelope.lo = std::min(r.envelope.lo, iv->lo);
    r.envelope.hi = std::max(r.envelope.hi, iv->hi);
    any = true;
  }
  r.envelope.valid = any;
}

}  // namespace

std::string to_string(IntervalMethod m) {
  switch (m) {
    case IntervalMethod::percentile: return "percentile";
    case IntervalMethod::basic: return "basic";
    case IntervalMethod::studentized: return "studentized";
    case IntervalMethod::bca: return "bca";
    case IntervalMethod::envelope: return "envelope";
  }
  return "?";
}

IntervalMethod parse_interval_method(const std::string& s) {
  for (auto m : {IntervalMethod::percentile, IntervalMethod::basic, IntervalMethod::studentized,
                 IntervalMethod::bca, IntervalMethod::envelope})
    if (s == to_string(m)) return m;
  throw DomainError("interval method = \"" + s +
                    "\", but must be one of percentile, basic, studentized, bca, envelope");
}

std::string to_string(BootstrapStatus s) {
  switch (s) {
    case BootstrapStatus::ok: return "ok";
    case BootstrapStatus::degenerate: return "degenerate";
    case BootstrapStatus::non_finite: return "non_finite";
    case BootstrapStatus::partly_non_finite: return "partly_non_finite";
  }
  return "?";
}

void BootstrapOptions::validate() const {
  if (replicates < 2)
    throw DomainError("bootstrap replicates = " + std::to_string(replicates) + ", but must be >= 2");
  if (!(level > 0.0 && level < 1.0))
    throw DomainError("bootstrap level = " + std::to_string(level) + ", but must be in (0, 1)");
  if (!(smoothing >= 0.0) || !std::isfinite(smoothing))
    throw DomainError("bootstrap smoothing = " + std::to_string(smoothing) + ", but must be >= 0");
  if (threads < 0)
    throw DomainError("bootstrap threads = " + std::to_string(threads) + ", but must be >= 0");
}

const Interval& BootstrapQuantity::interval(IntervalMethod m) const {
  switch (m) {
    case IntervalMethod::percentile: return percentile;
    case IntervalMethod::basic: return basic;
    case IntervalMethod::studentized: return studentized;
    case IntervalMethod::bca: return bca;
    case IntervalMethod::envelope: return envelope;
  }
  return bca;
}

double empirical_quantile(const std::vector<double>& sorted, double x) {
  MACROREAL_CHECK(!sorted.empty());
  const double h = (static_cast<double>(sorted.size()) - 1.0) * std::clamp(x, 0.0, 1.0);
  const std::size_t lo = static_cast<std::size_t>(std::floor(h));
  if (lo + 1 >= sorted.size()) return sorted.back();
  const double a = sorted[lo], b = sorted[lo + 1], f = h - static_cast<double>(lo);
  if (f == 0.0 || a == b) return a;
  if (std::isinf(a)) return a;  // -inf below: the quantile is unbounded
  if (std::isinf(b)) return b;
  return a + f * (b - a);
}

void resample_counts(RandomEngine& g, const CellCounts& observed, CellCounts& out) {
  resample_counts(g, observed, observed, out);
}

void resample_counts(RandomEngine& g, const CellCounts& weights, const CellCounts& shots_of,
                     CellCounts& out) {
  for (std::size_t h = 0; h < weights.size(); ++h) {
    double n = 0.0;
    for (double x : shots_of[h]) n += x;
    multinomial(g, static_cast<long>(n), weights[h], out[h]);
  }
}

std::vector<double> jackknife_acceleration(const CellCounts& observed,
                                           const CountStatistic& statistic) {
  const std::size_t m = statistic.size;
  std::vector<double> num(m, 0.0), den(m, 0.0), value(m), tbar(m);
  CellCounts work = observed;
  std::vector<std::vector<double>> loo;  // leave-one-out values per non-empty cell of a stratum
  for (std::size_t h = 0; h < observed.size(); ++h) {
    double n = 0.0;
    for (double x : observed[h]) n += x;
    if (n < 2.0) continue;  // a stratum of one shot has no jackknife (U = 0)
    loo.assign(observed[h].size(), std::vector<double>(m, kNaN));
    std::fill(tbar.begin(), tbar.end(), 0.0);
    for (std::size_t j = 0; j < observed[h].size(); ++j) {
      if (observed[h][j] <= 0.0) continue;
      work[h][j] -= 1.0;
      statistic.evaluate(work, value);
      work[h][j] += 1.0;
      loo[j] = value;
      for (std::size_t q = 0; q < m; ++q) tbar[q] += observed[h][j] * value[q] / n;
    }
    for (std::size_t j = 0; j < observed[h].size(); ++j) {
      const double w = observed[h][j];
      if (w <= 0.0) continue;
      for (std::size_t q = 0; q < m; ++q) {
        const double u = (n - 1.0) * (tbar[q] - loo[j][q]);
        num[q] += w * u * u * u / (n * n * n);
        den[q] += w * u * u / (n * n);
      }
    }
  }
  std::vector<double> a(m);
  for (std::size_t q = 0; q < m; ++q)
    a[q] = (den[q] > 0.0 && std::isfinite(den[q])) ? num[q] / (6.0 * std::pow(den[q], 1.5)) : kNaN;
  return a;
}

BootstrapResult stratified_bootstrap(const CellCounts& observed, const CountStatistic& statistic,
                                     const BootstrapOptions& options) {
  options.validate();
  check_counts(observed);
  if (!statistic.evaluate || statistic.size == 0)
    throw DomainError("bootstrap: the statistic has no evaluate function or no values");
  const std::size_t m = statistic.size;
  const long B = options.replicates;
  const bool want_t = options.studentized && static_cast<bool>(statistic.std_errors);

  BootstrapResult result;
  result.seed = options.seed;
  result.replicates = B;
  result.level = options.level;
  result.smoothing = options.smoothing;
  result.quantities.resize(m);

  std::vector<double> t(m), se(m, kNaN), t0(m);
  statistic.evaluate(observed, t);
  // The resampling distribution (smoothed or not) and the statistic's value in it.
  const double c = options.smoothing;
  CellCounts weights = observed, centre = observed;
  for (std::size_t h = 0; h < observed.size(); ++h) {
    double n = 0.0;
    for (double x : observed[h]) n += x;
    const double scale = n / (n + c * static_cast<double>(observed[h].size()));
    for (std::size_t j = 0; j < observed[h].size(); ++j) {
      weights[h][j] = observed[h][j] + c;
      centre[h][j] = (observed[h][j] + c) * scale;  // same shots, smoothed proportions
    }
  }
  if (c > 0.0) statistic.evaluate(centre, t0); else t0 = t;
  // SEs at counts + c (c = 0: the plain delta-method SE).
  auto std_errors_at = [&](const CellCounts& counts, CellCounts& work, std::vector<double>& out) {
    if (c == 0.0) { statistic.std_errors(counts, out); return; }
    for (std::size_t h = 0; h < counts.size(); ++h)
      for (std::size_t j = 0; j < counts[h].size(); ++j) work[h][j] = counts[h][j] + c;
    statistic.std_errors(work, out);
  };
  if (statistic.std_errors) {
    CellCounts work = observed;
    std_errors_at(observed, work, se);
  }

  // Replicates: value q of replicate b at reps[q * B + b] (and its SE for bootstrap-t).
  std::vector<double> reps(static_cast<std::size_t>(m) * B), rep_se;
  if (want_t) rep_se.resize(static_cast<std::size_t>(m) * B);
  const long blocks = (B + kBlock - 1) / kBlock;
  const int threads = options.threads > 0 ? options.threads : omp_get_max_threads();
  std::exception_ptr failure;
#pragma omp parallel num_threads(threads)
  {
    CellCounts draw = observed, work = observed;
    std::vector<double> v(m), s(m);
#pragma omp for schedule(static)
    for (long blk = 0; blk < blocks; ++blk) {
      try {
        RandomEngine g(derive_seed(options.seed, static_cast<std::uint64_t>(blk)));
        const long end = std::min(B, (blk + 1) * kBlock);
        for (long b = blk * kBlock; b < end; ++b) {
          resample_counts(g, weights, observed, draw);
          statistic.evaluate(draw, v);
          // Recentred replicate: t* - t0 + t (identity when not smoothing).
          for (std::size_t q = 0; q < m; ++q) reps[q * B + b] = c > 0.0 ? v[q] - t0[q] + t[q] : v[q];
          if (want_t) {
            std_errors_at(draw, work, s);
            for (std::size_t q = 0; q < m; ++q) rep_se[q * B + b] = s[q];
          }
        }
      } catch (...) {
#pragma omp critical(macroreal_bootstrap_failure)
        if (!failure) failure = std::current_exception();
      }
    }
  }
  if (failure) std::rethrow_exception(failure);

  const bool need_a = options.bca;
  const std::vector<double> accel =
      need_a ? jackknife_acceleration(observed, statistic) : std::vector<double>(m, kNaN);
  const double alpha = 0.5 * (1.0 - options.level);
  const double z_lo = phi_inv(alpha), z_hi = -z_lo;

  std::vector<double> sorted, tsorted;
  for (std::size_t q = 0; q < m; ++q) {
    BootstrapQuantity& r = result.quantities[q];
    r.estimate = t[q];
    r.std_error = se[q];
    r.smoothed_centre = t0[q];
    r.default_method = options.default_method;
    if (options.keep_replicates) r.replicates.assign(reps.begin() + q * B, reps.begin() + (q + 1) * B);
    if (!std::isfinite(t[q])) {
      r.status = BootstrapStatus::non_finite;
      r.note = "the estimate is not finite";
      continue;
    }
    sorted.clear();
    for (long b = 0; b < B; ++b)
      if (std::isfinite(reps[q * B + b])) sorted.push_back(reps[q * B + b]);
    r.finite_replicates = static_cast<long>(sorted.size());
    if (sorted.size() < 2) {
      r.status = BootstrapStatus::non_finite;
      r.note = "fewer than 2 finite replicates";
      continue;
    }
    if (r.finite_replicates < B) {
      r.status = BootstrapStatus::partly_non_finite;
      r.note = std::to_string(B - r.finite_replicates) + " replicates not finite, dropped";
    }
    std::sort(sorted.begin(), sorted.end());
    const double nb = static_cast<double>(sorted.size());
    double mean = 0.0;
    for (double x : sorted) mean += x;
    mean /= nb;
    double ss = 0.0;
    for (double x : sorted) ss += (x - mean) * (x - mean);
    r.bootstrap_se = std::sqrt(ss / (nb - 1.0));
    r.bootstrap_bias = mean - t[q];

    if (sorted.front() == sorted.back() && sorted.front() == t[q]) {
      // No variation at all (e.g. every sequence sits in one cell): every interval is the point.
      r.status = BootstrapStatus::degenerate;
      r.note = "every replicate equals the estimate; intervals collapse to a point";
      const Interval point{t[q], t[q], true};
      if (options.percentile) r.percentile = point;
      if (options.basic) r.basic = point;
      if (want_t) r.studentized = point;
      if (options.bca) r.bca = point;
      set_envelope(r);
      continue;
    }
    const double q_lo = empirical_quantile(sorted, alpha), q_hi = empirical_quantile(sorted, 1.0 - alpha);
    if (options.percentile) r.percentile = {q_lo, q_hi, true};
    if (options.basic) r.basic = {2.0 * t[q] - q_hi, 2.0 * t[q] - q_lo, true};

    if (options.studentized && !want_t) r.note += (r.note.empty() ? "" : "; ") +
                                                  std::string("studentized: the statistic gives no standard errors");
    if (want_t) {
      tsorted.clear();
      for (long b = 0; b < B; ++b) {
        const double x = reps[q * B + b], s = rep_se[q * B + b];
        if (!std::isfinite(x)) continue;
        if (x == t[q]) tsorted.push_back(0.0);
        else if (s > 0.0 && std::isfinite(s)) tsorted.push_back((x - t[q]) / s);
        else tsorted.push_back(x > t[q] ? std::numeric_limits<double>::infinity()
                                        : -std::numeric_limits<double>::infinity());
      }
      std::sort(tsorted.begin(), tsorted.end());
      if (std::isfinite(se[q]) && tsorted.size() >= 2) {
        const double lo = t[q] - se[q] * empirical_quantile(tsorted, 1.0 - alpha);
        const double hi = t[q] - se[q] * empirical_quantile(tsorted, alpha);
        r.studentized = {se[q] > 0.0 ? lo : t[q], se[q] > 0.0 ? hi : t[q], true};
        if (!std::isfinite(lo) || !std::isfinite(hi))
          r.note += (r.note.empty() ? "" : "; ") +
                    std::string("studentized: infinite endpoint (replicates with zero SE)");
      } else {
        r.note += (r.note.empty() ? "" : "; ") + std::string("studentized: SE of the estimate undefined");
      }
    }

    if (options.bca) {
      long below = 0, at_or_below = 0;
      for (double x : sorted) {
        below += (x < t[q]);
        at_or_below += (x <= t[q]);
      }
      r.z0 = phi_inv(static_cast<double>(below + at_or_below) / (2.0 * nb));
      double a = accel[q];
      if (!std::isfinite(a)) {
        a = 0.0;
        r.note += (r.note.empty() ? "" : "; ") + std::string("bca: jackknife gives no acceleration, a = 0");
      }
      r.acceleration = a;
      if (!std::isfinite(r.z0)) {
        r.note += (r.note.empty() ? "" : "; ") +
                  std::string("bca: the estimate lies outside the replicate range (z0 infinite)");
      } else {
        const double n1 = r.z0 + z_lo, n2 = r.z0 + z_hi;
        const double d1 = 1.0 - a * n1, d2 = 1.0 - a * n2;
        if (d1 <= 0.0 || d2 <= 0.0) {
          r.note += (r.note.empty() ? "" : "; ") + std::string("bca: acceleration too large");
        } else {
          const double a1 = phi(r.z0 + n1 / d1), a2 = phi(r.z0 + n2 / d2);
          r.bca = {empirical_quantile(sorted, a1), empirical_quantile(sorted, a2), true};
        }
      }
    }
    set_envelope(r);
  }
  return result;
}

}  // namespace macroreal
