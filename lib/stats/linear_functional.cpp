#include "stats/linear_functional.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "core/error.hpp"

namespace macroreal {

namespace {

const double kNaN = std::numeric_limits<double>::quiet_NaN();

double shots(const std::vector<double>& c) {
  double n = 0.0;
  for (double x : c) n += x;
  return n;
}

LinearFunctional zero_like(const CampaignCounts& layout) {
  LinearFunctional f;
  for (const auto& s : layout.sequences) f.coef.emplace_back(s.counts.size(), 0.0);
  return f;
}

// Adds weight * P_ij(a, b) (for every a, b with sign_fn(a, b) != 0) using the sequences of
// [i, j]. weight_fn(a, b) gives the coefficient of P_ij(a, b).
template <class F>
void add_pair(LinearFunctional& f, const CampaignCounts& layout, const std::string& i,
              const std::string& j, F weight_fn) {
  const std::vector<std::string> want{i, j};
  for (int a : {+1, -1}) {
    // The sequences that observe the branch A = a (destructive: first dark sign a).
    std::vector<std::size_t> group;
    double total = 0.0;
    for (std::size_t s = 0; s < layout.sequences.size(); ++s) {
      const auto& sq = layout.sequences[s];
      if (sq.steps != want) continue;
      if (layout.readout == Readout::destructive && (sq.dark_is.empty() || sq.dark_is[0] != a)) continue;
      group.push_back(s);
      total += sq.counts.empty() ? 0.0 : shots(sq.counts);
    }
    if (group.empty())
      throw DomainError("no run sequence of steps [" + i + ", " + j + "]" +
                        (layout.readout == Readout::destructive
                             ? std::string(" continuing on ") + (a > 0 ? "+" : "-") + " at " + i
                             : std::string()));
    for (std::size_t s : group) {
      const auto& sq = layout.sequences[s];
      // Several sequences of one branch are combined in proportion to their shots (equal
      // shares when the layout carries no counts yet).
      const double n_s = shots(sq.counts);
      const double share = total > 0.0 ? n_s / total : 1.0 / static_cast<double>(group.size());
      for (std::size_t c = 0; c < sq.cells.size(); ++c) {
        const auto& o = sq.cells[c];
        if (o.size() != 2 || o[0] != a) continue;
        f.coef[s][c] += share * weight_fn(a, o[1]);
      }
    }
  }
}

}  // namespace

double LinearFunctional::estimate(const CellCounts& counts) const {
  MACROREAL_CHECK(counts.size() == coef.size());
  double v = 0.0;
  for (std::size_t s = 0; s < coef.size(); ++s) {
    if (!uses(s)) continue;
    const double n = shots(counts[s]);
    if (!(n > 0.0)) return kNaN;
    double t = 0.0;
    for (std::size_t j = 0; j < coef[s].size(); ++j) t += coef[s][j] * counts[s][j];
    v += t / n;
  }
  return v;
}

double LinearFunctional::value_at(const CellCounts& p) const {
  double v = 0.0;
  for (std::size_t s = 0; s < coef.size(); ++s)
    for (std::size_t j = 0; j < coef[s].size(); ++j) v += coef[s][j] * p[s][j];
  return v;
}

double LinearFunctional::variance_at(const CellCounts& p, const CellCounts& counts) const {
  double var = 0.0;
  for (std::size_t s = 0; s < coef.size(); ++s) {
    if (!uses(s)) continue;
    const double n = shots(counts[s]);
    if (!(n > 0.0)) return kNaN;
    double m1 = 0.0, m2 = 0.0;
    for (std::size_t j = 0; j < coef[s].size(); ++j) {
      m1 += p[s][j] * coef[s][j];
      m2 += p[s][j] * coef[s][j] * coef[s][j];
    }
    var += std::max(0.0, m2 - m1 * m1) / n;
  }
  return var;
}

double LinearFunctional::smoothed_se(const CellCounts& counts) const {
  CellCounts p = counts;
  for (std::size_t s = 0; s < counts.size(); ++s) {
    const double n = shots(counts[s]) + 0.5 * static_cast<double>(counts[s].size());
    for (std::size_t j = 0; j < counts[s].size(); ++j) p[s][j] = (counts[s][j] + 0.5) / n;
  }
  return std::sqrt(variance_at(p, counts));
}

double LinearFunctional::shot_range(std::size_t s) const {
  const auto [lo, hi] = std::minmax_element(coef[s].begin(), coef[s].end());
  return *hi - *lo;
}

bool LinearFunctional::uses(std::size_t s) const {
  for (double c : coef[s])
    if (c != 0.0) return true;
  return false;
}

double LinearFunctional::min_value() const {
  double v = 0.0;
  for (const auto& c : coef)
    if (!c.empty()) v += *std::min_element(c.begin(), c.end());
  return v;
}

double LinearFunctional::max_value() const {
  double v = 0.0;
  for (const auto& c : coef)
    if (!c.empty()) v += *std::max_element(c.begin(), c.end());
  return v;
}

LinearFunctional correlator_functional(const CampaignCounts& layout, const std::string& i,
                                       const std::string& j) {
  LinearFunctional f = zero_like(layout);
  f.name = "C[" + i + j + "]";
  add_pair(f, layout, i, j, [](int a, int b) { return static_cast<double>(a * b); });
  return f;
}

LinearFunctional lg_functional(const CampaignCounts& layout, const std::vector<std::string>& order) {
  if (order.size() < 3)
    throw DomainError("Leggett-Garg order has " + std::to_string(order.size()) +
                      " measurements, but needs at least 3");
  LinearFunctional f = zero_like(layout);
  f.name = "K[";
  for (const auto& m : order) f.name += m;
  f.name += "]";
  auto add = [&](const std::string& i, const std::string& j, double sign) {
    add_pair(f, layout, i, j, [sign](int a, int b) { return sign * a * b; });
  };
  for (std::size_t k = 0; k + 1 < order.size(); ++k) add(order[k], order[k + 1], +1.0);
  add(order.front(), order.back(), -1.0);
  return f;
}

LinearFunctional nsit_functional(const CampaignCounts& layout, const std::string& from,
                                 const std::string& to) {
  if (from == to) throw DomainError("NSIT from = to = " + from + ", but they must differ");
  LinearFunctional f = zero_like(layout);
  f.name = "S[" + from + "->" + to + "]";
  bool found = false;
  for (std::size_t s = 0; s < layout.sequences.size(); ++s) {
    const auto& sq = layout.sequences[s];
    if (sq.steps != std::vector<std::string>{to}) continue;
    found = true;
    for (std::size_t c = 0; c < sq.cells.size(); ++c)
      if (sq.cells[c] == OutcomeString{+1}) f.coef[s][c] = 1.0;
  }
  if (!found) throw DomainError("no run sequence of steps [" + to + "] (NSIT " + from + "->" + to + ")");
  // Several [B] sequences: share in proportion to shots.
  double total = 0.0;
  int count = 0;
  for (std::size_t s = 0; s < layout.sequences.size(); ++s)
    if (f.uses(s)) { total += shots(layout.sequences[s].counts); ++count; }
  for (std::size_t s = 0; s < layout.sequences.size(); ++s)
    if (f.uses(s))
      for (double& c : f.coef[s])
        c *= total > 0.0 ? shots(layout.sequences[s].counts) / total : 1.0 / count;
  add_pair(f, layout, from, to, [](int, int b) { return b > 0 ? -1.0 : 0.0; });
  return f;
}

ConstrainedFit constrained_fit(const CellCounts& counts, const LinearFunctional& fn, double target,
                               double pseudo_count) {
  MACROREAL_CHECK(counts.size() == fn.coef.size());
  if (!(pseudo_count > 0.0))
    throw DomainError("constrained fit: pseudo_count = " + std::to_string(pseudo_count) +
                      ", but must be > 0");
  const double lo = fn.min_value(), hi = fn.max_value();
  if (!(target > lo && target < hi))
    throw DomainError("constrained fit: target " + std::to_string(target) + " for " + fn.name +
                      " lies outside the open range (" + std::to_string(lo) + ", " +
                      std::to_string(hi) + ") of the functional");
  ConstrainedFit fit;
  fit.probabilities = counts;
  const std::size_t S = counts.size();
  std::vector<double> mass(S, 0.0);
  for (std::size_t s = 0; s < S; ++s) {
    const double n = shots(counts[s]);
    if (!fn.uses(s)) {
      for (auto& x : fit.probabilities[s]) x = n > 0.0 ? x / n : 1.0 / fit.probabilities[s].size();
      continue;
    }
    if (!(n > 0.0)) throw DomainError("constrained fit: sequence " + std::to_string(s) + " has no shots");
    mass[s] = n + pseudo_count * static_cast<double>(counts[s].size());
  }
  // p_sj(lambda) for sequence s; returns sum_j c_sj p_sj.
  auto solve_sequence = [&](std::size_t s, double lambda) {
    const auto& c = fn.coef[s];
    const auto& n = counts[s];
    double mu_low = -std::numeric_limits<double>::infinity();
    for (double cj : c) mu_low = std::max(mu_low, -lambda * cj);
    auto h = [&](double u) {  // sum_j m_j / (mu_low + u + lambda c_j) - 1, decreasing in u > 0
      double t = 0.0;
      for (std::size_t j = 0; j < c.size(); ++j) t += (n[j] + pseudo_count) / ((mu_low + lambda * c[j]) + u);
      return t - 1.0;
    };
    // h(0+) = +inf, h(mass) <= 0. Bisection in log u: with a tiny pseudo count the root can
    // sit within 1e-12 of the pole, where a linear bisection would lose all relative accuracy.
    double a = std::log(1e-300), b = std::log(mass[s]);
    for (int it = 0; it < 200 && (b - a) > 1e-15; ++it) {
      const double mid = 0.5 * (a + b);
      (h(std::exp(mid)) > 0.0 ? a : b) = mid;
    }
    // Denominators as (mu_low + lambda c_j) + u: the bracket is exactly 0 for the extreme cell,
    // so u keeps its full relative precision there.
    const double u = std::exp(0.5 * (a + b));
    double sum = 0.0, val = 0.0;
    auto& p = fit.probabilities[s];
    for (std::size_t j = 0; j < c.size(); ++j) {
      p[j] = (n[j] + pseudo_count) / ((mu_low + lambda * c[j]) + u);
      sum += p[j];
    }
    for (std::size_t j = 0; j < c.size(); ++j) {
      p[j] /= sum;  // removes the bisection's last-bit error in the normalisation
      val += c[j] * p[j];
    }
    return val;
  };
  auto value = [&](double lambda) {
    double v = 0.0;
    for (std::size_t s = 0; s < S; ++s)
      if (fn.uses(s)) v += solve_sequence(s, lambda);
    return v;
  };
  // L(lambda) decreases; bracket the root by doubling.
  double total_mass = 0.0;
  for (double m : mass) total_mass += m;
  double step = total_mass;
  double la = 0.0, lb = 0.0;
  const double v0 = value(0.0);
  if (v0 > target) {
    lb = step;
    while (value(lb) > target && lb < 1e300) { la = lb; lb *= 2.0; }
  } else {
    la = -step;
    while (value(la) < target && la > -1e300) { lb = la; la *= 2.0; }
  }
  int it = 0;
  for (; it < 300; ++it) {
    const double mid = 0.5 * (la + lb);
    const double v = value(mid);
    if (v > target) la = mid; else lb = mid;
    if (std::abs(v - target) < 1e-13 || (lb - la) <= 1e-15 * std::max(1.0, std::abs(mid))) break;
  }
  fit.lambda = 0.5 * (la + lb);
  fit.achieved = value(fit.lambda);
  fit.iterations = it;
  fit.converged = std::abs(fit.achieved - target) < 1e-9;
  return fit;
}

void simulate_counts(RandomEngine& g, const CellCounts& probabilities, const CellCounts& shots_like,
                     CellCounts& out) {
  for (std::size_t s = 0; s < probabilities.size(); ++s)
    multinomial(g, static_cast<long>(shots(shots_like[s])), probabilities[s], out[s]);
}

}  // namespace macroreal
