// Finite-duration (sliced) measurements in the Weyl engine (issue 4): exact composition without
// noise, n^-2 convergence of the splitting, the error estimate, agreement with the Fock engine's
// identical discretisation, and the continuum limit for a thermal state with heating.
#include <cmath>

#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "fock/fock_engine.hpp"
#include "phase_space/weyl_engine.hpp"
#include "protocol/protocol_reader.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

TimedMeasurement step(const char* label, cplx beta, double phase, Split split, double t,
                      double dur) {
  TimedMeasurement m;
  m.label = label;
  m.measurement.beta = beta;
  m.measurement.phase_rad = phase;
  m.measurement.split = split;
  m.measurement.contrast = 0.9;
  m.time_s = t;
  m.duration_s = dur;
  return m;
}

MeasurementSequence two_steps(Split split, double dur) {
  MeasurementSequence seq;
  seq.steps.push_back(step("A", {0.9, 0.3}, 0.4, split, 20e-6, dur));
  seq.steps.push_back(step("B", {-0.4, 0.7}, -1.1, split, 150e-6, dur));
  return seq;
}

WeylEngine weyl(StatePtr s, int slices) {
  WeylEngineOptions o;
  o.interaction_slices = slices;
  return WeylEngine(std::move(s), o);
}

}  // namespace

TEST_CASE("Weyl slices: without noise the sliced measurement is the instantaneous one",
          "[phase_space]") {
  // Collinear displacements compose without phase, D(b/n)^n = D(b) (Weyl relation
  // D(a)D(b) = e^{i Im(a b*)} D(a+b), Im = 0 for collinear a, b; textbook), so without noise
  // every n gives the instantaneous value up to round-off.
  const auto state = make_cat({1.1, -0.4}, 0.6);
  for (Split split : {Split::symmetric, Split::one_sided}) {
    const auto inst = two_steps(split, 0.0);
    const auto sliced = two_steps(split, 60e-6);
    for (int n : {1, 3, 16}) {
      const auto e = weyl(state, n);
      CHECK_CLOSE(e.correlator(sliced).value, e.correlator(inst).value, 1e-14, 0.0);
      CHECK_CLOSE(e.probability(sliced, {+1, -1}).value, e.probability(inst, {+1, -1}).value,
                  1e-14, 0.0);
      CHECK(e.probability(sliced, {+1}).slices == n);
      CHECK(e.probability(inst, {+1}).slices == 0);
    }
  }
}

TEST_CASE("Weyl slices: convergence as n^-2 and the error estimate", "[phase_space]") {
  // Strang splitting has error O(n^-2) with only even powers (common practice, no source):
  // |v_2n - v_n| falls by ~4 per doubling, and the Richardson value lies within the reported
  // estimate of a fine-slicing reference (n = 1024).
  const auto state = make_coherent({0.8, 0.5});
  for (Split split : {Split::symmetric, Split::one_sided}) {
    auto seq = two_steps(split, 100e-6);
    seq.noise.heating_quanta_per_s = 3000.0;
    seq.noise.damping_rate_per_s = 4000.0;
    seq.noise.bath_nbar = 0.3;
    const double ref = weyl(state, 1024).correlator(seq).value;
    double prev = 0.0;
    for (int n : {2, 4, 8, 16, 32}) {
      const auto v = weyl(state, n).correlator(seq);
      INFO("split " << to_string(split) << ", n = " << n << ": value " << v.value
                    << ", change " << v.slicing_change << ", actual error " << v.value - ref);
      CHECK(v.slicing_change > 0.0);
      CHECK(std::abs(v.value - ref) <= v.slicing_change);
      CHECK(v.error_estimate == v.slicing_change);
      if (prev > 0.0) {
        CHECK(v.slicing_change < prev / 3.5);
        CHECK(v.slicing_change > prev / 4.5);
      }
      prev = v.slicing_change;
    }
  }
}

TEST_CASE("Weyl slices: continuum limit for a thermal state with heating", "[phase_space]") {
  // Derived here. Pure heating at rate ndot is a random force: a circular Gaussian
  // displacement xi with E|xi|^2 = ndot t (channel.hpp). The two probe branches see the same
  // force but are displaced by -+beta t/(2T) during the interaction [t0, t0 + T]; writing
  // Tr[U_B rho U_A^dag] = Tr[U_A^dag U_B rho] and commuting each common kick D(dxi) through
  // the relative displacement g(t) = beta (t - t0)/T gives the factor e^{2i Im(g dxi*)},
  // whose average is exp(-|g|^2 ndot dt). Before the interaction the relative displacement is
  // already beta in the Heisenberg picture (factor exp(-ndot t0 |beta|^2)), so
  //   Tr R_BA = chi_th(beta) exp(-ndot |beta|^2 (t0 + T/3)),  chi_th = e^{-(nbar+1/2)|b|^2},
  //   P(+) = 1/2 + c/2 cos(phi) Tr R_BA   (chi_th real).
  const double nbar = 0.7, ndot = 2000.0, t0 = 30e-6, T = 150e-6, phi = 0.5, c = 0.9;
  const cplx beta(0.8, -0.6);
  MeasurementSequence seq;
  seq.steps.push_back(step("A", beta, phi, Split::symmetric, t0, T));
  seq.noise.heating_quanta_per_s = ndot;
  const double b2 = std::norm(beta);
  const double expected =
      0.5 + 0.5 * c * std::cos(phi) * std::exp(-(nbar + 0.5) * b2 - ndot * b2 * (t0 + T / 3.0));
  const auto v = weyl(make_thermal(nbar), 32).probability(seq, {+1});
  // Richardson removes the n^-2 term; the n^-4 remainder at n = 32 is ~1e-11, within the
  // reported slicing estimate.
  CHECK_CLOSE(v.value, expected, 1e-9, 0.0);
  CHECK(std::abs(v.value - expected) <= v.slicing_change);
  // The instantaneous measurement at t0 (no decoherence during it) differs visibly.
  seq.steps[0].duration_s = 0.0;
  CHECK(std::abs(weyl(make_thermal(nbar), 32).probability(seq, {+1}).value - expected) > 1e-3);
}

