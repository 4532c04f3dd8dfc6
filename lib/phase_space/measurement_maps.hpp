// Allocation-light form of the modular measurement's Heisenberg maps (measurement.hpp), for
// the Weyl engine's inner loop: appends the image of the terms `x` to `out`, unmerged.
#pragma once

#include <vector>

#include "phase_space/measurement.hpp"

namespace macroreal::detail {

enum class EffectMode { outcome, signed_sum, unselective };

void apply_effect_map(const ModularMeasurement& m, EffectMode mode, int outcome,
                      const std::vector<WeylTerm>& x, std::vector<WeylTerm>& out,
                      bool classical);

}  // namespace macroreal::detail
