// Exact propagation of the phase-covariant Lindblad noise of DESIGN.md section 2 on Fock-basis
// operators (density matrices and the non-Hermitian probe-branch operators of finite-duration
// measurements):
//     dX/dt = g_down D[a]X + g_up D[a^dag]X + kappa D[a^dag a]X,
//     g_down = gamma (n_th + 1) + ndot + f,   g_up = gamma n_th + ndot + f,
// (thermal damping with bath n_th, heating ndot, force noise f -- the last two are the same
// generator D[a] + D[a^dag]; the generators add). In components
//     dX_mn/dt = g_down sqrt((m+1)(n+1)) X_{m+1,n+1} + g_up sqrt(m n) X_{m-1,n-1}
//                - [g_down (m+n)/2 + g_up (m+n+2)/2 + kappa (m-n)^2/2] X_mn,
// so each diagonal k = m - n evolves on its own with a real tridiagonal generator L_k (the
// same for k and -k); the dephasing part is the scalar -kappa k^2/2 on diagonal k and is
// taken out as the exact factor exp(-kappa t k^2/2). Up to `kDenseLimit` levels the
// propagators exp(L_k t) are computed once per (cutoff, rates, t) by Taylor series with
// scaling and squaring (Moler & Van Loan, SIAM Rev. 45, 3 (2003)) and cached (a sequence reuses them for every quadrature node, outcome and branch). Above
// it, the action exp(L_k t) v is computed directly by the truncated Taylor series with
// scaling (Al-Mohy & Higham, SIAM J. Sci. Comput. 33, 488 (2011)): t is split into s steps
// with ||L_k t / s||_1 <= 1/2 and each step sums terms until they fall below 1e-17 of the
// partial sum, i.e. to machine precision.
// Pure dephasing needs no series: X_mn *= exp(-kappa t (m-n)^2 / 2).
// A rotation exp(-i theta a^dag a) X exp(i theta a^dag a) (quasi-static frequency offset,
// theta = delta t) multiplies X_mn by exp(-i theta (m-n)); it commutes with the noise.
// At the cutoff the truncated generator loses the population that would leave the space
// (no reflection); the engine's truncation check measures this.
#pragma once


#include <map>
#include <memory>
#include <mutex>
#include <tuple>
#include <vector>

#include <Eigen/Dense>

#include "phase_space/channel.hpp"

namespace macroreal {

struct LindbladRates {
  double down = 0.0;     // g_down
  double up = 0.0;       // g_up
  double dephasing = 0.0;  // kappa
  static LindbladRates of(const NoiseModel& noise);
  bool has_ladder() const { return down > 0.0 || up > 0.0; }
};

class LindbladPropagator {
 public:
  static constexpr int kDenseLimit = 200;
  // X <- exp(L t) X, then the rotation by theta (radians). t >= 0. Thread-safe.
  void apply(Eigen::MatrixXcd& x, const LindbladRates& rates, double t, double theta) const;

 private:
  using Key = std::tuple<int, double, double, double>;
  using Blocks = std::vector<Eigen::MatrixXd>;
  std::shared_ptr<const Blocks> blocks(int n, const LindbladRates& rates, double t) const;

  mutable std::mutex mu_;
  mutable std::map<Key, std::shared_ptr<const Blocks>> cache_;
};

}  // namespace macroreal
