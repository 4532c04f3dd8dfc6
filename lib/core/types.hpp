// Basic numeric types and constants used across macroreal.
#pragma once

#include <complex>
#include <numbers>

namespace macroreal {

using cplx = std::complex<double>;
inline constexpr double kPi = std::numbers::pi;
inline constexpr double kDegree = std::numbers::pi / 180.0;

}  // namespace macroreal
