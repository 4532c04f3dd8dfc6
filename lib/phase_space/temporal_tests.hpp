// Leggett-Garg and no-signalling-in-time quantities, written once for any probability model
// (the Weyl engine, the classical reference models, later the Fock engine).
//   C_ij from runs in which only i and j are measured;
//   K_3 = C_12 + C_23 - C_13 (<= 1 under macrorealism), the family
//   1 + s1 C_12 + s2 C_23 + s1 s2 C_13 >= 0; K_n = sum_k C_{k,k+1} - C_{1n} <= n - 2;
//   NSIT A -> B: S = P_B(+) - sum_a P_AB(a, +).
#pragma once

#include <array>
#include <concepts>
#include <vector>

#include "phase_space/sequence.hpp"
#include "phase_space/state.hpp"

namespace macroreal {

template <class M>
concept ProbabilityModel = requires(const M& m, const MeasurementSequence& s,
                                    const OutcomeString& o) {
  { m.probability_value(s, o) } -> std::convertible_to<double>;
  { m.correlator_value(s) } -> std::convertible_to<double>;
};

// The sub-sequence made of the given steps only (indices into `all.steps`, increasing).
MeasurementSequence subsequence(const MeasurementSequence& all, const std::vector<int>& steps);

template <ProbabilityModel M>
double pair_correlator(const M& model, const MeasurementSequence& all, int i, int j) {
  return model.correlator_value(subsequence(all, {i, j}));
}

struct LeggettGarg3 {
  double c12 = 0, c23 = 0, c13 = 0;
  double K = 0;                          // C12 + C23 - C13
  std::array<double, 4> family{};        // 1 + s1 C12 + s2 C23 + s1 s2 C13, (s1,s2) = ++,+-,-+,--
};

template <ProbabilityModel M>
LeggettGarg3 leggett_garg3(const M& model, const MeasurementSequence& three) {
  LeggettGarg3 r;
  r.c12 = pair_correlator(model, three, 0, 1);
  r.c23 = pair_correlator(model, three, 1, 2);
  r.c13 = pair_correlator(model, three, 0, 2);
  r.K = r.c12 + r.c23 - r.c13;
  const int s[4][2] = {{1, 1}, {1, -1}, {-1, 1}, {-1, -1}};
  for (int k = 0; k < 4; ++k)
    r.family[k] = 1.0 + s[k][0] * r.c12 + s[k][1] * r.c23 + s[k][0] * s[k][1] * r.c13;
  return r;
}

struct LeggettGargN {
  std::vector<double> neighbour;  // C_{k,k+1}
  double c1n = 0;
  double K = 0;                   // sum neighbour - C_1n
  double bound = 0;               // n - 2
};

template <ProbabilityModel M>
LeggettGargN leggett_garg_n(const M& model, const MeasurementSequence& all) {
  LeggettGargN r;
  const int n = static_cast<int>(all.steps.size());
  for (int k = 0; k + 1 < n; ++k) r.neighbour.push_back(pair_correlator(model, all, k, k + 1));
  r.c1n = pair_correlator(model, all, 0, n - 1);
  r.K = -r.c1n;
  for (double c : r.neighbour) r.K += c;
  r.bound = n - 2;
  return r;
}

// NSIT from step a to step b of `all` (a < b): S = P_B(+) - sum_x P_AB(x, +).
template <ProbabilityModel M>
double nsit_signalling(const M& model, const MeasurementSequence& all, int a, int b) {
  const auto only_b = subsequence(all, {b});
  const auto ab = subsequence(all, {a, b});
  return model.probability_value(only_b, {+1}) - model.probability_value(ab, {+1, +1}) -
         model.probability_value(ab, {-1, +1});
}

// Closed-form decomposition of the NSIT signalling S from step a to step b (a < b) under the
// phase-insensitive Gaussian channels, without rotations. With gamma' = beta_B propagated back
// from t_B to t_A (shrink), s the diffusion factor over [t_A, t_B], Theta = Im(beta_A gamma'*):
//   S = 1/2 c_B Re( e^{i phi_B} s chi_A(gamma') (1 - f) ),
//   f = cos Theta (symmetric split of A),  f = e^{-i Theta} cos Theta (one-sided split of A),
// where chi_A is the characteristic function at t_A (the state after the channel from 0 to
// t_A). It follows from sum_o K_o^dag D(g) K_o = f(g) D(g) for the measurement A
// (measurement.cpp) and K_o^dag K_o summing to 1; A's contrast does not enter.
struct SignallingDecomposition {
  double S = 0.0;
  cplx overlap = 0.0;               // s chi_A(gamma'): the propagated <D(beta_B)> at t_B
  double geometric_phase_rad = 0.0; // Theta = Im(beta_A gamma'*)
  double kick_phase_rad = 0.0;      // -Theta for the one-sided split of A, 0 for symmetric
  cplx f = 1.0;                     // the factor f above
};
// Throws UnsupportedError when the noise rotates (dephasing or frequency noise) or when A or B
// has a finite interaction duration (duration_s > 0, naming the field), DomainError for bad
// indices.
SignallingDecomposition nsit_decomposition(const State& state, const MeasurementSequence& all,
                                           int a, int b);

}  // namespace macroreal
