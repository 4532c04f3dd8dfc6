// Noise acting on the oscillator between measurements (DESIGN.md section 2).
//
// Phase-insensitive Gaussian part: thermal damping (rate gamma, bath n_th), pure heating
// (ndot quanta/s, D[a] + D[a^dag]) and isotropic Gaussian force noise (a random displacement,
// whose effect on chi is the same diffusion as heating). Their generators add, and the joint
// exact action on chi over a time t is
//     chi_out(b) = chi_in(b e^{-gamma t/2}) exp(-Dt |b|^2),
//     Dt = (n_th + 1/2)(1 - e^{-gamma t}) + (ndot + f)(1 - e^{-gamma t})/gamma   (-> (ndot+f) t).
// In the Heisenberg picture D(b) -> exp(-Dt |b|^2) D(b e^{-gamma t/2}).
// Rotations (quasi-static frequency offsets, Markovian dephasing kappa D[a^dag a]) commute
// with this channel and are handled by quadrature over angles in the engine.
#pragma once

#include "core/types.hpp"
#include "phase_space/weyl_sum.hpp"

namespace macroreal {

struct NoiseModel {
  double heating_quanta_per_s = 0.0;
  double damping_rate_per_s = 0.0;
  double bath_nbar = 0.0;
  double dephasing_rate_per_s = 0.0;          // kappa of kappa D[a^dag a]
  double frequency_noise_sd_rad_per_s = 0.0;  // sigma of the quasi-static offset delta
  double force_noise_quanta_per_s = 0.0;      // random displacement, <|alpha|^2> per second

  void validate() const;  // all >= 0; throws DomainError naming the field
  bool has_rotations() const {
    return dephasing_rate_per_s > 0.0 || frequency_noise_sd_rad_per_s > 0.0;
  }
};

// The phase-insensitive Gaussian channel over a time interval.
struct GaussianChannel {
  double shrink = 1.0;     // e^{-gamma t / 2}
  double diffusion = 0.0;  // Dt above

  static GaussianChannel over(const NoiseModel& noise, double dt_s);
  bool is_identity() const { return shrink == 1.0 && diffusion == 0.0; }
  // Heisenberg picture on a Weyl sum, in place.
  void apply_adjoint(WeylSum& x) const;
  // Then the same channel followed by another one.
  GaussianChannel then(const GaussianChannel& next) const;
};

}  // namespace macroreal
