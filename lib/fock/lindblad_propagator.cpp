// Diagonal-by-diagonal exact Lindblad propagation (lindblad_propagator.hpp).
#include "fock/lindblad_propagator.hpp"

#include <algorithm>
#include <cmath>
#include <complex>
#include <vector>


#include "core/types.hpp"

namespace macroreal {

LindbladRates LindbladRates::of(const NoiseModel& noise) {
  LindbladRates r;
  const double diffusion = noise.heating_quanta_per_s + noise.force_noise_quanta_per_s;
  r.down = noise.damping_rate_per_s * (noise.bath_nbar + 1.0) + diffusion;
  r.up = noise.damping_rate_per_s * noise.bath_nbar + diffusion;
  r.dephasing = noise.dephasing_rate_per_s;
  return r;
}

namespace {

// v <- exp(L t) v for the ladder part of diagonal k (see the header); v[j] is X_{j+k, j}
// (or X_{j, j+k}: the generator is the same).
void ladder_exponential_action(std::vector<cplx>& v, int k, const LindbladRates& rates, double t,
                               std::vector<cplx>& term, std::vector<cplx>& next) {
  const int len = static_cast<int>(v.size());
  if (len == 0) return;
  auto diag = [&](int j) {
    const double m = j + k, n = j;
    return -(rates.down * (m + n) / 2.0 + rates.up * (m + n + 2.0) / 2.0);
  };
  auto upper = [&](int j) { return rates.down * std::sqrt((j + k + 1.0) * (j + 1.0)); };  // (j, j+1)
  auto lower = [&](int j) { return rates.up * std::sqrt((j + k + 0.0) * j); };           // (j, j-1)
  // ||L||_1: largest column sum of |entries|.
  double norm1 = 0.0;
  for (int j = 0; j < len; ++j) {
    double c = std::abs(diag(j));
    if (j > 0) c += upper(j - 1);
    if (j + 1 < len) c += lower(j + 1);
    norm1 = std::max(norm1, c);
  }
  const int steps = std::max(1, static_cast<int>(std::ceil(2.0 * norm1 * t)));
  const double h = t / steps;
  term.resize(len);
  next.resize(len);
  for (int s = 0; s < steps; ++s) {
    term = v;
    for (int q = 1; q <= 60; ++q) {
      double tn = 0.0, vn = 0.0;
      for (int j = 0; j < len; ++j) {
        cplx y = diag(j) * term[j];
        if (j + 1 < len) y += upper(j) * term[j + 1];
        if (j > 0) y += lower(j) * term[j - 1];
        next[j] = y * (h / q);
      }
      for (int j = 0; j < len; ++j) {
        v[j] += next[j];
        tn = std::max(tn, std::abs(next[j]));
        vn = std::max(vn, std::abs(v[j]));
      }
      std::swap(term, next);
      if (tn <= 1e-17 * vn) break;
    }
  }
}

// Dense exp(L_k t) for the ladder part of diagonal k (length len): Taylor series of
// exp(L_k t / 2^s) summed to machine precision with the tridiagonal L_k applied in O(len^2)
// per term, then s squarings (scaling and squaring, Moler & Van Loan, SIAM Rev. 45, 3
// (2003), method 3), with 2^s >= 2 ||L_k t||_1 so that the scaled norm is at most 1/2.
Eigen::MatrixXd ladder_propagator(int k, int len, const LindbladRates& rates, double t) {
  std::vector<double> d(len), up(len, 0.0), lo(len, 0.0);
  double norm1 = 0.0;
  for (int j = 0; j < len; ++j) {
    const double m = j + k, nn = j;
    d[j] = -(rates.down * (m + nn) / 2.0 + rates.up * (m + nn + 2.0) / 2.0);
    if (j + 1 < len) up[j] = rates.down * std::sqrt((m + 1.0) * (nn + 1.0));  // (j, j+1)
    if (j > 0) lo[j] = rates.up * std::sqrt(m * nn);                         // (j, j-1)
  }
  for (int j = 0; j < len; ++j) {
    double c = std::abs(d[j]);
    if (j > 0) c += up[j - 1];
    if (j + 1 < len) c += lo[j + 1];
    norm1 = std::max(norm1, c);
  }
  int s = 0;
  while (std::ldexp(1.0, s) < 2.0 * norm1 * t) ++s;
  const double h = std::ldexp(t, -s);
  Eigen::MatrixXd p = Eigen::MatrixXd::Identity(len, len);
  Eigen::MatrixXd term = p, next(len, len);
  for (int q = 1; q <= 60; ++q) {
    for (int c = 0; c < len; ++c)
      for (int j = 0; j < len; ++j) {
        double y = d[j] * term(j, c);
        if (j + 1 < len) y += up[j] * term(j + 1, c);
        if (j > 0) y += lo[j] * term(j - 1, c);
        next(j, c) = y * (h / q);
      }
    term.swap(next);
    p += term;
    if (term.cwiseAbs().maxCoeff() <= 1e-17 * p.cwiseAbs().maxCoeff()) break;
  }
  for (int i = 0; i < s; ++i) p = p * p;
  return p;
}

}  // namespace

std::shared_ptr<const LindbladPropagator::Blocks> LindbladPropagator::blocks(
    int n, const LindbladRates& rates, double t) const {
  const Key key{n, rates.down, rates.up, t};
  {
    std::lock_guard<std::mutex> lock(mu_);
    auto it = cache_.find(key);
    if (it != cache_.end()) return it->second;
  }
  auto out = std::make_shared<Blocks>();
  out->reserve(n);
  for (int k = 0; k < n; ++k) out->push_back(ladder_propagator(k, n - k, rates, t));
  std::lock_guard<std::mutex> lock(mu_);
  if (cache_.size() >= 32) cache_.clear();
  cache_.emplace(key, out);
  return out;
}

void LindbladPropagator::apply(Eigen::MatrixXcd& x, const LindbladRates& rates, double t,
                               double theta) const {
  const int n = static_cast<int>(x.rows());
  if (t > 0.0 && rates.has_ladder() && n <= kDenseLimit) {
    const auto b = blocks(n, rates, t);
    Eigen::VectorXcd v;
    for (int k = 0; k < n; ++k) {
      const int len = n - k;
      const Eigen::MatrixXd& p = (*b)[k];
      const double deph = std::exp(-rates.dephasing * t * k * k / 2.0);
      v.resize(len);
      for (int j = 0; j < len; ++j) v[j] = x(j + k, j);
      v = deph * (p * v);
      for (int j = 0; j < len; ++j) x(j + k, j) = v[j];
      if (k == 0) continue;
      for (int j = 0; j < len; ++j) v[j] = x(j, j + k);
      v = deph * (p * v);
      for (int j = 0; j < len; ++j) x(j, j + k) = v[j];
    }
  } else if (t > 0.0 && rates.has_ladder()) {
    std::vector<cplx> v, term, next;
    for (int k = 0; k < n; ++k) {
      const int len = n - k;
      const double deph = std::exp(-rates.dephasing * t * k * k / 2.0);
      v.resize(len);
      for (int j = 0; j < len; ++j) v[j] = x(j + k, j);
      ladder_exponential_action(v, k, rates, t, term, next);
      for (int j = 0; j < len; ++j) x(j + k, j) = deph * v[j];
      if (k == 0) continue;
      for (int j = 0; j < len; ++j) v[j] = x(j, j + k);
      ladder_exponential_action(v, k, rates, t, term, next);
      for (int j = 0; j < len; ++j) x(j, j + k) = deph * v[j];
    }
  }
  // Elementwise factors depend on m - n only: tabulate them once per call.
  const bool dephase_only = t > 0.0 && !rates.has_ladder() && rates.dephasing > 0.0;
  if (!dephase_only && theta == 0.0) return;
  std::vector<cplx> factor(2 * n - 1);
  for (int d = -(n - 1); d <= n - 1; ++d) {
    cplx f = theta != 0.0 ? std::polar(1.0, -theta * d) : cplx(1.0);
    if (dephase_only) f *= std::exp(-rates.dephasing * t * d * d / 2.0);
    factor[d + n - 1] = f;
  }
  for (int c = 0; c < n; ++c)
    for (int r = 0; r < n; ++r) x(r, c) *= factor[r - c + n - 1];
}

}  // namespace macroreal
