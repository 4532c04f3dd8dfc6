// The Fock engine against QuTiP 4.7 mesolve: Markovian dephasing (with damping and heating
// acting together) and finite-duration measurements simulated on probe (x) oscillator with the
// spin-dependent-force Hamiltonian (tests/reference/qutip_mesolve_reference.py, which documents
// the model). Tolerance 1e-7 absolute, as asked of the engine; the solver's own tolerances are
// atol 1e-12, rtol 1e-10.
#include <fstream>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "fock/fock_engine.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

StatePtr state_of(const nlohmann::json& s) {
  const std::string k = s["kind"];
  if (k == "thermal") return make_thermal(s["nbar"]);
  if (k == "coherent") return make_coherent({s["alpha"][0].get<double>(), s["alpha"][1].get<double>()});
  if (k == "fock") return make_fock(s["n"]);
  if (k == "cat")
    return make_cat({s["alpha"][0].get<double>(), s["alpha"][1].get<double>()},
                    s["relative_phase_rad"]);
  if (k == "squeezed") return make_squeezed(s["r"], s["theta_rad"]);
  FAIL("unknown state kind " << k);
  return nullptr;
}

}  // namespace

TEST_CASE("Fock engine: dephasing and finite-duration measurements match QuTiP mesolve", "[fock]") {
  std::ifstream in(std::string(MACROREAL_SOURCE_DIR) + "/tests/reference/qutip_mesolve_reference.json");
  REQUIRE(in.good());
  const auto ref = nlohmann::json::parse(in);
  int compared = 0;
  double worst = 0.0;
  for (const auto& c : ref["cases"]) {
    MeasurementSequence seq;
    FockEngineOptions opt;
    int j = 0;
    for (const auto& m : c["measurements"]) {
      TimedMeasurement tm;
      tm.label = std::string(1, static_cast<char>('A' + j++));
      tm.measurement.beta = {m["beta"][0].get<double>(), m["beta"][1].get<double>()};
      tm.measurement.phase_rad = m["phase_rad"];
      tm.measurement.split = parse_split(m["split"]);
      tm.measurement.contrast = m["contrast"];
      tm.time_s = m["time_s"];
      opt.interaction_duration_s[tm.label] = m["duration_s"];
      seq.steps.push_back(tm);
    }
    const auto& nz = c["noise"];
    seq.noise.damping_rate_per_s = nz.value("damping_rate_per_s", 0.0);
    seq.noise.bath_nbar = nz.value("bath_nbar", 0.0);
    seq.noise.heating_quanta_per_s = nz.value("heating_quanta_per_s", 0.0);
    seq.noise.dephasing_rate_per_s = nz.value("dephasing_rate_per_s", 0.0);
    const FockEngine engine(state_of(c["state"]), opt);
    for (const auto& q : c["quantities"]) {
      const double want = q["value"];
      FockValue got;
      if (q["kind"] == "correlator") {
        got = engine.correlator_detailed(seq);
      } else {
        const OutcomeString o = parse_outcomes(q["outcomes"]);
        MeasurementSequence part = seq;
        part.steps.resize(o.size());
        got = engine.probability_detailed(part, o);
      }
      INFO(c["title"].get<std::string>() << " " << q["kind"] << ": cutoff "
           << got.diagnostics.cutoff << ", slicing change " << got.diagnostics.slicing_change
           << ", truncation change " << got.diagnostics.truncation_change);
      CHECK_CLOSE(got.value.value, want, 1e-7, 0.0);
      worst = std::max(worst, std::abs(got.value.value - want));
      ++compared;
    }
  }
  CHECK(compared >= 10);
  WARN("largest |Fock engine - QuTiP mesolve| over " << compared << " values: " << worst);
}
