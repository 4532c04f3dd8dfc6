// The calibration of a photon-counting state detector, as a value and as a file of our own
// ("format": "macroreal-calibration/1", JSON). `calibrate` writes it; `analyse` and `simulate`
// read it to turn photon counts into dark/bright and to model the readout errors.
//
// File layout (DESIGN.md section 8 "calibrate JSON minimum", extended):
//   {"format": "macroreal-calibration/1",
//    "rates": {"dark": 0.12, "bright": 9.8},          mean photon counts per detection window
//    "threshold": 2,                                  a count <= threshold reads dark
//    "errors": {"dark_read_bright": {"estimate": 1.1e-3, "ci": [8e-4, 1.5e-3], "level": 0.95},
//               "bright_read_dark": {"estimate": 2.0e-3, "ci": [1.6e-3, 2.5e-3], "level": 0.95}},
//    "window_s": 3e-4,                                detection window (0 or absent: unknown)
//    "decay": {"model": "dark-pumped-to-bright", "dark_lifetime_s": 0.05}   or null
//    "shots": 20000, "source_file": "counts.csv"}
// Each rate and error may be a bare number or an {"estimate", "ci", "level"} object. Other
// top-level fields (fit diagnostics written by `calibrate --json`) are allowed and ignored.
#pragma once

#include <optional>
#include <string>
#include <utility>

namespace macroreal {

struct Calibration {
  double dark_rate = 0, bright_rate = 0;  // mean photon counts per detection window
  double threshold = 0;                   // count <= threshold reads dark
  double dark_read_bright = 0;            // P(read bright | prepared dark)
  double bright_read_dark = 0;            // P(read dark | prepared bright)
  std::optional<std::pair<double, double>> dark_read_bright_ci, bright_read_dark_ci;
  double ci_level = 0.95;                 // level of both intervals (when present)
  double window_s = 0;                    // detection window in seconds; 0 = not known
  // Optional decay model: the dark state is pumped to bright after an exponentially
  // distributed time with this mean (lib/detection/count_model.hpp). Absent = no decay.
  std::optional<double> dark_lifetime_s;
  long shots = 0;                         // calibration shots the values come from
  std::string source_file;                // the counts file they come from
};

// Checks the values (rates >= 0 and dark < bright, errors and intervals in [0, 1], threshold
// >= 0, window >= 0, lifetime > 0); throws DomainError naming the field and value.
void validate_calibration(const Calibration& c);

// Reads and validates a calibration file; InputError(file, JSON path, rule) on any problem
// (e.g. "cal.json: errors.bright_read_dark.ci: lower bound 0.3 above the estimate 0.2").
Calibration read_calibration(const std::string& path);
// The same from text (`file_label` names it in messages).
Calibration parse_calibration_text(const std::string& text, const std::string& file_label);

// The file's JSON text (pretty-printed, newline at the end; the same value gives the same bytes).
std::string calibration_json(const Calibration& c);
// Writes calibration_json(c) to `path`; InputError if the file cannot be written.
void write_calibration(const Calibration& c, const std::string& path);

}  // namespace macroreal
