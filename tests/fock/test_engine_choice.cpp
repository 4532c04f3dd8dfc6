// Engine choice (lib/fock/engine_choice.hpp): the rules stated in its header.
#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "fock/density_matrix_state.hpp"
#include "fock/engine_choice.hpp"
#include "fock/fock_tabulation.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

MeasurementSequence steps(int k, double dephasing) {
  MeasurementSequence seq;
  for (int j = 0; j < k; ++j) {
    TimedMeasurement tm;
    tm.label = std::string(1, static_cast<char>('A' + j));
    tm.measurement.beta = std::polar(1.5, 0.7 * j);
    tm.time_s = 50e-6 * (j + 1);
    seq.steps.push_back(tm);
  }
  seq.noise.dephasing_rate_per_s = dephasing;
  return seq;
}

}  // namespace

TEST_CASE("engine choice: automatic rules", "[fock]") {
  const auto thermal = make_thermal(0.3);
  CHECK(choose_engine(EngineKind::automatic, *thermal, {steps(3, 0.0)}).kind == EngineKind::weyl);
  const auto dm = std::make_shared<const DensityMatrixState>(thermal_density(0.3, 40) /
                                                             thermal_density(0.3, 40).trace().real());
  CHECK(choose_engine(EngineKind::automatic, *dm, {steps(2, 0.0)}).kind == EngineKind::fock);
  FockEngineOptions fo;
  fo.interaction_duration_s["A"] = 20e-6;
  CHECK(choose_engine(EngineKind::automatic, *thermal, {steps(2, 0.0)}, fo).kind == EngineKind::fock);
  // 3 intervals of dephasing: 24^3 evaluations, within the Weyl limit; 5 intervals: 24^5 > 2e6.
  CHECK(choose_engine(EngineKind::automatic, *thermal, {steps(3, 100.0)}).kind == EngineKind::weyl);
  const auto five = choose_engine(EngineKind::automatic, *thermal, {steps(5, 100.0)});
  CHECK(five.kind == EngineKind::fock);
  CHECK_THAT(five.reason, Catch::Contains("dephasing"));
  CHECK(choose_engine(EngineKind::fock, *thermal, {}).kind == EngineKind::fock);
  CHECK(parse_engine_kind("auto") == EngineKind::automatic);
  CHECK_THROWS_AS(parse_engine_kind("qutip"), DomainError);
}

TEST_CASE("engine choice: both choices give the same correlator", "[fock]") {
  // The two engines agree (see test_engine_agreement.cpp); the wrapper must not change values.
  const auto cat = make_cat({1.1, 0.4}, 0.0);
  const auto seq = steps(3, 200.0);
  const ModelEngine weyl(cat, EngineKind::weyl, {seq});
  const ModelEngine fock(cat, EngineKind::fock, {seq});
  CHECK(weyl.name() == "weyl");
  CHECK(fock.name() == "fock");
  CHECK_CLOSE(weyl.correlator(seq).value, fock.correlator(seq).value, 1e-9, 0.0);
}
