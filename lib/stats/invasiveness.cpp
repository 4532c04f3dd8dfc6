#include "stats/invasiveness.hpp"

#include <cmath>

#include <boost/math/distributions/normal.hpp>

#include "core/error.hpp"

namespace macroreal {

namespace {
double z_upper(double tail) {
  return boost::math::quantile(boost::math::complement(boost::math::normal_distribution<double>(), tail));
}
}  // namespace

InvasivenessBound invasiveness_bound(const std::vector<std::string>& order, double k_estimate,
                                     double k_std_error, const std::vector<NsitControl>& controls,
                                     double level) {
  if (order.size() < 3)
    throw DomainError("invasiveness bound: LG order has " + std::to_string(order.size()) +
                      " measurements, but needs at least 3");
  if (!(level > 0.0 && level < 1.0))
    throw DomainError("invasiveness bound: level = " + std::to_string(level) + ", but must be in (0, 1)");
  if (!std::isfinite(k_estimate) || !(k_std_error >= 0.0) || !std::isfinite(k_std_error))
    throw DomainError("invasiveness bound: K and its standard error must be finite (SE >= 0)");
  std::vector<std::pair<std::string, std::string>> pairs;
  for (std::size_t k = 0; k + 1 < order.size(); ++k) pairs.emplace_back(order[k], order[k + 1]);
  pairs.emplace_back(order.front(), order.back());

  InvasivenessBound r;
  r.level = level;
  r.base = static_cast<double>(order.size()) - 2.0;
  r.k_estimate = k_estimate;
  const double alpha = 1.0 - level;
  const double m = static_cast<double>(pairs.size());
  const double z_s = z_upper(alpha / (4.0 * m));
  r.bound = r.bound_upper = r.base;
  for (const auto& [i, j] : pairs) {
    const NsitControl* c = nullptr;
    for (const auto& x : controls)
      if (x.from == i && x.to == j) c = &x;
    if (!c) throw DomainError("invasiveness bound: no NSIT control " + i + "->" + j + " for the LG order");
    if (!std::isfinite(c->estimate) || !(c->std_error >= 0.0) || !std::isfinite(c->std_error))
      throw DomainError("invasiveness bound: NSIT " + i + "->" + j + " estimate/SE must be finite (SE >= 0)");
    const double up = std::abs(c->estimate) + z_s * c->std_error;
    r.pairs.push_back(i + "->" + j);
    r.s_upper.push_back(up);
    r.bound += 2.0 * std::abs(c->estimate);
    r.bound_upper += 2.0 * up;
  }
  r.k_lower = k_estimate - z_upper(alpha / 2.0) * k_std_error;
  r.exceeds = r.k_lower > r.bound_upper;
  r.assumption = kInvasivenessAssumption;
  return r;
}

}  // namespace macroreal
