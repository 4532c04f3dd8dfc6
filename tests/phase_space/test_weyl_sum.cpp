// Weyl-sum algebra: composition phase, products, merge, adjoint.
#include <random>

#include <catch2/catch.hpp>

#include "phase_space/fock_matrices.hpp"
#include "phase_space/weyl_sum.hpp"
#include "support/compare.hpp"

using namespace macroreal;
using namespace macroreal::testing;

namespace {

// Matrix of a Weyl sum in a truncated Fock space.
Mat matrix_of(const WeylSum& s, int dim) {
  Mat m = Mat::Zero(dim, dim);
  for (const auto& t : s.terms()) m += t.coeff * displacement_matrix(dim, t.gamma);
  return m;
}

double low_block_distance(const Mat& x, const Mat& y, int block) {
  return (x.topLeftCorner(block, block) - y.topLeftCorner(block, block)).cwiseAbs().maxCoeff();
}

}  // namespace

TEST_CASE("composition_phase: D(a) D(b) = exp(i Im(a b*)) D(a + b) on random arguments",
          "[phase_space]") {
  // Reference: truncated-matrix exponentials (fock_matrices.hpp); the identity is the
  // Baker-Campbell-Hausdorff formula for [a, a^dag] = 1 (Cahill & Glauber, Phys. Rev. 177,
  // 1857 (1969), eq. 2.11).
  std::mt19937_64 rng(11);
  std::uniform_real_distribution<double> u(-1.2, 1.2);  // used only to pick test points
  const int dim = 70, block = 12;
  for (int trial = 0; trial < 8; ++trial) {
    const cplx a(u(rng), u(rng)), b(u(rng), u(rng));
    const Mat lhs = displacement_matrix(dim, a) * displacement_matrix(dim, b);
    const Mat rhs = composition_phase(a, b) * displacement_matrix(dim, a + b);
    CHECK(low_block_distance(lhs, rhs, block) < 1e-10);
    // The same through multiply().
    const Mat prod = matrix_of(multiply(WeylSum::displacement(a), WeylSum::displacement(b)), dim);
    CHECK(low_block_distance(lhs, prod, block) < 1e-10);
  }
}

TEST_CASE("multiply: D(b/2) D(g) D(b/2) = D(g + b) exactly, no phase", "[phase_space]") {
  // Follows from the composition law above (Im(b/2 g*) + Im((g + b/2) b*/2) = 0).
  std::mt19937_64 rng(12);
  std::uniform_real_distribution<double> u(-3.0, 3.0);
  for (int trial = 0; trial < 20; ++trial) {
    const cplx b(u(rng), u(rng)), g(u(rng), u(rng));
    const auto half = WeylSum::displacement(0.5 * b);
    const auto s = multiply(multiply(half, WeylSum::displacement(g)), half);
    REQUIRE(s.size() == 1);
    CHECK_CLOSE(s.terms()[0].coeff.real(), 1.0, 1e-14, 0.0);
    CHECK_CLOSE(s.terms()[0].coeff.imag(), 0.0, 1e-14, 0.0);
    CHECK_CLOSE(std::abs(s.terms()[0].gamma - (g + b)), 0.0, 1e-14, 0.0);
  }
}

TEST_CASE("multiply: classical flag drops the composition phase", "[phase_space]") {
  const cplx a(0.7, -0.2), b(0.1, 1.3);
  const auto s = multiply(WeylSum::displacement(a), WeylSum::displacement(b), true);
  REQUIRE(s.size() == 1);
  CHECK(s.terms()[0].coeff == cplx(1.0));
  CHECK(std::abs(s.terms()[0].gamma - (a + b)) < 1e-15);
}

TEST_CASE("WeylSum: merge combines equal gammas deterministically and drops zeros",
          "[phase_space]") {
  WeylSum s;
  s.add(1.0, cplx(1.0, 0.0));
  s.add(2.0, cplx(1.0, 5.0));       // between the two near-equal ones in Re order
  s.add(3.0, cplx(1.0 + 1e-15, 0.0));
  s.add(0.5, cplx(-1.0, 0.0));
  s.add(-0.5, cplx(-1.0, 0.0));     // cancels
  WeylSum t;                        // the same terms in another order
  for (auto it = s.terms().rbegin(); it != s.terms().rend(); ++it) t.add(it->coeff, it->gamma);
  s.merge();
  t.merge();
  REQUIRE(s.size() == 2);
  CHECK(s.terms()[0].coeff == cplx(4.0));
  CHECK(s.terms()[1].coeff == cplx(2.0));
  REQUIRE(t.size() == s.size());
  for (std::size_t k = 0; k < s.size(); ++k) {
    CHECK(s.terms()[k].coeff == t.terms()[k].coeff);
    CHECK(s.terms()[k].gamma == t.terms()[k].gamma);
  }
}

TEST_CASE("WeylSum: adjoint matches the matrix adjoint", "[phase_space]") {
  // Reference: truncated matrices (fock_matrices.hpp).
  WeylSum s;
  s.add(cplx(0.3, 0.4), cplx(0.5, -0.2));
  s.add(cplx(-1.1, 0.2), cplx(-0.3, 0.9));
  const int dim = 60, block = 10;
  CHECK(low_block_distance(matrix_of(s, dim).adjoint(), matrix_of(s.adjoint(), dim), block) <
        1e-10);
}
