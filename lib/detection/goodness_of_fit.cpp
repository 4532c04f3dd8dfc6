#include "detection/goodness_of_fit.hpp"

#include <cmath>
#include <limits>

#include <boost/math/distributions/chi_squared.hpp>

namespace macroreal {

namespace {

// Adds one group's pooled bins to the statistics. `p` is the model pmf for n = 0..p.size()-1,
// where p.size() exceeds the histogram length; the tail beyond is 1 - sum.
void add_group(const std::vector<long>& h, const std::vector<double>& p, GoodnessOfFit& g) {
  const long shots = histogram_shots(h);
  if (shots == 0) return;
  const double N = static_cast<double>(shots);
  std::vector<std::pair<double, double>> bins;  // (observed, expected)
  double o = 0, e = 0, used_p = 0;
  for (std::size_t n = 0; n < h.size(); ++n) {
    o += static_cast<double>(h[n]);
    e += N * p[n];
    used_p += p[n];
    if (e >= 5) {
      bins.emplace_back(o, e);
      o = e = 0;
    }
  }
  // Open tail n >= h.size(): nothing observed there, the rest of the expected mass.
  e += N * std::max(0.0, 1 - used_p);
  if (e >= 5 || bins.empty()) bins.emplace_back(o, e);
  else { bins.back().first += o; bins.back().second += e; }
  for (auto [obs, exp] : bins) {
    if (exp <= 0) continue;
    g.pearson += (obs - exp) * (obs - exp) / exp;
    if (obs > 0) g.g_statistic += 2 * obs * std::log(obs / exp);
  }
  // G over pooled bins with equal totals: 2 sum O ln(O/E) (the sum of O - E vanishes).
  g.bins += static_cast<int>(bins.size());
  g.df += static_cast<int>(bins.size()) - 1;
}

}  // namespace

GoodnessOfFit goodness_of_fit(const CountHistograms& h, const MixtureFit& fit) {
  GoodnessOfFit g;
  const long n_max = static_cast<long>(std::max({h.dark.size(), h.bright.size(), h.unknown.size()}));
  const auto pd = dark_pmf(fit.model, n_max);
  const auto pb = bright_pmf(fit.model, n_max);
  std::vector<double> pu(pd.size());
  for (std::size_t n = 0; n < pd.size(); ++n)
    pu[n] = (1 - fit.bright_fraction) * pd[n] + fit.bright_fraction * pb[n];
  add_group(h.dark, pd, g);
  add_group(h.bright, pb, g);
  add_group(h.unknown, pu, g);
  // Each group's total is fixed by design; the unknown group's w is one of the fitted
  // parameters, the two rates the others.
  g.df -= fit.free_parameters;
  if (g.df >= 1) {
    const boost::math::chi_squared_distribution<double> chi(g.df);
    g.pearson_p = boost::math::cdf(boost::math::complement(chi, g.pearson));
    g.g_p = boost::math::cdf(boost::math::complement(chi, std::max(0.0, g.g_statistic)));
  } else {
    g.pearson_p = g.g_p = std::numeric_limits<double>::quiet_NaN();
  }
  return g;
}

}  // namespace macroreal
