// Characteristic functions of the state factories against truncated-matrix evaluations
// Tr[rho D(b)] (fock_matrices.hpp) and against the Gaussian-moment formula.
#include <random>

#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "phase_space/fock_matrices.hpp"
#include "phase_space/state.hpp"
#include "support/compare.hpp"

using namespace macroreal;
using namespace macroreal::testing;

namespace {

void check_chi(const State& s, const Mat& rho, const std::vector<cplx>& points, double tol) {
  for (cplx b : points) {
    const cd ref = chi_of(rho, b);
    const cplx got = s.characteristic(b);
    INFO(s.describe() << " at beta = " << b);
    CHECK_CLOSE(got.real(), ref.real(), tol, 0.0);
    CHECK_CLOSE(got.imag(), ref.imag(), tol, 0.0);
  }
}

const std::vector<cplx> kPoints = {cplx(0.0, 0.0), cplx(0.4, 0.0), cplx(-0.3, 0.9),
                                   cplx(1.2, -0.7), cplx(0.0, 1.8), cplx(-1.5, -1.1)};

// chi(b) = exp(i k.mu - k.S.k / 2) with k = sqrt2 (Im b, -Re b): from
// b a^dag - b* a = i sqrt2 (Im(b) x - Re(b) p) for x = (a + a^dag)/sqrt2, p = (a - a^dag)/(i sqrt2)
// and the characteristic function of a Gaussian (Wigner) distribution (Weedbrook et al., Rev.
// Mod. Phys. 84, 621 (2012), eq. 24, in our units).
cplx chi_from_moments(const GaussianMoments& g, cplx b) {
  const Eigen::Vector2d k = std::sqrt(2.0) * Eigen::Vector2d(b.imag(), -b.real());
  return std::exp(cplx(-0.5 * k.dot(g.covariance * k), k.dot(g.mean)));
}

// Moments of (x, p) computed from a density matrix.
GaussianMoments moments_of(const Mat& rho) {
  const int dim = static_cast<int>(rho.rows());
  const Mat a = annihilation(dim);
  const Mat x = (a + a.adjoint()) / std::sqrt(2.0);
  const Mat p = (a - a.adjoint()) / cd(0.0, std::sqrt(2.0));
  GaussianMoments g;
  g.mean << (rho * x).trace().real(), (rho * p).trace().real();
  g.covariance(0, 0) = (rho * x * x).trace().real() - g.mean(0) * g.mean(0);
  g.covariance(1, 1) = (rho * p * p).trace().real() - g.mean(1) * g.mean(1);
  g.covariance(0, 1) = g.covariance(1, 0) =
      (0.5 * (rho * (x * p + p * x)).trace()).real() - g.mean(0) * g.mean(1);
  return g;
}

}  // namespace

TEST_CASE("thermal, coherent and squeezed characteristic functions match Tr[rho D]",
          "[phase_space]") {
  const int dim = 110;
  SECTION("thermal") {
    check_chi(*make_thermal(0.7), thermal_matrix(dim, 0.7), kPoints, 1e-10);
  }
  SECTION("coherent") {
    const cplx alpha(0.8, -0.5);
    const Vec v = coherent_vector(dim, alpha);
    check_chi(*make_coherent(alpha), v * v.adjoint(), kPoints, 1e-10);
  }
  SECTION("squeezed thermal displaced") {
    const double r = 0.35, theta = 0.9, nbar = 0.2;
    const cplx alpha(0.6, 0.3);
    const Mat u = displacement_matrix(dim, alpha) * squeeze_matrix(dim, std::polar(r, theta));
    const Mat rho = u * thermal_matrix(dim, nbar) * u.adjoint();
    const auto s = make_squeezed(r, theta, nbar, alpha);
    check_chi(*s, rho, kPoints, 1e-9);
    // Moments against the density matrix, and chi against the Gaussian-moment formula.
    const auto g = s->gaussian_moments();
    REQUIRE(g.has_value());
    const auto ref = moments_of(rho);
    CHECK_CLOSE(g->mean(0), ref.mean(0), 1e-9, 0.0);
    CHECK_CLOSE(g->mean(1), ref.mean(1), 1e-9, 0.0);
    for (int i = 0; i < 2; ++i)
      for (int j = 0; j < 2; ++j) CHECK_CLOSE(g->covariance(i, j), ref.covariance(i, j), 1e-8, 0.0);
  }
}

TEST_CASE("Gaussian moments reproduce chi for random Gaussian states", "[phase_space]") {
  std::mt19937_64 rng(5);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  for (int trial = 0; trial < 10; ++trial) {
    const double r = 1.2 * std::abs(u(rng)), theta = 3.0 * u(rng), nbar = 2.0 * std::abs(u(rng));
    const cplx alpha(2.0 * u(rng), 2.0 * u(rng));
    const auto s = make_squeezed(r, theta, nbar, alpha);
    const auto g = s->gaussian_moments();
    REQUIRE(g.has_value());
    for (int k = 0; k < 5; ++k) {
      const cplx b(1.5 * u(rng), 1.5 * u(rng));
      const cplx ref = chi_from_moments(*g, b);
      CHECK_CLOSE(s->characteristic(b).real(), ref.real(), 1e-13, 1e-11);
      CHECK_CLOSE(s->characteristic(b).imag(), ref.imag(), 1e-13, 1e-11);
    }
  }
  // Squeezing in dB: 20 log10(e) r (DESIGN.md §2): the x variance of theta = 0 is e^{-2r}/2.
  const auto g = make_squeezed(0.5, 0.0)->gaussian_moments();
  CHECK_CLOSE(10.0 * std::log10(0.5 / g->covariance(0, 0)), 20.0 * std::log10(std::exp(1.0)) * 0.5,
              1e-12, 0.0);
}