TEST_CASE("Weyl slices: agreement with the Fock engine at equal slices", "[phase_space]") {
  // Both engines implement the same discretisation (fock_engine.hpp, sliced_measurement.hpp):
  // the Fock engine by dense matrices and an exact Lindblad propagator, the Weyl engine by the
  // exact Gaussian channel on displacement sums, so they agree to the Fock truncation error.
  struct Case {
    const char* name;
    StatePtr state;
  };
  const Case cases[] = {{"thermal 0.5", make_thermal(0.5)},
                        {"coherent (0.7, 0.4)", make_coherent({0.7, 0.4})},
                        {"cat (1.0, 0.3) phase 0.8", make_cat({1.0, 0.3}, 0.8)}};
  double worst = 0.0;
  for (const auto& cs : cases)
    for (Split split : {Split::symmetric, Split::one_sided}) {
      auto seq = two_steps(split, 80e-6);
      seq.noise.heating_quanta_per_s = 2500.0;
      seq.noise.damping_rate_per_s = 3000.0;
      seq.noise.bath_nbar = 0.2;
      FockEngineOptions fo;
      fo.interaction_slices = 8;
      const FockEngine fock(cs.state, fo);
      const auto w = weyl(cs.state, 8);
      for (const OutcomeString& o : {OutcomeString{+1}, OutcomeString{-1, +1}}) {
        const double pw = w.probability(seq, o).value, pf = fock.probability(seq, o).value;
        INFO(cs.name << ", " << to_string(split) << ", outcomes " << to_string(o));
        CHECK_CLOSE(pw, pf, 1e-9, 0.0);
        worst = std::max(worst, std::abs(pw - pf));
      }
      const auto cw = w.correlator(seq), cf = fock.correlator(seq);
      CHECK_CLOSE(cw.value, cf.value, 1e-9, 0.0);
      CHECK_CLOSE(cw.slicing_change, cf.slicing_change, 1e-9, 0.0);
      worst = std::max(worst, std::abs(cw.value - cf.value));
    }
  WARN("largest Weyl-Fock difference with slices: " << worst);
}

TEST_CASE("Weyl slices: validation and refusals", "[phase_space]") {
  const auto e = weyl(make_thermal(0.1), 4);
  auto seq = two_steps(Split::symmetric, 200e-6);  // A ends at 220 us, after B starts at 150 us
  CHECK_THROWS_WITH(e.correlator(seq), Catch::Contains("step B") && Catch::Contains("step A") &&
                                           Catch::Contains("has ended"));
  seq = two_steps(Split::symmetric, -1e-6);
  CHECK_THROWS_WITH(e.correlator(seq), Catch::Contains("duration_s"));
  seq = two_steps(Split::symmetric, 50e-6);
  seq.noise.dephasing_rate_per_s = 100.0;
  CHECK_THROWS_WITH(e.correlator(seq), Catch::Contains("Fock engine"));
  CHECK_THROWS_AS(e.correlator(seq), UnsupportedError);
  seq.steps[0].duration_s = seq.steps[1].duration_s = 0.0;
  CHECK_NOTHROW(e.correlator(seq));
}

TEST_CASE("Weyl slices: protocol files carry duration_s into the sequence", "[phase_space]") {
  // Invented protocol text; the reader's rule (optional, >= 0) is this project's format.
  const std::string text = R"({
    "format": "macroreal-protocol/1",
    "title": "duration test, invented",
    "state": {"kind": "thermal", "nbar": 0.3},
    "measurements": {
      "A": {"beta": [0.5, 0.0], "time_s": 0.0, "duration_s": 2e-5},
      "B": {"beta": [0.0, 0.5], "time_s": 1e-4}
    },
    "sequences": [{"name": "AB+", "steps": ["A", "B"], "dark_is": ["+", "+"]}],
    "tests": [{"kind": "nsit", "from": "A", "to": "B"}]
  })";
  const auto seq = parse_protocol_text(text, "test.json").sequence_of({"A", "B"});
  CHECK(seq.steps[0].duration_s == 2e-5);
  CHECK(seq.steps[1].duration_s == 0.0);
  std::string bad = text;
  bad.replace(bad.find("2e-5"), 4, "-1e-5");
  CHECK_THROWS_AS(parse_protocol_text(bad, "test.json"), InputError);
}
