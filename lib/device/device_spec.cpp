// Device file reader and parameter checks (device_spec.hpp).
#include "device/device_spec.hpp"

#include <cmath>
#include <fstream>
#include <sstream>

#include "core/error.hpp"
#include "phase_space/number_text.hpp"

namespace macroreal {

namespace {

using detail::number_text;

const std::vector<std::string> kNumeric = {
    "mechanical_frequency_hz",  "quality_factor",
    "bath_temperature_k",       "occupation_after_cooling",
    "coupling_g_over_2pi_hz",   "interaction_period_fraction",
    "echo_half_periods",        "qubit_t2_s",
    "readout_error_dark_read_bright", "readout_error_bright_read_dark",
    "shot_cycle_time_s",        "measurement_time_available_h",
    "frequency_stability_fractional"};
const std::vector<std::string> kOther = {"format", "title", "note", "interaction_scheme",
                                         "readout"};

bool known(const std::string& k, const std::vector<std::string>& list) {
  for (const auto& s : list)
    if (s == k) return true;
  return false;
}

// "bath_temperature_mk" -> "bath_temperature_k": same stem, another unit.
std::string same_stem(const std::string& key) {
  const auto cut = key.rfind('_');
  if (cut == std::string::npos) return {};
  const std::string stem = key.substr(0, cut);
  for (const auto& s : kNumeric)
    if (s.rfind(stem + "_", 0) == 0 && s.find('_', stem.size() + 1) == std::string::npos) return s;
  return {};
}

std::vector<double> scan_values(const nlohmann::json& r, const std::string& file,
                                const std::string& field) {
  for (auto it = r.begin(); it != r.end(); ++it)
    if (it.key() != "from" && it.key() != "to" && it.key() != "steps" && it.key() != "spacing")
      throw InputError(file, field + "." + it.key(),
                       "unknown range field (a range has from, to, steps, spacing)");
  for (const char* k : {"from", "to", "steps"})
    if (!r.contains(k) || !r[k].is_number())
      throw InputError(file, field + "." + k, "a range needs a number here");
  const double a = r["from"].get<double>(), b = r["to"].get<double>();
  const double steps_d = r["steps"].get<double>();
  if (!(steps_d >= 2) || steps_d != std::floor(steps_d) || steps_d > 100000)
    throw InputError(file, field + ".steps",
                     "steps = " + number_text(steps_d) + ", but must be an integer in [2, 100000]");
  const int steps = static_cast<int>(steps_d);
  std::string spacing = "linear";
  if (r.contains("spacing")) {
    if (!r["spacing"].is_string())
      throw InputError(file, field + ".spacing", "must be \"linear\" or \"log\"");
    spacing = r["spacing"].get<std::string>();
    if (spacing != "linear" && spacing != "log")
      throw InputError(file, field + ".spacing",
                       "spacing = \"" + spacing + "\", but must be \"linear\" or \"log\"");
  }
  if (spacing == "log" && !(a > 0 && b > 0))
    throw InputError(file, field, "a log range needs from > 0 and to > 0");
  std::vector<double> v(static_cast<std::size_t>(steps));
  for (int i = 0; i < steps; ++i) {
    const double u = static_cast<double>(i) / (steps - 1);
    v[static_cast<std::size_t>(i)] =
        spacing == "log" ? std::exp(std::log(a) + u * (std::log(b) - std::log(a)))
                         : a + u * (b - a);
  }
  v.front() = a;  // exact end points
  v.back() = b;
  return v;
}

}  // namespace

std::string to_string(InteractionScheme s) {
  return s == InteractionScheme::echo ? "echo" : "free";
}

const std::vector<std::string>& DeviceSpec::numeric_fields() { return kNumeric; }

double DevicePoint::get(const std::string& f) const {
  if (f == "mechanical_frequency_hz") return mechanical_frequency_hz;
  if (f == "quality_factor") return quality_factor;
  if (f == "bath_temperature_k") return bath_temperature_k;
  if (f == "occupation_after_cooling") return occupation_after_cooling.value_or(NAN);
  if (f == "coupling_g_over_2pi_hz") return coupling_g_over_2pi_hz;
  if (f == "interaction_period_fraction") return interaction_period_fraction;
  if (f == "echo_half_periods") return echo_half_periods;
  if (f == "qubit_t2_s") return qubit_t2_s;
  if (f == "readout_error_dark_read_bright") return readout_error_dark_read_bright;
  if (f == "readout_error_bright_read_dark") return readout_error_bright_read_dark;
  if (f == "shot_cycle_time_s") return shot_cycle_time_s;
  if (f == "measurement_time_available_h") return measurement_time_available_h;
  if (f == "frequency_stability_fractional") return frequency_stability_fractional;
  throw DomainError("unknown device parameter \"" + f + "\"");
}

void DevicePoint::set(const std::string& f, double v) {
  if (f == "mechanical_frequency_hz") mechanical_frequency_hz = v;
  else if (f == "quality_factor") quality_factor = v;
  else if (f == "bath_temperature_k") bath_temperature_k = v;
  else if (f == "occupation_after_cooling") occupation_after_cooling = v;
  else if (f == "coupling_g_over_2pi_hz") coupling_g_over_2pi_hz = v;
  else if (f == "interaction_period_fraction") interaction_period_fraction = v;
  else if (f == "echo_half_periods") echo_half_periods = v;
  else if (f == "qubit_t2_s") qubit_t2_s = v;
  else if (f == "readout_error_dark_read_bright") readout_error_dark_read_bright = v;
  else if (f == "readout_error_bright_read_dark") readout_error_bright_read_dark = v;
  else if (f == "shot_cycle_time_s") shot_cycle_time_s = v;
  else if (f == "measurement_time_available_h") measurement_time_available_h = v;
  else if (f == "frequency_stability_fractional") frequency_stability_fractional = v;
  else throw DomainError("unknown device parameter \"" + f + "\"");
}

void DevicePoint::validate() const {
  auto positive = [](const char* name, double v) {
    if (!(v > 0.0) || !std::isfinite(v))
      throw DomainError(std::string(name) + " = " + number_text(v) + ", but must be > 0");
  };
  auto non_negative = [](const char* name, double v) {
    if (!(v >= 0.0) || !std::isfinite(v))
      throw DomainError(std::string(name) + " = " + number_text(v) + ", but must be >= 0");
  };
  positive("mechanical_frequency_hz", mechanical_frequency_hz);
  positive("quality_factor", quality_factor);
  non_negative("bath_temperature_k", bath_temperature_k);
  if (occupation_after_cooling) non_negative("occupation_after_cooling", *occupation_after_cooling);
  if (bath_temperature_k == 0.0 && !occupation_after_cooling)
    throw DomainError("bath_temperature_k = 0 with no occupation_after_cooling: the thermal "
                      "occupation is undefined; give occupation_after_cooling or T > 0");
  positive("coupling_g_over_2pi_hz", coupling_g_over_2pi_hz);
  if (!(interaction_period_fraction > 0.0 && interaction_period_fraction <= 1.0))
    throw DomainError("interaction_period_fraction = " + number_text(interaction_period_fraction) +
                      ", but must be in (0, 1]");
  if (!(echo_half_periods >= 1.0) || echo_half_periods != std::floor(echo_half_periods) ||
      echo_half_periods > 1e6)
    throw DomainError("echo_half_periods = " + number_text(echo_half_periods) +
                      ", but must be an integer >= 1");
  positive("qubit_t2_s", qubit_t2_s);
  for (auto [name, v] : {std::pair{"readout_error_dark_read_bright", readout_error_dark_read_bright},
                         std::pair{"readout_error_bright_read_dark", readout_error_bright_read_dark}})
    if (!(v >= 0.0 && v < 0.5))
      throw DomainError(std::string(name) + " = " + number_text(v) + ", but must be in [0, 0.5)");
  positive("shot_cycle_time_s", shot_cycle_time_s);
  positive("measurement_time_available_h", measurement_time_available_h);
  non_negative("frequency_stability_fractional", frequency_stability_fractional);
}

DeviceSpec parse_device(const nlohmann::json& j, const std::string& file) {
  if (!j.is_object()) throw InputError(file, "", "a device file is one JSON object");
  if (!j.contains("format") || j["format"] != "macroreal-device/1")
    throw InputError(file, "format", "must be \"macroreal-device/1\"");
  for (auto it = j.begin(); it != j.end(); ++it) {
    const std::string& k = it.key();
    if (known(k, kNumeric) || known(k, kOther)) continue;
    const std::string near = same_stem(k);
    if (!near.empty())
      throw InputError(file, k, "unknown unit in the field name; this parameter is given as \"" +
                                    near + "\"");
    throw InputError(file, k, "unknown field");
  }
  DeviceSpec spec;
  spec.file = file;
  if (j.contains("title")) {
    if (!j["title"].is_string()) throw InputError(file, "title", "must be a string");
    spec.title = j["title"].get<std::string>();
  }
  if (j.contains("note")) {
    if (!j["note"].is_string()) throw InputError(file, "note", "must be a string");
    spec.note = j["note"].get<std::string>();
  }
  DevicePoint& p = spec.base;
  if (j.contains("interaction_scheme")) {
    const auto& s = j["interaction_scheme"];
    if (!s.is_string() || (s != "free" && s != "echo"))
      throw InputError(file, "interaction_scheme", "must be \"free\" or \"echo\"");
    p.scheme = s == "echo" ? InteractionScheme::echo : InteractionScheme::free_evolution;
  }
  if (j.contains("readout")) {
    const auto& s = j["readout"];
    if (!s.is_string() || (s != "destructive" && s != "nondestructive"))
      throw InputError(file, "readout", "must be \"destructive\" or \"nondestructive\"");
    p.destructive_readout = s == "destructive";
  }
  for (const std::string& f : kNumeric) {
    if (!j.contains(f)) continue;
    const auto& v = j[f];
    if (f == "occupation_after_cooling" && v.is_null()) {
      p.occupation_after_cooling.reset();
      continue;
    }
    if (v.is_number()) {
      p.set(f, v.get<double>());
    } else if (v.is_object()) {
      DeviceParameter r;
      r.values = scan_values(v, file, f);
      p.set(f, r.value());
      spec.ranges[f] = std::move(r);
    } else {
      throw InputError(file, f, "must be a number or a range {from, to, steps, spacing}");
    }
  }
  // Every point of every range must be valid, not only the first.
  auto check = [&](const DevicePoint& q, const std::string& where) {
    try {
      q.validate();
    } catch (const DomainError& e) {
      const std::string msg = e.what();
      const std::string field = msg.substr(0, msg.find(' '));
      throw InputError(file, where.empty() ? field : where, msg);
    }
  };
  check(p, "");
  for (const auto& [f, r] : spec.ranges)
    for (double v : r.values) {
      DevicePoint q = p;
      q.set(f, v);
      check(q, f);
    }
  return spec;
}

DeviceSpec parse_device_text(const std::string& text, const std::string& file) {
  nlohmann::json j;
  try {
    j = nlohmann::json::parse(text);
  } catch (const nlohmann::json::parse_error& e) {
    throw InputError(file, "byte " + std::to_string(e.byte), "not valid JSON");
  }
  return parse_device(j, file);
}

DeviceSpec read_device(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path, "", "cannot open the device file");
  std::ostringstream ss;
  ss << in.rdbuf();
  return parse_device_text(ss.str(), path);
}

}  // namespace macroreal
