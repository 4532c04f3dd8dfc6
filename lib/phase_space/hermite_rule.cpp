// Golub-Welsch Gauss-Hermite rules for the standard normal weight (hermite_rule.hpp).
#include "phase_space/hermite_rule.hpp"

#include <cmath>
#include <map>
#include <mutex>

#include <Eigen/Eigenvalues>

#include "core/error.hpp"

namespace macroreal::detail {

namespace {

HermiteRule compute_rule(int n) {
  Eigen::MatrixXd j = Eigen::MatrixXd::Zero(n, n);
  for (int k = 1; k < n; ++k) j(k, k - 1) = j(k - 1, k) = std::sqrt(static_cast<double>(k));
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> es(j);
  MACROREAL_CHECK(es.info() == Eigen::Success);
  HermiteRule r;
  r.nodes.resize(n);
  r.weights.resize(n);
  double total = 0.0;
  for (int i = 0; i < n; ++i) {
    r.nodes[i] = es.eigenvalues()(i);
    const double v = es.eigenvectors()(0, i);
    r.weights[i] = v * v;  // times mu_0 = 1 for the normalised weight
    total += r.weights[i];
  }
  // Symmetrise (the exact rule is symmetric about 0) and renormalise rounding.
  for (int i = 0; i < n / 2; ++i) {
    const double x = 0.5 * (r.nodes[n - 1 - i] - r.nodes[i]);
    const double w = 0.5 * (r.weights[i] + r.weights[n - 1 - i]);
    r.nodes[i] = -x;
    r.nodes[n - 1 - i] = x;
    r.weights[i] = r.weights[n - 1 - i] = w;
  }
  if (n % 2 == 1) r.nodes[n / 2] = 0.0;
  total = 0.0;
  for (double w : r.weights) total += w;
  for (double& w : r.weights) w /= total;
  return r;
}

}  // namespace

const HermiteRule& gauss_hermite_rule(int n) {
  if (n < 1) throw InvariantError("gauss_hermite_rule: n must be >= 1");
  static std::mutex mutex;
  static std::map<int, HermiteRule> cache;
  std::lock_guard<std::mutex> lock(mutex);
  auto it = cache.find(n);
  if (it == cache.end()) it = cache.emplace(n, compute_rule(n)).first;
  return it->second;  // std::map nodes are stable
}

}  // namespace macroreal::detail
