// From the physical parameters of a device (device_spec.hpp) to the model of DESIGN.md
// section 2; the derivation is in docs/device_mapping.md.
//
// Coupling H = hbar w a^dag a + hbar g sigma_z (a + a^dag). In the frame rotating at w the
// evolution over an interaction is exactly U = D(sigma_z alpha) (the second-order Magnus term
// is proportional to sigma_z^2 = 1: a global phase), with
//   alpha(t) = -i g int_0^t s(t') e^{i w t'} dt',   s = +-1 the sign of sigma_z (echo pulses),
//   free evolution over t:        alpha = (g/w)(1 - e^{i w t}),   |alpha| = (2g/w)|sin(w t/2)|;
//   echo, m half periods with a pi pulse at each inner boundary:  alpha = 2 m g / w.
// A Ramsey sequence around it has Kraus operators 1/2 [D(alpha) + o e^{i phi'} D(-alpha)],
// which is the symmetric split K_o = 1/2 [D(-beta/2) + o e^{i phi} D(beta/2)] with
// beta = 2 alpha (and phi = -phi' up to a global phase). A later start time t rotates beta by
// e^{i w t}. Noise:
//   gamma = w / Q, n_th = 1/(exp(hbar w / k_B T) - 1) (CODATA 2018 constants), thermal damping
//   between and during interactions (NoiseModel: damping_rate_per_s, bath_nbar);
//   during an interaction the two probe branches decohere: contrast factor
//     c_bath = exp(-(n_th + 1/2) gamma int_0^tau |Gamma(s)|^2 ds),
//     Gamma(s) = 2 int_s^tau alpha'(t) e^{-gamma (t - s)/2} dt,
//   closed form for free evolution with gamma tau << 1:
//     int |Gamma|^2 ds = (8 g^2 / w^2)(tau - sin(w tau)/w);
//   qubit dephasing: contrast exp(-tau / T2); readout errors e1, e2: contrast 1 - e1 - e2 (their
//   symmetric part; the asymmetric part biases single-outcome rates and is not modelled);
//   fractional frequency stability sigma_f: quasi-static offset, sd = w sigma_f rad/s.
// The interaction is then treated as instantaneous at its start with beta = Gamma(0) (= 2 alpha
// without damping) and the contrast above; the bath over its duration is in the intervals. A
// single measurement is then exact; in sequences the cross terms with later measurements are
// left out (first order in gamma tau).
#pragma once

#include <vector>

#include "core/types.hpp"
#include "device/device_spec.hpp"
#include "phase_space/channel.hpp"
#include "phase_space/measurement.hpp"

namespace macroreal {

// Bose-Einstein occupation at frequency f (Hz) and temperature T (K); 0 at T = 0.
double bose_einstein_occupation(double frequency_hz, double temperature_k);

// alpha(t) at n + 1 equally spaced times over the interaction of the scheme (alpha(0) = 0).
std::vector<cplx> interaction_path(const DevicePoint& p, int n);
// Interaction duration tau (s): fraction / f (free) or m / (2 f) (echo).
double interaction_duration_s(const DevicePoint& p);
// beta = 2 alpha(tau) by the closed forms above.
cplx interaction_beta(const DevicePoint& p);
// For any branch path alpha(t_i) at n + 1 equally spaced times over [0, tau]: the decay factor
// exp(-(n_th + 1/2) gamma int |Gamma|^2 ds) of the branches' coherence and Gamma(0) (the
// displacement the probe's coherence samples the initial characteristic function at):
//   <coherence> = chi_rho(Gamma(0)) * decay.
struct BranchDecoherence {
  double decay = 1.0;
  cplx gamma0 = 0.0;
};
BranchDecoherence branch_decoherence(const std::vector<cplx>& alpha_path, double tau_s,
                                     double gamma_per_s, double bath_nbar);
// c_bath by numerical integration of the formula above over `n` steps (any scheme).
double bath_contrast(const DevicePoint& p, int n = 2000);
// Closed form of c_bath for free evolution (gamma tau << 1), for checks and docs.
double bath_contrast_free_closed_form(const DevicePoint& p);

struct MappedDevice {
  double omega_rad_per_s = 0.0;
  double gamma_per_s = 0.0;          // w / Q
  double bath_nbar = 0.0;            // n_th
  double initial_nbar = 0.0;         // occupation after cooling, else n_th
  double interaction_s = 0.0;        // tau
  cplx beta = 0.0;                   // Gamma(0) = 2 alpha(tau) e^{-O(gamma tau)}, at start time 0
  double contrast_bath = 1.0, contrast_t2 = 1.0, contrast_readout = 1.0;
  double contrast = 1.0;             // product
  NoiseModel noise;                  // damping, bath, quasi-static frequency noise
  double cycle_s = 0.0;
  double available_s = 0.0;
  bool destructive = false;

  // Preparation interactions for the post-selected route: the echo scheme may run k times the
  // measurement's half periods (k = 1, 2, 3: beta_P = k beta, contrast for k tau); free
  // evolution only k = 1 (a longer free evolution does not displace further than 4 g / w).
  struct Preparation {
    int multiple = 1;
    cplx beta = 0.0;
    double contrast = 1.0;
    double interaction_s = 0.0;
  };
  std::vector<Preparation> preparations;

  // The modular measurement whose interaction starts at rotation angle theta (= w t mod 2 pi)
  // with Ramsey phase phi.
  ModularMeasurement measurement(double theta_rad, double phase_rad) const;
  // Earliest start time after `previous_start_s` whose rotation angle is advanced by
  // `delta_theta` (rad, taken mod 2 pi) and that leaves the previous interaction finished.
  double next_start_s(double previous_start_s, double delta_theta) const;
};

MappedDevice map_device(const DevicePoint& p);  // validates p (DomainError)

}  // namespace macroreal
