#include "stats/multiplicity.hpp"

#include <algorithm>
#include <cmath>
#include <exception>
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

MaxStatisticResult max_statistic_calibration(const std::vector<ScanSetting>& settings,
                                             const ParametricBootstrapOptions& options) {
  if (settings.empty()) throw DomainError("max-statistic calibration: no settings");
  if (options.replicates < 1)
    throw DomainError("max-statistic replicates = " + std::to_string(options.replicates) +
                      ", but must be >= 1");
  const std::size_t K = settings.size();
  MaxStatisticResult r;
  r.replicates = options.replicates;
  r.seed = options.seed;
  std::vector<CellCounts> null_p(K);
  for (std::size_t k = 0; k < K; ++k) {
    const auto& s = settings[k];
    const double est = s.statistic.estimate(s.counts);
    if (!std::isfinite(est)) throw DomainError("max-statistic: setting " + std::to_string(k) + " has a sequence with no shots");
    r.statistic.push_back((est - s.bound) / s.statistic.smoothed_se(s.counts));
    null_p[k] = constrained_fit(s.counts, s.statistic, s.bound, options.pseudo_count).probabilities;
  }
  const long B = options.replicates;
  std::vector<double> maxima(static_cast<std::size_t>(B));
  constexpr long kBlock = 256;
  const long blocks = (B + kBlock - 1) / kBlock;
  const int threads = options.threads > 0 ? options.threads : omp_get_max_threads();
  std::exception_ptr failure;
#pragma omp parallel num_threads(threads)
  {
    std::vector<CellCounts> draw(K);
    for (std::size_t k = 0; k < K; ++k) draw[k] = settings[k].counts;
#pragma omp for schedule(static)
    for (long blk = 0; blk < blocks; ++blk) {
      try {
        RandomEngine g(derive_seed(options.seed, static_cast<std::uint64_t>(blk)));
        for (long b = blk * kBlock; b < std::min(B, (blk + 1) * kBlock); ++b) {
          double mx = -std::numeric_limits<double>::infinity();
          for (std::size_t k = 0; k < K; ++k) {
            const auto& s = settings[k];
            simulate_counts(g, null_p[k], s.counts, draw[k]);
            mx = std::max(mx, (s.statistic.estimate(draw[k]) - s.bound) / s.statistic.smoothed_se(draw[k]));
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
  r.sigma_largest = gaussian_sigma(r.p_largest);
  return r;
}

}  // namespace macroreal
