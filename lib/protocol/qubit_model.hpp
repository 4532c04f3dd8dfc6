// A textbook two-level check of the correlator / K code: a spin-1/2 precessing under
// H = (omega/2) sigma_x, measured projectively along z (outcome +1 for |up>, -1 for |down>),
// with the Lueders rule between measurements. Its two-time correlators are
// C_ij = cos(omega (t_j - t_i)) for any initial state, so K_3 = 2 cos(omega tau) -
// cos(2 omega tau) for equally spaced times, at most 3/2 at omega tau = pi/3, and K_n at
// most n cos(pi/n) (Emary, Lambert & Nori, Rep. Prog. Phys. 77, 016001 (2014), section 3).
//
// It satisfies the ProbabilityModel concept of phase_space/temporal_tests.hpp, so
// leggett_garg3 / leggett_garg_n / nsit_signalling run on it unchanged. How a
// MeasurementSequence is read: only each step's `time_s` (seconds, non-decreasing) is used,
// as the time of a projective sigma_z measurement; the modular-measurement settings (beta,
// phase, split, contrast), durations and the noise model are ignored (there is no oscillator).
// The spin evolves under H from time 0 (the initial state) to the first measurement.
#pragma once

#include <array>

#include <Eigen/Dense>

#include "phase_space/sequence.hpp"

namespace macroreal {

class PrecessingQubitModel {
 public:
  // omega: precession angular frequency (rad/s, finite). bloch: the initial Bloch vector
  // (|r| <= 1; default 0, the maximally mixed state). Throws DomainError otherwise.
  explicit PrecessingQubitModel(double omega_rad_per_s,
                                std::array<double, 3> bloch = {0.0, 0.0, 0.0});

  // P(o_1 .. o_k) for the first k = o.size() steps (k <= number of steps; later steps not
  // made). Throws DomainError for an outcome other than +1/-1, too many outcomes or
  // decreasing times.
  double probability_value(const MeasurementSequence& seq, const OutcomeString& o) const;
  // sum over all outcome strings of (o_1 ... o_n) P(o_1 .. o_n) for all n steps.
  double correlator_value(const MeasurementSequence& seq) const;

  double omega() const { return omega_; }

 private:
  double omega_;
  Eigen::Matrix2cd rho0_;
};

// A sequence of projective measurements at the given times (labels "t1", "t2", ...), for
// PrecessingQubitModel; the measurement settings are defaults and unused by the model.
MeasurementSequence qubit_sequence(const std::vector<double>& times_s);

}  // namespace macroreal
