// Physical constants for the device mapping, from the 2018 CODATA recommended values
// (Tiesinga, Mohr, Newell & Taylor, "CODATA recommended values of the fundamental physical
// constants: 2018", Rev. Mod. Phys. 93, 025010 (2021)). In the revised SI both h and k_B are
// exact; hbar = h / (2 pi) is quoted to the digits CODATA gives.
#pragma once

namespace macroreal::codata2018 {

inline constexpr double kPlanck = 6.62607015e-34;          // h, J s (exact)
inline constexpr double kReducedPlanck = 1.054571817e-34;  // hbar, J s
inline constexpr double kBoltzmann = 1.380649e-23;         // k_B, J / K (exact)
inline constexpr double kPi = 3.14159265358979323846;

}  // namespace macroreal::codata2018
