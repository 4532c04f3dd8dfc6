#include "stats/multiplicity.hpp"

#include <algorithm>
#include <cmath>
#include <exception>
#include <limits>
#include <numeric>
#include <omp.h>

#include "core/error.hpp"

namespace macroreal {

namespace {

std::vector<std::size_t> order_of(const std::vector<double>& p) {
  for (double x : p)
    if (!(x >= 0.0 && x <= 1.0))
      throw DomainError("p-value = " + std::to_string(x) + ", but must be in [0, 1]");
  std::vector<std::size_t> idx(p.size());
  std::iota(idx.begin(), idx.end(), std::size_t{0});
  std::stable_sort(idx.begin(), idx.end(), [&](std::size_t a, std::size_t b) { return p[a] < p[b]; });
  return idx;
}

}  // namespace

std::vector<double> holm_adjust(const std::vector<double>& p) {
  const auto idx = order_of(p);
  const double m = static_cast<double>(p.size());
  std::vector<double> out(p.size());
  double running = 0.0;
  for (std::size_t i = 0; i < idx.size(); ++i) {
    running = std::max(running, std::min(1.0, (m - static_cast<double>(i)) * p[idx[i]]));
    out[idx[i]] = running;
  }
  return out;
}

std::vector<double> benjamini_hochberg_adjust(const std::vector<double>& p) {
  const auto idx = order_of(p);
  const double m = static_cast<double>(p.size());
  std::vector<double> out(p.size());
  double running = 1.0;
  for (std::size_t r = idx.size(); r-- > 0;) {
    running = std::min(running, std::min(1.0, m * p[idx[r]] / static_cast<double>(r + 1)));
    out[idx[r]] = running;
  }
  return out;
}

JointScan stack_settings(const std::vector<ScanSetting>& settings) {
  JointScan j;
  for (const auto& s : settings) {
    if (s.statistic.coef.size() != s.counts.size())
      throw DomainError("max-statistic: a setting's statistic does not match its counts");
    j.counts.insert(j.counts.end(), s.counts.begin(), s.counts.end());
  }
  std::size_t offset = 0;
  for (const auto& s : settings) {
    LinearFunctional f;
    f.name = s.statistic.name;
    for (std::size_t q = 0; q < j.counts.size(); ++q)
      f.coef.push_back(q >= offset && q < offset + s.counts.size() ? s.statistic.coef[q - offset]
                                                                    : std::vector<double>(j.counts[q].size(), 0.0));
    offset += s.counts.size();
    j.statistics.push_back(std::move(f));
    j.bounds.push_back(s.bound);
  }
  return j;
}

MaxStatisticResult max_statistic_calibration(const std::vector<ScanSetting>& settings,
                                             const ParametricBootstrapOptions& options) {
  if (settings.empty()) throw DomainError("max-statistic calibration: no settings");
  return max_statistic_calibration(stack_settings(settings), options);
}

MaxStatisticResult max_statistic_calibration(const JointScan& scan,
                                             const ParametricBootstrapOptions& options) {
  if (scan.statistics.empty()) throw DomainError("max-statistic calibration: no statistics");
  if (scan.bounds.size() != scan.statistics.size())
    throw DomainError("max-statistic calibration: one bound per statistic is needed");
  if (options.replicates < 1)
    throw DomainError("max-statistic replicates = " + std::to_string(options.replicates) +
                      ", but must be >= 1");
  const std::size_t K = scan.statistics.size();
  MaxStatisticResult r;
  r.replicates = options.replicates;
  r.seed = options.seed;
  std::vector<double> centre(K);
  for (std::size_t k = 0; k < K; ++k) {
    const auto& f = scan.statistics[k];
    if (f.coef.size() != scan.counts.size())
      throw DomainError("max-statistic: statistic " + std::to_string(k) + " does not match the campaign");
    const double est = f.estimate(scan.counts);
    if (!std::isfinite(est))
      throw DomainError("max-statistic: statistic " + std::to_string(k) + " has a sequence with no shots");
    centre[k] = est;
    r.statistic.push_back((est - scan.bounds[k]) / f.smoothed_se(scan.counts));
  }
  const long B = options.replicates;
  std::vector<double> maxima(static_cast<std::size_t>(B));
  constexpr long kBlock = 256;
  const long blocks = (B + kBlock - 1) / kBlock;
  const int threads = options.threads > 0 ? options.threads : omp_get_max_threads();
  std::exception_ptr failure;
#pragma omp parallel num_threads(threads)
  {
    CellCounts draw = scan.counts;
#pragma omp for schedule(static)
    for (long blk = 0; blk < blocks; ++blk) {
      try {
        RandomEngine g(derive_seed(options.seed, static_cast<std::uint64_t>(blk)));
        for (long b = blk * kBlock; b < std::min(B, (blk + 1) * kBlock); ++b) {
          resample_counts(g, scan.counts, draw);  // one resample of the whole campaign
          double mx = -std::numeric_limits<double>::infinity();
          for (std::size_t k = 0; k < K; ++k) {
            const auto& f = scan.statistics[k];
            mx = std::max(mx, (f.estimate(draw) - centre[k]) / f.smoothed_se(draw));
          }
          maxima[static_cast<std::size_t>(b)] = mx;
        }
      } catch (...) {
#pragma omp critical(macroreal_maxt_failure)
        if (!failure) failure = std::current_exception();
      }
    }
  }
  if (failure) std::rethrow_exception(failure);
  std::sort(maxima.begin(), maxima.end());
  for (std::size_t k = 0; k < K; ++k) {
    const auto first = std::lower_bound(maxima.begin(), maxima.end(), r.statistic[k]);
    const double exceed = static_cast<double>(maxima.end() - first);
    r.adjusted_p.push_back((1.0 + exceed) / (static_cast<double>(B) + 1.0));
  }
  r.largest = static_cast<std::size_t>(std::max_element(r.statistic.begin(), r.statistic.end()) -
                                       r.statistic.begin());
  r.p_largest = r.adjusted_p[r.largest];
  r.sigma_largest = gaussian_sigma(r.p_largest, Sidedness::one_sided);  // maxT: upper tail
  return r;
}

}  // namespace macroreal
