#include "protocol/protocol.hpp"

#include <algorithm>

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

}  // namespace macroreal
