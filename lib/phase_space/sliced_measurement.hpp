// Heisenberg picture of a finite-duration modular measurement (issue 4), for the Weyl engine.
//
// The spin-dependent displacement of duration T is applied in n slices with the Gaussian noise
// in between, in the same discretisation as the Fock engine (fock_engine.hpp): the probe is
// kept as four branch operators R_ss' (s, s' = A, B); each slice kicks D(k_s) on the left and
// D(k_s')^dag on the right (symmetric split k_A = -beta/(2n), k_B = +beta/(2n); one-sided
// k_A = 0, k_B = beta/n), the noise over T/n is split symmetrically around the kicks
// (Strang splitting: N(T/2n), kick, N(T/n), ..., kick, N(T/2n)); the Ramsey projection then
// weights the branches as T0 = (R_AA + R_BB)/4, T1 = (e^{i phi} R_BA + h.c.)/4.
// The adjoint of one slice on a term is D(g) -> D(-k_s') D(g) D(k_s)
//   = exp(i [Im(g k_s'*) + Im(g k_s*) - Im(k_s' k_s*)]) D(g + k_s - k_s')
// followed by the adjoint channel, so every term stays one term: the branch-resolved effect
// operator remains a finite Weyl sum and, with Gaussian noise only, the sliced map is exact for
// its n (the only error is the splitting's, O(n^-2)). Without noise the kicks compose to the
// instantaneous measurement exactly (collinear displacements commute).
#pragma once

#include <vector>

#include "phase_space/channel.hpp"
#include "phase_space/measurement_maps.hpp"

namespace macroreal::detail {

// Appends the image of `x` under the adjoint of the sliced measurement map (mode and outcome
// as in apply_effect_map, noise over duration_s, `slices` >= 1) to `out`, unmerged.
void apply_sliced_effect_map(const ModularMeasurement& m, EffectMode mode, int outcome,
                             const NoiseModel& noise, double duration_s, int slices,
                             const std::vector<WeylTerm>& x, std::vector<WeylTerm>& out);

}  // namespace macroreal::detail
