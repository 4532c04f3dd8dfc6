// Writers for the result of `macroreal analyse` (stats/analysis.hpp):
//   - the JSON object of DESIGN.md section 8: every estimate as {"estimate", "ci", "level"}
//     plus "method" (the default interval) and the other intervals; every test with
//     "p_value", "sigma", "method" (the primary one) and all methods in "methods"; "rows"
//     {"read", "used", "rejected", "reasons"}; "seed"; the multiplicity adjustments, the drift
//     check, the cautions of section 7;
//   - a fixed-width text report: tables of rows, estimates and tests, verdict sentences,
//     cautions.
// Both are deterministic: the same result gives the same bytes (fixed key order, fixed
// number formats, no time stamps). NaN is written as null (JSON) or "n/a" (text).
#pragma once

#include <string>

#include <nlohmann/json.hpp>

#include "stats/analysis.hpp"

namespace macroreal {

nlohmann::ordered_json analysis_json(const AnalysisResult& result);
std::string analysis_json_text(const AnalysisResult& result);  // pretty, ends in "\n"
std::string analysis_text(const AnalysisResult& result);       // ends in "\n"

}  // namespace macroreal