TEST_CASE("Fock, cat and superposition characteristic functions match Tr[rho D]",
          "[phase_space]") {
  const int dim = 110;
  SECTION("Fock") {
    for (int n : {0, 1, 4}) {
      const Vec v = fock_vector(dim, n);
      check_chi(*make_fock(n), v * v.adjoint(), kPoints, 1e-10);
    }
  }
  SECTION("cat") {
    const cplx alpha(1.3, 0.4);
    const double phase = 0.8;
    Vec v = coherent_vector(dim, alpha) + std::polar(1.0, phase) * coherent_vector(dim, -alpha);
    v.normalize();
    check_chi(*make_cat(alpha, phase), v * v.adjoint(), kPoints, 1e-10);
  }
  SECTION("coherent + Fock superposition") {
    using K = PureComponent::Kind;
    std::vector<PureComponent> c = {{K::coherent, cplx(0.5, 0.2), cplx(0.7, -0.4), 0},
                                    {K::fock, cplx(-0.3, 0.9), 0.0, 2},
                                    {K::fock, cplx(0.4, 0.0), 0.0, 5},
                                    {K::coherent, cplx(0.1, -0.6), cplx(-1.0, 0.2), 0}};
    Vec v = Vec::Zero(dim);
    for (const auto& p : c)
      v += p.amplitude * (p.kind == K::fock ? fock_vector(dim, p.n) : coherent_vector(dim, p.alpha));
    v.normalize();
    check_chi(*make_superposition(c), v * v.adjoint(), kPoints, 1e-10);
  }
  SECTION("mixture") {
    const Vec f = fock_vector(dim, 2);
    const Mat rho = 0.25 * thermal_matrix(dim, 0.4) + 0.75 * f * f.adjoint();
    const auto s = make_mixture({{1.0, make_thermal(0.4)}, {3.0, make_fock(2)}});
    check_chi(*s, rho, kPoints, 1e-10);
    CHECK(s->rotation_invariant());
    CHECK_FALSE(s->wigner_nonnegative());
  }
}

TEST_CASE("States: Wigner-sign and rotation-invariance flags, domain errors", "[phase_space]") {
  // Gaussian states have non-negative Wigner functions; Fock n >= 1 and cats do not (Hudson,
  // Rep. Math. Phys. 6, 249 (1974)).
  CHECK(make_thermal(1.0)->wigner_nonnegative());
  CHECK(make_squeezed(0.3, 0.1, 0.5, cplx(1, 1))->wigner_nonnegative());
  CHECK(make_fock(0)->wigner_nonnegative());
  CHECK_FALSE(make_fock(1)->wigner_nonnegative());
  CHECK_FALSE(make_cat(1.0, 0.0)->wigner_nonnegative());
  CHECK(make_mixture({{0.5, make_thermal(1.0)}, {0.5, make_coherent(2.0)}})->wigner_nonnegative());
  CHECK(make_thermal(1.0)->rotation_invariant());
  CHECK(make_fock(3)->rotation_invariant());
  CHECK_FALSE(make_coherent(0.1)->rotation_invariant());
  CHECK_FALSE(make_squeezed(0.1, 0.0)->rotation_invariant());
  CHECK_THROWS_WITH(make_thermal(-1.0), "nbar = -1, but must be finite and >= 0");
  CHECK_THROWS_AS(make_fock(-2), DomainError);
  CHECK_THROWS_AS(make_cat(0.0, kPi), DomainError);  // |0> - |0> has no norm
  CHECK_FALSE(make_fock(3)->describe().empty());
}

TEST_CASE("States: |chi| <= 1 and no NaN over a wide range", "[phase_space]") {
  // |Tr[rho D]| <= 1 for a unitary D and a density matrix (common practice, no source).
  const std::vector<StatePtr> states = {make_thermal(1e8), make_thermal(0.0), make_coherent(cplx(30, -20)),
                                        make_squeezed(2.0, 1.0, 1e4, cplx(5, 5)), make_fock(200),
                                        make_cat(cplx(6, 2), 1.0)};
  for (const auto& s : states)
    for (double m : {0.0, 0.1, 1.0, 5.0, 20.0, 40.0})
      for (double a : {0.0, 0.7, 2.0, -2.9}) {
        const cplx v = s->characteristic(std::polar(m, a));
        INFO(s->describe() << " |beta| " << m);
        REQUIRE(std::isfinite(v.real()));
        REQUIRE(std::isfinite(v.imag()));
        CHECK(std::abs(v) <= 1.0 + 1e-12);
      }
}
