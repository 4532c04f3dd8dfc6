// Compile check: the calibration (detection/calibration.hpp) and the bootstrap intervals
// (stats/bootstrap.hpp) can be used in one translation unit. They once both defined
// macroreal::Interval with different members, which made any file including both fail to
// compile (and two definitions of one class name in one program break the one-definition
// rule, C++20 [basic.def.odr]/13). This file does not compile if that returns.
#include <catch2/catch.hpp>

#include <type_traits>

#include "detection/calibration.hpp"
#include "detection/readout_corrected_analysis.hpp"
#include "stats/bootstrap.hpp"

using namespace macroreal;

TEST_CASE("Calibration estimates and bootstrap intervals are distinct types in one file", "[detection]") {
  static_assert(!std::is_same_v<CalibrationEstimate, Interval>);
  static_assert(std::is_same_v<decltype(CalibrationResult{}.dark_rate), CalibrationEstimate>);
  static_assert(std::is_same_v<decltype(BootstrapQuantity{}.bca), Interval>);
  // The checks are at compile time; this file failing to build is the failure.
}
