// Prepared (post-selected) states against superposition states and truncated matrices.
#include <random>

#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "phase_space/prepared_state.hpp"
#include "phase_space/sequence_reference.hpp"
#include "support/compare.hpp"

using namespace macroreal;
using namespace macroreal::testing;

TEST_CASE("PreparedState: a symmetric modular measurement on vacuum prepares a cat",
          "[phase_space]") {
  // K_o |0> = 1/2 [ |-beta/2> + o e^{i phi} |beta/2> ] (DESIGN.md §2 Kraus operator, D(b)|0> =
  // |b>): the same state as make_superposition of the two coherent components.
  const cplx beta(2.6, 0.8);
  const double phi = 0.7;
  ModularMeasurement m;
  m.beta = beta;
  m.phase_rad = phi;
  for (int o : {1, -1}) {
    const auto prep = make_prepared(make_fock(0), {m}, {o});
    using K = PureComponent::Kind;
    const auto sup = make_superposition({{K::coherent, 1.0, -0.5 * beta, 0},
                                         {K::coherent, static_cast<double>(o) * std::polar(1.0, phi), 0.5 * beta, 0}});
    std::mt19937_64 rng(3);
    std::uniform_real_distribution<double> u(-3.0, 3.0);
    for (int k = 0; k < 20; ++k) {
      const cplx b(u(rng), u(rng));
      CHECK_CLOSE(prep->characteristic(b).real(), sup->characteristic(b).real(), 1e-13, 0.0);
      CHECK_CLOSE(prep->characteristic(b).imag(), sup->characteristic(b).imag(), 1e-13, 0.0);
    }
    // p = 1/2 [1 + o Re(e^{i phi} chi_vac(beta))] (DESIGN.md §2).
    const auto* ps = dynamic_cast<const PreparedState*>(prep.get());
    REQUIRE(ps != nullptr);
    CHECK_CLOSE(ps->preparation_probability(),
                0.5 * (1.0 + o * std::cos(phi) * std::exp(-0.5 * std::norm(beta))), 1e-15, 0.0);
    CHECK_FALSE(prep->wigner_nonnegative());
  }
}

TEST_CASE("PreparedState: nesting equals a two-step preparation and the matrix reference",
          "[phase_space]") {
  ModularMeasurement m1, m2;
  m1.beta = cplx(1.2, 0.3);
  m1.phase_rad = 0.4;
  m1.contrast = 0.9;
  m2.beta = cplx(-0.5, 1.0);
  m2.split = Split::one_sided;
  m2.phase_rad = -1.0;
  const auto base = make_thermal(0.3);
  const auto nested = make_prepared(make_prepared(base, {m1}, {1}), {m2}, {-1});
  const auto flat = make_prepared(base, {m1, m2}, {1, -1});
  // Reference: the post-measurement density matrix (sequence_reference.hpp), normalised.
  const int dim = 40;
  MeasurementSequence seq;
  seq.steps.resize(2);
  seq.steps[0].measurement = m1;
  seq.steps[1].measurement = m2;
  Mat rho = sequence_state(thermal_matrix(dim, 0.3), seq, {1, -1}, 1);
  const double p = rho.trace().real();
  rho /= p;
  CHECK_CLOSE(dynamic_cast<const PreparedState&>(*flat).preparation_probability(), p, 1e-10, 0.0);
  for (cplx b : {cplx(0.2, 0.1), cplx(-0.7, 0.9), cplx(1.3, -0.4)}) {
    const cd ref = chi_of(rho, b);
    CHECK_CLOSE(nested->characteristic(b).real(), flat->characteristic(b).real(), 1e-13, 0.0);
    CHECK_CLOSE(nested->characteristic(b).imag(), flat->characteristic(b).imag(), 1e-13, 0.0);
    CHECK_CLOSE(flat->characteristic(b).real(), ref.real(), 1e-9, 0.0);
    CHECK_CLOSE(flat->characteristic(b).imag(), ref.imag(), 1e-9, 0.0);
  }
}

TEST_CASE("PreparedState: noise between steps and failure paths", "[phase_space]") {
  ModularMeasurement m1, m2;
  m1.beta = cplx(1.0, 0.0);
  m2.beta = cplx(0.0, 1.0);
  NoiseModel nm;
  nm.damping_rate_per_s = 0.5;
  nm.heating_quanta_per_s = 0.2;
  const auto prep = make_prepared(make_fock(1), {m1, m2}, {1, 1}, nm, {0.0, 0.4});
  const int dim = 40;
  MeasurementSequence seq;
  seq.noise = nm;
  seq.steps.resize(2);
  seq.steps[0].measurement = m1;
  seq.steps[1].measurement = m2;
  seq.steps[1].time_s = 0.4;
  const Vec f = fock_vector(dim, 1);
  Mat rho = sequence_state(f * f.adjoint(), seq, {1, 1}, 1000);
  rho /= rho.trace().real();
  const cplx b(0.5, -0.3);
  CHECK_CLOSE(prep->characteristic(b).real(), chi_of(rho, b).real(), 1e-8, 0.0);
  CHECK_CLOSE(prep->characteristic(b).imag(), chi_of(rho, b).imag(), 1e-8, 0.0);
  // Outcome of probability ~ 0: a one-sided measurement with beta = 0 and phase 0 gives
  // K_- = 0 exactly.
  ModularMeasurement zero;
  zero.split = Split::one_sided;
  CHECK_THROWS_WITH(make_prepared(make_thermal(0.1), {zero}, {-1}),
                    Catch::Contains("preparation outcome has probability"));
  CHECK_THROWS_AS(make_prepared(make_thermal(0.1), {m1}, {1, 1}), DomainError);
  NoiseModel rot;
  rot.dephasing_rate_per_s = 1.0;
  CHECK_THROWS_AS(make_prepared(make_thermal(0.1), {m1}, {1}, rot), UnsupportedError);
}
