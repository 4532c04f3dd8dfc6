#include "protocol/protocol.hpp"

#include <algorithm>
#include <cmath>

#include "core/error.hpp"

namespace macroreal {

std::string to_string(Readout r) {
  return r == Readout::destructive ? "destructive" : "nondestructive";
}

std::string TestSpec::label() const {
  if (kind == Kind::nsit) return "NSIT " + from + "->" + to;
  std::string s = "LG ";
  for (const auto& name : order) s += name;
  return s;
}

const MeasurementSpec& Protocol::measurement(const std::string& name) const {
  const auto it = measurements.find(name);
  if (it == measurements.end())
    throw DomainError("measurement '" + name + "' is not defined in protocol " + file);
  return it->second;
}

MeasurementSequence Protocol::sequence_of(const std::vector<std::string>& steps) const {
  MeasurementSequence seq;
  seq.noise = noise;
  for (const auto& name : steps) {
    const auto& spec = measurement(name);
    seq.steps.push_back({name, spec.measurement, spec.time_s, spec.duration_s});
  }
  return seq;
}

std::vector<std::vector<int>> dark_patterns(std::size_t steps, Readout readout) {
  std::vector<std::vector<int>> out;
  if (steps == 0) return out;
  const std::size_t patterns = readout == Readout::destructive ? (std::size_t{1} << (steps - 1)) : 1;
  for (std::size_t p = 0; p < patterns; ++p) {
    std::vector<int> dark(steps, +1);
    for (std::size_t k = 0; k + 1 < steps; ++k)
      if ((p >> (steps - 2 - k)) & 1u) dark[k] = -1;
    out.push_back(std::move(dark));
  }
  return out;
}

std::vector<std::vector<std::string>> Protocol::step_sets_needed() const {
  std::vector<std::vector<std::string>> sets;
  const auto add = [&sets](std::vector<std::string> s) {
    if (std::find(sets.begin(), sets.end(), s) == sets.end()) sets.push_back(std::move(s));
  };
  for (const auto& t : tests) {
    if (t.kind == TestSpec::Kind::leggett_garg) {
      for (std::size_t i = 0; i < t.order.size(); ++i)
        for (std::size_t j = i + 1; j < t.order.size(); ++j) add({t.order[i], t.order[j]});
    } else {
      add({t.to});
      add({t.from, t.to});
    }
  }
  return sets;
}

const SequenceSpec* Protocol::find_sequence(const std::string& name) const {
  for (const auto& s : sequences)
    if (s.name == name) return &s;
  return nullptr;
}

std::string generated_sequence_name(const std::vector<std::string>& steps,
                                    const std::vector<int>& dark_is, Readout readout) {
  std::string name;
  for (const auto& s : steps) name += s;
  if (readout == Readout::destructive) {
    // The final step's dark sign does not change which outcomes are recorded, so it is not
    // part of the name (DESIGN.md section 8: "AB+", "AB-", "B").
    for (std::size_t k = 0; k + 1 < dark_is.size() && k + 1 < steps.size(); ++k)
      name += dark_is[k] > 0 ? '+' : '-';
  }
  return name;
}

const std::vector<std::string>& noise_field_names() {
  static const std::vector<std::string> names{
      "heating_quanta_per_s",        "damping_rate_per_s",
      "bath_nbar",                   "dephasing_rate_per_s",
      "frequency_noise_sd_rad_per_s", "force_noise_quanta_per_s"};
  return names;
}

double& noise_field(NoiseModel& noise, const std::string& field) {
  if (field == "heating_quanta_per_s") return noise.heating_quanta_per_s;
  if (field == "damping_rate_per_s") return noise.damping_rate_per_s;
  if (field == "bath_nbar") return noise.bath_nbar;
  if (field == "dephasing_rate_per_s") return noise.dephasing_rate_per_s;
  if (field == "frequency_noise_sd_rad_per_s") return noise.frequency_noise_sd_rad_per_s;
  if (field == "force_noise_quanta_per_s") return noise.force_noise_quanta_per_s;
  std::string known;
  for (const auto& n : noise_field_names()) known += (known.empty() ? "" : ", ") + n;
  throw DomainError("noise field '" + field + "' is unknown (known: " + known + ")");
}

double noise_field(const NoiseModel& noise, const std::string& field) {
  return noise_field(const_cast<NoiseModel&>(noise), field);
}

Protocol with_noise_value(const Protocol& protocol, const std::string& field, double value) {
  Protocol copy = protocol;
  double& slot = noise_field(copy.noise, field);
  if (!(std::isfinite(value) && value >= 0.0))
    throw DomainError("noise " + field + " = " + std::to_string(value) +
                      ", but must be finite and >= 0");
  slot = value;
  auto& u = copy.uncertain_noise;
  u.erase(std::remove_if(u.begin(), u.end(),
                         [&](const UncertainValue& v) { return v.field == field; }),
          u.end());
  return copy;
}

}  // namespace macroreal
