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

// A noise parameter known only up to an uncertainty, for robust design (issue 6). The file
// gives either {"mean": m, "sd": s} (sd >= 0; low/high empty) or {"range": [lo, hi]} (low and
// high set, mean = (lo + hi)/2, sd = 0: no distribution inside the range is implied). The
// protocol's NoiseModel holds `mean`, so predictions use the mean / midpoint. `field` is the
// JSON name of the NoiseModel field, e.g. "heating_quanta_per_s".
struct UncertainValue {
  std::string field;
  double mean = 0.0;
  double sd = 0.0;
  std::optional<double> low, high;
  bool is_range() const { return low.has_value() && high.has_value(); }
};

struct Protocol {
  std::string file;                 // where it came from (for messages)
  std::string title;
  nlohmann::json state_json;        // as written, for reports
  StatePtr state;                   // null when the file has no state (analysis only)
  Readout readout = Readout::destructive;
  std::map<std::string, MeasurementSpec> measurements;
  NoiseModel noise;
  std::vector<UncertainValue> uncertain_noise;  // in file order; noise holds the means
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

// The JSON names of the NoiseModel fields, in file order ("heating_quanta_per_s", ...).
const std::vector<std::string>& noise_field_names();
// Reference to the NoiseModel member named by its JSON field name; throws DomainError
// naming the known fields for an unknown name.
double& noise_field(NoiseModel& noise, const std::string& field);
double noise_field(const NoiseModel& noise, const std::string& field);

// A copy of `protocol` with one noise parameter set to `value` (e.g. a draw from its
// uncertainty); that field's entry in uncertain_noise is dropped, since the copy describes
// one fixed realisation. Throws DomainError for an unknown field or a value that is not
// finite and >= 0 (every noise parameter is a non-negative rate, occupation or sd).
Protocol with_noise_value(const Protocol& protocol, const std::string& field, double value);

// The configurations (dark sign per step) a test needs for `steps` measurements: under
// destructive readout all 2^(n-1) patterns of the non-final steps in the order "++", "+-",
// "-+", "--" (first step most significant; the last step's entry is +1), under
// non-destructive readout the single all-+ pattern. One definition for the reader's
// generated sequences and the protocol builders, so both name and order them alike.
std::vector<std::vector<int>> dark_patterns(std::size_t steps, Readout readout);

// Name of a generated sequence: steps concatenated, then (destructive readout) the dark sign
// of every step but the last, e.g. "AB+" (DESIGN.md section 8).
std::string generated_sequence_name(const std::vector<std::string>& steps,
                                    const std::vector<int>& dark_is, Readout readout);

}  // namespace macroreal
