// Reference sequence probabilities from truncated density matrices (test support): the Kraus
// operators of DESIGN.md §2 as matrices, the contrast mixture, and the Lindblad equation
// integrated between measurements (fock_matrices.hpp). Independent of the Weyl algebra.
#pragma once

#include "phase_space/fock_matrices.hpp"
#include "phase_space/sequence.hpp"

namespace macroreal::testing {

inline Mat kraus_matrix(const macroreal::ModularMeasurement& m, int o, int dim) {
  const cd e = std::polar(1.0, m.phase_rad);
  if (m.split == macroreal::Split::symmetric)
    return 0.5 * (displacement_matrix(dim, -0.5 * m.beta) +
                  static_cast<double>(o) * e * displacement_matrix(dim, 0.5 * m.beta));
  return 0.5 * (Mat::Identity(dim, dim) +
                static_cast<double>(o) * e * displacement_matrix(dim, m.beta));
}

// Unnormalised state after the first outcomes.size() steps with the given outcomes.
inline Mat sequence_state(const Mat& rho0, const macroreal::MeasurementSequence& seq,
                          const macroreal::OutcomeString& outcomes, int rk4_steps_per_unit) {
  const int dim = static_cast<int>(rho0.rows());
  Mat rho = rho0;
  double t = 0.0;
  for (std::size_t j = 0; j < outcomes.size(); ++j) {
    const auto& st = seq.steps[j];
    const double dt = st.time_s - t;
    rho = lindblad_evolve(seq.noise, rho, dt, std::max(1, static_cast<int>(dt * rk4_steps_per_unit)));
    t = st.time_s;
    const Mat kp = kraus_matrix(st.measurement, 1, dim), km = kraus_matrix(st.measurement, -1, dim);
    const Mat both = kp * rho * kp.adjoint() + km * rho * km.adjoint();
    const Mat& k = outcomes[j] > 0 ? kp : km;
    const double c = st.measurement.contrast;
    rho = c * k * rho * k.adjoint() + 0.5 * (1.0 - c) * both;
  }
  return rho;
}

inline double sequence_probability(const Mat& rho0, const macroreal::MeasurementSequence& seq,
                                   const macroreal::OutcomeString& outcomes,
                                   int rk4_steps_per_unit = 1000) {
  return sequence_state(rho0, seq, outcomes, rk4_steps_per_unit).trace().real();
}

}  // namespace macroreal::testing
