// Writers for the result of `macroreal predict` (protocol/prediction.hpp):
//   - JSON per DESIGN.md section 8 ("probabilities", "tests" with K, correlators,
//     K_classical, K_classical_kicked, explained_by_classical_model; null where a classical
//     model cannot be built), plus the engine summary, checks and cautions;
//   - a fixed-width text report with the verdict sentences and the cautions of DESIGN.md
//     section 7.
// Both are deterministic: the same result gives the same bytes (fixed key order, fixed
// number formats, no time stamps).
#pragma once

#include <string>

#include <nlohmann/json.hpp>

#include "protocol/prediction.hpp"

namespace macroreal {

nlohmann::ordered_json prediction_json(const PredictionResult& result);
std::string prediction_json_text(const PredictionResult& result);  // pretty, ends in "\n"
std::string prediction_text(const PredictionResult& result);       // ends in "\n"

}  // namespace macroreal
