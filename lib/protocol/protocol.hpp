// The protocol file (DESIGN.md section 8, "macroreal-protocol/1") as a checked value: what
// is measured (measurements, sequences, tests) and, for predictions, the model of the
// experiment (state, noise, detection). Parsing lives in protocol_reader.hpp.
#pragma once

#include <map>
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "phase_space/sequence.hpp"
#include "phase_space/state.hpp"

namespace macroreal {

enum class Readout { destructive, nondestructive };
std::string to_string(Readout r);

struct MeasurementSpec {
  std::string name;
  ModularMeasurement measurement;
  double time_s = 0.0;
  double duration_s = 0.0;  // interaction duration (optional "duration_s", >= 0)
};

// One configuration that is actually run. Under destructive readout `dark_is[k]` says which
// sign the dark (continuing) result stands for at step k; the other sign ends the shot.
struct SequenceSpec {
  std::string name;
  std::vector<std::string> steps;
  std::vector<int> dark_is;   // +1 / -1 per step
  bool generated = false;     // added because a test needs it, not listed in the file
};

struct TestSpec {
  enum class Kind { leggett_garg, nsit };
  Kind kind = Kind::leggett_garg;
  std::vector<std::string> order;       // leggett-garg: measurement names in time order
  std::string from, to;                 // nsit
  std::optional<double> margin;         // nsit: equivalence margin for |S| (optional)
  std::string label() const;            // "LG ABC", "NSIT A->B"
};

struct DetectionSpec {
  double dark_read_bright = 0.0;   // P(read bright | dark)
  double bright_read_dark = 0.0;   // P(read dark | bright)
  std::optional<double> threshold; // photon counts <= threshold read dark
};

struct Protocol {
  std::string file;                 // where it came from (for messages)
  std::string title;
  nlohmann::json state_json;        // as written, for reports
  StatePtr state;                   // null when the file has no state (analysis only)
  Readout readout = Readout::destructive;
  std::map<std::string, MeasurementSpec> measurements;
  NoiseModel noise;
  DetectionSpec detection;
  std::vector<SequenceSpec> sequences;  // listed ones first, then generated ones
  std::vector<TestSpec> tests;

  const MeasurementSpec& measurement(const std::string& name) const;  // throws DomainError
  // The physical sequence for the given steps (measurements with their times and the noise).
  MeasurementSequence sequence_of(const std::vector<std::string>& steps) const;
  // The step lists each test needs (LG: every pair i<j of its order; NSIT: [to], [from, to]).
  std::vector<std::vector<std::string>> step_sets_needed() const;
  const SequenceSpec* find_sequence(const std::string& name) const;
};

// Name of a generated sequence: steps concatenated, then (destructive readout) the dark sign
// of every step but the last, e.g. "AB+" (DESIGN.md section 8).
std::string generated_sequence_name(const std::vector<std::string>& steps,
                                    const std::vector<int>& dark_is, Readout readout);

}  // namespace macroreal
