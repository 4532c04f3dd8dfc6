#include "stats/estimator_statistic.hpp"

#include <cmath>

#include "core/error.hpp"
#include "stats/linear_functional.hpp"

namespace macroreal {

CountStatistic estimator_statistic(const CampaignEstimator& estimator,
                                   const std::vector<std::string>& names) {
  std::vector<std::size_t> idx;
  if (names.empty()) {
    for (std::size_t i = 0; i < estimator.size(); ++i) idx.push_back(i);
  } else {
    for (const auto& n : names) {
      const int i = estimator.index_of(n);
      if (i < 0) throw DomainError("bootstrap statistic: no quantity named \"" + n + "\"");
      idx.push_back(static_cast<std::size_t>(i));
    }
  }
  CountStatistic s;
  s.size = idx.size();
  const CampaignEstimator* e = &estimator;
  s.evaluate = [e, idx](const CellCounts& c, std::vector<double>& out) {
    thread_local std::vector<double> all;
    e->evaluate(c, all);
    for (std::size_t q = 0; q < idx.size(); ++q) out[q] = all[idx[q]];
  };
  s.std_errors = [e, idx](const CellCounts& c, std::vector<double>& out) {
    const std::vector<double> se = e->delta_method_se(c);
    for (std::size_t q = 0; q < idx.size(); ++q) out[q] = se[idx[q]];
  };
  return s;
}

CountStatistic linear_statistic(const LinearFunctional& functional) {
  CountStatistic s;
  s.size = 1;
  auto f = std::make_shared<const LinearFunctional>(functional);
  s.evaluate = [f](const CellCounts& c, std::vector<double>& out) { out[0] = f->estimate(c); };
  s.std_errors = [f](const CellCounts& c, std::vector<double>& out) {
    // Plug-in variance at p = n / N (no smoothing: the usual delta-method SE).
    double var = 0.0;
    for (std::size_t h = 0; h < c.size(); ++h) {
      if (!f->uses(h)) continue;
      double n = 0.0, m1 = 0.0, m2 = 0.0;
      for (double x : c[h]) n += x;
      for (std::size_t j = 0; j < c[h].size(); ++j) {
        m1 += c[h][j] * f->coef[h][j];
        m2 += c[h][j] * f->coef[h][j] * f->coef[h][j];
      }
      m1 /= n;
      m2 /= n;
      var += std::max(0.0, m2 - m1 * m1) / n;
    }
    out[0] = std::sqrt(var);
  };
  return s;
}

}  // namespace macroreal
