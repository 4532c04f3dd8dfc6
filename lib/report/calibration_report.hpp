// Writers for the result of `macroreal calibrate` (detection/calibration.hpp):
//   - JSON: the calibration file's fields (format macroreal-calibration/1, so the --json output
//     is itself a valid calibration file) plus the fit, goodness of fit, both thresholds, the
//     bootstrap, the model-free misread fractions, the window table, assumptions and
//     limitations (DESIGN.md sections 7 and 8);
//   - a fixed-width text report with the same content.
// Deterministic: the same result gives the same bytes. NaN is written as null / "n/a".
#pragma once

#include <string>

#include <nlohmann/json.hpp>

#include "detection/calibration.hpp"

namespace macroreal {

nlohmann::ordered_json calibration_result_json(const CalibrationResult& r);
std::string calibration_result_json_text(const CalibrationResult& r);  // pretty, ends in "\n"
std::string calibration_result_text(const CalibrationResult& r);       // ends in "\n"

}  // namespace macroreal
