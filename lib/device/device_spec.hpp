// The device file ("macroreal-device/1", docs/device_mapping.md): the physical parameters of
// a mechanical sensor with a two-level probe, units in the field names. Every numeric field
// may be a single number or a range to scan, {"from": a, "to": b, "steps": n,
// "spacing": "linear" | "log"}. Reading checks every field and throws InputError(file,
// field, rule) on bad content (unknown field or unit, negative Q, T = 0 without an
// occupation after cooling, ...).
#pragma once

#include <map>
#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

namespace macroreal {

enum class InteractionScheme { free_evolution, echo };
std::string to_string(InteractionScheme s);

// One numeric parameter: a value, or a scan over `values` (from, to, steps, spacing).
struct DeviceParameter {
  std::vector<double> values;  // one value, or the scan points in order
  bool is_range() const { return values.size() > 1; }
  double value() const { return values.front(); }  // the first point of a scan
};

// One point of the parameter space: every numeric parameter with a single value.
struct DevicePoint {
  double mechanical_frequency_hz = 1e6;
  double quality_factor = 1e5;
  double bath_temperature_k = 0.01;
  std::optional<double> occupation_after_cooling;  // none: the mode starts thermal at the bath
  double coupling_g_over_2pi_hz = 1e5;             // longitudinal hbar g sigma_z (a + a^dag)
  InteractionScheme scheme = InteractionScheme::free_evolution;
  double interaction_period_fraction = 0.5;        // free evolution: duration / period, (0, 1]
  double echo_half_periods = 2;                    // echo: integer number of half periods >= 1
  double qubit_t2_s = 1e-3;
  double readout_error_dark_read_bright = 0.0;
  double readout_error_bright_read_dark = 0.0;
  bool destructive_readout = false;
  double shot_cycle_time_s = 1e-3;
  double measurement_time_available_h = 24.0;
  double frequency_stability_fractional = 0.0;     // shot-to-shot sd of delta f / f

  // Checks every domain rule; throws DomainError naming the field.
  void validate() const;
  // The numeric parameter by its file name (DomainError for an unknown name).
  double get(const std::string& field) const;
  void set(const std::string& field, double v);
};

struct DeviceSpec {
  std::string file;
  std::string title;
  std::string note;                                // e.g. "invented demo device"
  DevicePoint base;                                // first point of every range
  std::map<std::string, DeviceParameter> ranges;   // the numeric fields given as ranges

  // Numeric field names that may be scanned or improved, in file order.
  static const std::vector<std::string>& numeric_fields();
};

DeviceSpec parse_device(const nlohmann::json& j, const std::string& file);
DeviceSpec parse_device_text(const std::string& text, const std::string& file);
DeviceSpec read_device(const std::string& path);  // InputError when unreadable

}  // namespace macroreal
