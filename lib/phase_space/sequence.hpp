// A measurement sequence: modular measurements at given times with noise in between.
// Noise acts from time 0 (end of state preparation) to the first measurement and between
// consecutive ones; times must not decrease. A measurement may last a finite time
// (duration_s > 0: the interaction runs from time_s to time_s + duration_s with the noise
// acting during it, issue 4); the next one must not start before it has ended.
#pragma once

#include <string>
#include <vector>

#include "phase_space/channel.hpp"
#include "phase_space/measurement.hpp"

namespace macroreal {

struct TimedMeasurement {
  std::string label;  // e.g. "A"; used in reports only
  ModularMeasurement measurement;
  double time_s = 0.0;
  double duration_s = 0.0;  // interaction duration from time_s; 0 = instantaneous
  double end_s() const { return time_s + duration_s; }
};

struct MeasurementSequence {
  std::vector<TimedMeasurement> steps;
  NoiseModel noise;

  void validate() const;  // non-decreasing times, no overlapping interactions, valid parts
  bool has_durations() const;  // any duration_s > 0
};

// Outcomes of the first k steps of a sequence, each +1 or -1 (k may be smaller than the
// number of steps: the shot ended, later measurements were not made).
using OutcomeString = std::vector<int>;
std::string to_string(const OutcomeString& o);  // "+-+"
OutcomeString parse_outcomes(const std::string& s);

}  // namespace macroreal
