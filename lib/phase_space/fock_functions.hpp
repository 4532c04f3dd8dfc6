// Log-scaled special functions for Fock-basis matrix elements of displacements, shared by the
// Fock and superposition states. The closed forms follow Cahill & Glauber, Phys. Rev. 177,
// 1857 (1969): <m|D(b)|n> = sqrt(n!/m!) b^{m-n} e^{-|b|^2/2} L_n^{(m-n)}(|b|^2), m >= n.
#pragma once

#include "core/types.hpp"

namespace macroreal::detail {

// Generalised Laguerre L_n^{(a)}(x) by the three-term recurrence, returned as
// mantissa * exp(log_scale) so that it never overflows (a >= 0, x >= 0).
struct ScaledValue {
  double mantissa = 0.0;
  double log_scale = 0.0;
};
ScaledValue laguerre_scaled(int n, int a, double x);

// <m|gamma>, the Fock amplitude of a coherent state: e^{-|g|^2/2} g^m / sqrt(m!).
cplx fock_coherent_overlap(int m, cplx gamma);

}  // namespace macroreal::detail
