// Oscillator states described by their characteristic (Weyl) function chi(beta) = Tr[rho D(beta)].
//
// Conventions (DESIGN.md section 2): x = (a + a^dag)/sqrt2, vacuum variance 1/2,
// D(beta) = exp(beta a^dag - beta* a), S(xi) = exp((xi* a^2 - xi a^dag^2)/2), xi = r e^{i theta}.
// Closed forms: thermal exp(-(nbar+1/2)|b|^2); Fock n exp(-|b|^2/2) L_n(|b|^2) (log-scaled
// recurrence, accurate for n <= 200 and |b| <= 40); coherent exp(-|b|^2/2 + b a* - b* a);
// squeezed thermal displaced chi_th(b cosh r + b* e^{i theta} sinh r) exp(b a* - b* a).
// Cat and other finite superpositions of coherent and Fock components use the closed-form
// matrix elements of D between coherent and Fock states (Cahill & Glauber, Phys. Rev. 177,
// 1857 (1969)). Prepared states are post-selected by a measurement sequence and evaluated by
// pulling D(gamma) back through the Kraus operators (see prepared_state.hpp).
#pragma once

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include <Eigen/Dense>

#include "core/types.hpp"
#include "phase_space/weyl_sum.hpp"

namespace macroreal {

// First and second moments of a Gaussian state in real phase-space coordinates (x, p):
// mean <(x, p)> and symmetrised covariance, vacuum = identity / 2.
struct GaussianMoments {
  Eigen::Vector2d mean;
  Eigen::Matrix2d covariance;
};

class State {
 public:
  virtual ~State() = default;
  virtual cplx characteristic(cplx beta) const = 0;
  // <O> for O = sum c_k D(gamma_k). Prepared states override this to pull the whole sum
  // back through their preparation at once.
  virtual cplx expectation(const WeylSum& op) const;
  // True when the Wigner function is known to be non-negative everywhere (Gaussian states
  // and their mixtures). False means "negative somewhere or not known": the classical
  // reference models refuse such states.
  virtual bool wigner_nonnegative() const = 0;
  // True when rho commutes with a^dag a (thermal, Fock, mixtures of them): rotations before
  // the first measurement then have no effect and need no quadrature.
  virtual bool rotation_invariant() const = 0;
  // Moments when the state is Gaussian; the classical model draws phase-space points from it.
  virtual std::optional<GaussianMoments> gaussian_moments() const { return std::nullopt; }
  // Mixture components with weights, when the state is a classical mixture (else itself).
  virtual std::string describe() const = 0;
};

using StatePtr = std::shared_ptr<const State>;

StatePtr make_thermal(double nbar);                       // nbar >= 0
StatePtr make_coherent(cplx alpha);
StatePtr make_squeezed(double r, double theta_rad, double nbar = 0.0, cplx alpha = 0.0);
StatePtr make_fock(int n);                                // 0 <= n <= 2000
// (|alpha> + e^{i phase}|-alpha>) / norm.
StatePtr make_cat(cplx alpha, double relative_phase_rad);

// A pure superposition sum_k c_k |component_k> with each component a coherent state or a
// Fock state; amplitudes need not be normalised (the state is normalised).
struct PureComponent {
  enum class Kind { coherent, fock };
  Kind kind;
  cplx amplitude;
  cplx alpha = 0.0;  // coherent
  int n = 0;         // fock
};
StatePtr make_superposition(std::vector<PureComponent> components);

// Classical mixture sum_k w_k rho_k (weights >= 0, normalised here).
StatePtr make_mixture(std::vector<std::pair<double, StatePtr>> components);

// Fock-state characteristic function <n|D(beta)|n>, log-scaled so that neither L_n nor the
// Gaussian factor over- or underflows.
double fock_characteristic(int n, double abs_beta_squared);
// Matrix element <m|D(beta)|n> from the closed form with generalised Laguerre polynomials
// (Cahill & Glauber 1969, eq. 4.61 ff.), log-scaled.
cplx displacement_matrix_element(int m, int n, cplx beta);

}  // namespace macroreal
