// Reader of the QuTiP reference set for modular-measurement sequences
// (tests/reference/qutip_weyl_reference.py writes it): builds the states and sequences of its
// cases with the library API, and chooses the copy regenerated in the build directory over
// the committed one. Shared by the Weyl-engine and the Fock-engine comparisons.
#pragma once

#include <filesystem>
#include <stdexcept>
#include <string>
#include <vector>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "phase_space/sequence.hpp"
#include "phase_space/state.hpp"
#include "phase_space/temporal_tests.hpp"

namespace macroreal::testing {

inline cplx complex_of(const nlohmann::json& v) { return {v.at(0).get<double>(), v.at(1).get<double>()}; }

inline StatePtr state_of(const nlohmann::json& s) {
  const std::string kind = s.at("kind");
  if (kind == "thermal") return make_thermal(s.at("nbar"));
  if (kind == "coherent") return make_coherent(complex_of(s.at("alpha")));
  if (kind == "squeezed")
    return make_squeezed(s.at("r"), s.at("theta_rad"), s.value("nbar", 0.0),
                         s.contains("alpha") ? complex_of(s.at("alpha")) : cplx(0.0));
  if (kind == "fock") return make_fock(s.at("n"));
  if (kind == "cat") return make_cat(complex_of(s.at("alpha")), s.at("relative_phase_rad"));
  throw std::runtime_error("reference file: unknown state kind " + kind);
}

inline MeasurementSequence sequence_of(const nlohmann::json& c) {
  MeasurementSequence seq;
  for (const nlohmann::json& m : c.at("measurements")) {
    TimedMeasurement t;
    t.label = m.at("label");
    t.measurement.beta = complex_of(m.at("beta"));
    t.measurement.phase_rad = m.at("phase_rad");
    t.measurement.split = parse_split(m.at("split"));
    t.measurement.contrast = m.at("contrast");
    t.time_s = m.at("time_s");
    seq.steps.push_back(t);
  }
  const nlohmann::json& n = c.at("noise");
  seq.noise.heating_quanta_per_s = n.at("heating_quanta_per_s");
  seq.noise.damping_rate_per_s = n.at("damping_rate_per_s");
  seq.noise.bath_nbar = n.at("bath_nbar");
  seq.noise.dephasing_rate_per_s = n.at("dephasing_rate_per_s");
  seq.noise.frequency_noise_sd_rad_per_s = n.at("frequency_noise_sd_rad_per_s");
  seq.noise.force_noise_quanta_per_s = n.at("force_noise_quanta_per_s");
  return seq;
}

inline std::vector<int> steps_of_key(const std::string& key) {  // "13" -> {0, 2}
  std::vector<int> s;
  for (char ch : key) s.push_back(ch - '1');
  return s;
}

struct ReferenceFile {
  std::filesystem::path path;
  bool regenerated = false;  // true: written by QuTiP in this build; false: the committed copy
};

// The regenerated copy (CTest label `long` runs the script) if present, else the committed one.
inline ReferenceFile qutip_weyl_reference_file() {
  const std::filesystem::path regenerated =
      std::filesystem::path(MACROREAL_BINARY_DIR) / "reference" / "qutip_weyl_reference.json";
  const std::filesystem::path committed =
      std::filesystem::path(MACROREAL_SOURCE_DIR) / "tests" / "reference" / "qutip_weyl_reference.json";
  if (std::filesystem::exists(regenerated)) return {regenerated, true};
  return {committed, false};
}

// Every value of one reference case (probabilities, correlators, last average, K3, NSIT S)
// computed by `engine` (either engine: same interface) and handed to compare(ours, reference),
// with Catch2 INFO context naming the value. One loop for both engines' reference tests.
template <class Engine, class Compare>
void compare_reference_case(const Engine& engine, const nlohmann::json& c, Compare&& compare) {
  const MeasurementSequence seq = sequence_of(c);
  for (const nlohmann::json& p : c.at("probabilities")) {
    const auto sub = subsequence(seq, p.at("steps").get<std::vector<int>>());
    INFO("steps " << p.at("steps").dump() << " outcomes " << p.at("outcomes").get<std::string>());
    compare(engine.probability_value(sub, parse_outcomes(p.at("outcomes"))), p.at("p").get<double>());
  }
  for (const auto& item : c.at("correlators").items()) {
    const std::string& key = item.key();
    const nlohmann::json& value = item.value();
    INFO("correlator C" << key);
    compare(engine.correlator_value(subsequence(seq, steps_of_key(key))), value.get<double>());
  }
  compare(engine.last_average(seq).value, c.at("last_average").get<double>());
  if (c.contains("K3")) compare(leggett_garg3(engine, seq).K, c.at("K3").get<double>());
  for (const nlohmann::json& s : c.at("nsit")) {
    INFO("NSIT " << s.at("from").get<int>() << " -> " << s.at("to").get<int>());
    compare(nsit_signalling(engine, seq, s.at("from"), s.at("to")), s.at("S").get<double>());
  }
}

}  // namespace macroreal::testing
