// The closed-form NSIT decomposition against nsit_signalling() computed by the Weyl engine.
#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "phase_space/temporal_tests.hpp"
#include "phase_space/weyl_engine.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

MeasurementSequence two_steps(Split split_a, double contrast_b) {
  MeasurementSequence seq;
  TimedMeasurement a, b;
  // Built from a char list: GCC 12 warns falsely (-Wrestrict) on assigning a short literal here.
  a.label = std::string{'A'};
  a.measurement.beta = cplx(1.4, 0.6);
  a.measurement.phase_rad = 0.5;
  a.measurement.split = split_a;
  a.measurement.contrast = 0.8;
  a.time_s = 50e-6;
  b.label = std::string{'B'};
  b.measurement.beta = std::polar(1.8, 1.0);
  b.measurement.phase_rad = -0.3;
  b.measurement.contrast = contrast_b;
  b.time_s = 150e-6;
  seq.steps = {a, b};
  seq.noise.heating_quanta_per_s = 500.0;
  seq.noise.damping_rate_per_s = 2000.0;
  seq.noise.bath_nbar = 0.4;
  return seq;
}

}  // namespace

TEST_CASE("nsit_decomposition equals nsit_signalling for both splits, with noise",
          "[phase_space]") {
  // S = P_B(+) - sum_a P_AB(a, +) (DESIGN.md §2) from the engine's probabilities, against the
  // closed form in temporal_tests.hpp (derived from the Kraus operators there).
  const std::vector<StatePtr> states = {make_thermal(0.3), make_fock(2), make_cat(cplx(1.2, 0.4), 0.9),
                                        make_squeezed(0.6, 0.8, 0.1, cplx(0.5, -0.2)),
                                        make_coherent(cplx(-0.7, 1.1))};
  int nonzero = 0;
  for (Split split : {Split::symmetric, Split::one_sided})
    for (double cb : {1.0, 0.6})
      for (const auto& st : states) {
        const auto seq = two_steps(split, cb);
        const WeylEngine eng(st);
        const double s_engine = nsit_signalling(eng, seq, 0, 1);
        const auto dec = nsit_decomposition(*st, seq, 0, 1);
        INFO(st->describe() << " split " << to_string(split));
        CHECK_CLOSE(dec.S, s_engine, 1e-14, 0.0);
        if (std::abs(s_engine) > 1e-3) ++nonzero;
        CHECK(dec.kick_phase_rad == (split == Split::symmetric ? 0.0 : -dec.geometric_phase_rad));
      }
  CHECK(nonzero >= 10);  // the check is not vacuous: most cases signal
}

TEST_CASE("nsit_decomposition refuses rotating noise", "[phase_space]") {
  auto seq = two_steps(Split::symmetric, 1.0);
  seq.noise.dephasing_rate_per_s = 1.0;
  CHECK_THROWS_AS(nsit_decomposition(*make_thermal(0.1), seq, 0, 1), UnsupportedError);
}
