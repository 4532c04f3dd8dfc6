// Which photon-count threshold `analyse` applies to an outcome table, and where it comes from:
// --threshold (overrides everything), else the calibration file's, else the protocol's
// detection.threshold. The report states the choice (AnalysisResult::threshold_note).
#pragma once

#include <optional>
#include <string>

#include "detection/calibration_file.hpp"
#include "protocol/protocol.hpp"

namespace macroreal {

struct CountThresholdChoice {
  std::optional<double> threshold;  // none: the runs must not contain photon counts
  std::string source;               // e.g. "calibration file cal.json", "--threshold (overrides ...)"
};

// `calibration` may be null (no --calibration); `calibration_file` names it.
CountThresholdChoice choose_count_threshold(const std::optional<double>& option, const Calibration* calibration,
                                            const std::string& calibration_file, const Protocol& protocol);

// The report's sentence for a table that had `photon_results` photon-count results ("" when
// it had none).
std::string threshold_note(const CountThresholdChoice& choice, long photon_results);

}  // namespace macroreal
