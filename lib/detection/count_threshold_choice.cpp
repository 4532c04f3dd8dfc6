#include "detection/count_threshold_choice.hpp"

#include "phase_space/number_text.hpp"

namespace macroreal {

using detail::number_text;

CountThresholdChoice choose_count_threshold(const std::optional<double>& option, const Calibration* calibration,
                                            const std::string& calibration_file, const Protocol& protocol) {
  CountThresholdChoice c;
  if (option) {
    c.threshold = option;
    c.source = "--threshold";
    std::string over;
    if (calibration) over = "the calibration file " + calibration_file + "'s " + number_text(calibration->threshold);
    else if (protocol.detection.threshold)
      over = "the protocol's detection.threshold " + number_text(*protocol.detection.threshold);
    if (!over.empty()) c.source += " (overrides " + over + ")";
  } else if (calibration) {
    c.threshold = calibration->threshold;
    c.source = "the calibration file " + calibration_file;
    if (protocol.detection.threshold && *protocol.detection.threshold != calibration->threshold)
      c.source += " (overrides the protocol's detection.threshold " + number_text(*protocol.detection.threshold) + ")";
  } else if (protocol.detection.threshold) {
    c.threshold = protocol.detection.threshold;
    c.source = "the protocol's detection.threshold (" + protocol.file + ")";
  }
  return c;
}

std::string threshold_note(const CountThresholdChoice& choice, long photon_results) {
  if (photon_results <= 0 || !choice.threshold) return "";
  return std::to_string(photon_results) + " photon-count results read with threshold " +
         number_text(*choice.threshold) + " (a count <= " + number_text(*choice.threshold) +
         " reads dark), from " + choice.source + ".";
}

}  // namespace macroreal
