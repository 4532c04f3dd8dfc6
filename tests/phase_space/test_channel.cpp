// Gaussian channel: closed form against a direct integration of the Lindblad equation on a
// truncated Fock space, composition, steady state, limits and validation.
#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "phase_space/channel.hpp"
#include "phase_space/fock_matrices.hpp"
#include "phase_space/state.hpp"
#include "support/compare.hpp"

using namespace macroreal;
using namespace macroreal::testing;


TEST_CASE("GaussianChannel::over matches the Lindblad equation integrated directly",
          "[phase_space]") {
  const int dim = 40;
  const cplx alpha(1.0, -0.6);
  const Vec v = coherent_vector(dim, alpha);
  const Mat rho0 = v * v.adjoint();
  NoiseModel nm;
  nm.damping_rate_per_s = 0.8;
  nm.bath_nbar = 0.3;
  nm.heating_quanta_per_s = 0.15;
  nm.force_noise_quanta_per_s = 0.05;
  const double t = 0.7;
  const Mat rho = lindblad_evolve(nm, rho0, t, 700);
  const auto ch = GaussianChannel::over(nm, t);
  const auto coh = make_coherent(alpha);
  for (cplx b : {cplx(0.3, 0.1), cplx(-0.8, 0.5), cplx(1.1, -1.2)}) {
    // Heisenberg picture: chi_out(b) = Tr[rho0 Phi^dag(D(b))].
    auto x = WeylSum::displacement(b);
    ch.apply_adjoint(x);
    const cplx got = coh->expectation(x);
    const cd ref = chi_of(rho, b);
    CHECK_CLOSE(got.real(), ref.real(), 1e-8, 0.0);
    CHECK_CLOSE(got.imag(), ref.imag(), 1e-8, 0.0);
  }
}

TEST_CASE("GaussianChannel: composition, steady state and the gamma -> 0 limit", "[phase_space]") {
  NoiseModel nm;
  nm.damping_rate_per_s = 120.0;
  nm.bath_nbar = 2.5;
  nm.heating_quanta_per_s = 30.0;
  SECTION("over(t1) then over(t2) == over(t1 + t2) (semigroup property, common practice)") {
    const auto a = GaussianChannel::over(nm, 3e-3).then(GaussianChannel::over(nm, 5e-3));
    const auto b = GaussianChannel::over(nm, 8e-3);
    CHECK_CLOSE(a.shrink, b.shrink, 1e-15, 1e-13);
    CHECK_CLOSE(a.diffusion, b.diffusion, 1e-15, 1e-13);
  }
  SECTION("steady state is thermal with nbar = n_th + ndot/gamma") {
    // Long-time limit of chi_out: exp(-(n_th + 1/2 + ndot/gamma)|b|^2), i.e. a thermal state
    // (the stationary solution of the damped, heated oscillator; Gardiner & Zoller, Quantum
    // Noise, 3rd ed. (2004), sec. 5.2, from memory).
    const auto ch = GaussianChannel::over(nm, 1.0);  // gamma t = 120
    const auto st = make_coherent(cplx(3.0, 1.0));
    const cplx b(0.4, 0.3);
    auto x = WeylSum::displacement(b);
    ch.apply_adjoint(x);
    const double nbar = nm.bath_nbar + nm.heating_quanta_per_s / nm.damping_rate_per_s;
    CHECK_CLOSE(std::abs(st->expectation(x) - make_thermal(nbar)->characteristic(b)), 0.0,
                1e-14, 0.0);
  }
  SECTION("gamma -> 0 gives pure heating exp(-ndot t |b|^2) without cancellation") {
    NoiseModel h;
    h.heating_quanta_per_s = 20.0;
    const auto a = GaussianChannel::over(h, 1e-4);
    CHECK(a.shrink == 1.0);
    CHECK_CLOSE(a.diffusion, 20.0 * 1e-4, 0.0, 1e-15);
    h.damping_rate_per_s = 1e-12;  // tiny gamma: same within the first-order correction
    const auto b = GaussianChannel::over(h, 1e-4);
    CHECK_CLOSE(b.diffusion, 0.5 * 1e-16 + 20.0 * 1e-4, 0.0, 1e-12);
  }
  SECTION("validation names the field") {
    NoiseModel bad;
    bad.heating_quanta_per_s = -1.0;
    CHECK_THROWS_WITH(bad.validate(), "noise.heating_quanta_per_s = -1, but must be >= 0");
    bad.heating_quanta_per_s = 0.0;
    bad.bath_nbar = std::nan("");
    CHECK_THROWS_WITH(bad.validate(), Catch::Contains("noise.bath_nbar"));
    CHECK_THROWS_AS(GaussianChannel::over(nm, -1.0), DomainError);
  }
}
