// Writers for the result of `macroreal optimise` (design/setting_optimiser.hpp): a text report
// (objective, K and its per-shot variance, the settings found, the tolerance table, what the
// result rests on) and one JSON object. The optimised protocol file itself is
// OptimisationResult::protocol_json (write it with optimised_protocol_text). Deterministic:
// the same result gives the same bytes.
#pragma once

#include <string>

#include <nlohmann/json.hpp>

#include "design/setting_optimiser.hpp"

namespace macroreal {

nlohmann::ordered_json optimisation_json(const OptimisationResult& result);
std::string optimisation_json_text(const OptimisationResult& result);  // ends in "\n"
std::string optimisation_text(const OptimisationResult& result);       // ends in "\n"
std::string optimised_protocol_text(const OptimisationResult& result); // ends in "\n"

}  // namespace macroreal
