// The Fock engine against the Weyl engine on randomised protocols (DESIGN.md section 2: the two
// engines compute the same probabilities). The Weyl engine is exact (closed-form chi and the
// exact Gaussian-channel action), so agreement checks the Fock engine's Kraus matrices,
// Lindblad propagation, rotations and quadrature; and the Weyl engine's effect-operator
// algebra in turn.
#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "fock/fock_engine.hpp"
#include "phase_space/weyl_engine.hpp"
#include "support/compare.hpp"
#include "sweep_support.hpp"

using namespace macroreal;

namespace {

void sweep(int count, std::uint64_t seed, const testing::SweepLimits& lim, double tol) {
  testing::Draw d(seed);
  double worst = 0.0;
  int refused = 0, refused_fock = 0;
  for (int i = 0; i < count; ++i) {
    const auto p = testing::random_protocol(d, i, lim);
    FockEngineOptions fo;
    fo.check_truncation = false;  // tested on its own in test_fock_engine.cpp
    const FockEngine fock(p.state, fo);
    const WeylEngine weyl(p.state);
    INFO("protocol " << i << ": " << p.state_text << ", " << p.seq.steps.size()
                     << " steps, damping " << p.seq.noise.damping_rate_per_s << ", heating "
                     << p.seq.noise.heating_quanta_per_s << ", sigma "
                     << p.seq.noise.frequency_noise_sd_rad_per_s << ", dephasing "
                     << p.seq.noise.dephasing_rate_per_s);
    double pw = 0.0;
    try {
      pw = weyl.probability(p.seq, p.outcomes).value;
    } catch (const UnsupportedError&) {
      // The Weyl engine's frequency-noise quadrature (Gauss-Hermite in delta) needs more
      // nodes than allowed: no reference value for this protocol.
      ++refused;
      continue;
    }
    double pf = 0.0;
    try {
      pf = fock.probability(p.seq, p.outcomes).value;
    } catch (const UnsupportedError&) {
      // The Fock engine's frequency-noise quadrature (nested trapezoidal rule) did not
      // confirm its tolerance within max_quadrature_nodes: it refuses rather than return an
      // unconverged value.
      ++refused_fock;
      continue;
    }
    CHECK_CLOSE(pf, pw, tol, 0.0);
    const double cf = fock.correlator(p.seq).value, cw = weyl.correlator(p.seq).value;
    CHECK_CLOSE(cf, cw, tol, 0.0);
    worst = std::max({worst, std::abs(pf - pw), std::abs(cf - cw)});
    if (i % 4 == 0) {  // the unselective maps, on a quarter of the protocols (time)
      const double lf = fock.last_average(p.seq).value, lw = weyl.last_average(p.seq).value;
      CHECK_CLOSE(lf, lw, tol, 0.0);
      worst = std::max(worst, std::abs(lf - lw));
    }
  }
  WARN("largest |Fock - Weyl| over " << count - refused - refused_fock << " protocols: " << worst
       << " (" << refused << " refused by the Weyl engine's quadrature limit, " << refused_fock
       << " by the Fock engine's)");
  CHECK(refused + refused_fock <= count / 20);
}

}  // namespace

TEST_CASE("engine agreement: Fock and Weyl engines on 200 random protocols", "[fock]") {
  // States thermal/coherent/squeezed/Fock/cat, both splits, random phases and contrasts,
  // damping with bath, heating, quasi-static frequency noise, Markovian dephasing (two-step
  // sequences, where the Weyl engine's per-interval angle quadrature stays small).
  sweep(200, 20261202, {}, 1e-9);
}

TEST_CASE("engine agreement: larger displacements and occupations", "[fock][long]") {
  testing::SweepLimits lim;
  lim.beta_max = 3.0;
  lim.nbar_max = 1.5;
  sweep(300, 7, lim, 1e-9);
}
