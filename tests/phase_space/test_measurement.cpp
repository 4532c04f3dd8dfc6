// Modular measurement: Kraus operators and Heisenberg maps against truncated matrices.
#include <random>

#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "phase_space/fock_matrices.hpp"
#include "phase_space/measurement.hpp"
#include "support/compare.hpp"

using namespace macroreal;
using namespace macroreal::testing;

namespace {

Mat matrix_of(const WeylSum& s, int dim) {
  Mat m = Mat::Zero(dim, dim);
  for (const auto& t : s.terms()) m += t.coeff * displacement_matrix(dim, t.gamma);
  return m;
}

// K_o built directly from the definition in DESIGN.md §2 as matrices.
Mat kraus_matrix(const ModularMeasurement& m, int o, int dim) {
  const cd e = std::polar(1.0, m.phase_rad);
  if (m.split == Split::symmetric)
    return 0.5 * (displacement_matrix(dim, -0.5 * m.beta) +
                  static_cast<double>(o) * e * displacement_matrix(dim, 0.5 * m.beta));
  return 0.5 * (Mat::Identity(dim, dim) +
                static_cast<double>(o) * e * displacement_matrix(dim, m.beta));
}

double block_distance(const Mat& x, const Mat& y, int block) {
  return (x.topLeftCorner(block, block) - y.topLeftCorner(block, block)).cwiseAbs().maxCoeff();
}

}  // namespace

TEST_CASE("heisenberg maps equal the Kraus sandwiches as matrices", "[phase_space]") {
  // Reference: the Kraus operators of DESIGN.md §2 as truncated matrix exponentials; the maps
  // as defined in measurement.hpp (outcome, signed, unselective, with contrast).
  const int dim = 56, block = 10;
  for (Split split : {Split::symmetric, Split::one_sided}) {
    ModularMeasurement m;
    m.beta = cplx(0.9, 0.6);
    m.phase_rad = 0.7;
    m.split = split;
    m.contrast = 0.8;
    WeylSum x;
    x.add(cplx(0.4, -0.1), cplx(0.3, -0.8));
    x.add(cplx(1.0, 0.0), 0.0);
    const Mat xm = matrix_of(x, dim);
    Mat sandwich[2];
    for (int k = 0; k < 2; ++k) {
      const int o = k == 0 ? 1 : -1;
      const Mat K = kraus_matrix(m, o, dim);
      sandwich[k] = K.adjoint() * xm * K;
      CHECK(block_distance(matrix_of(kraus(m, o), dim), K, block) < 1e-10);
    }
    const Mat both = sandwich[0] + sandwich[1];
    const double c = m.contrast;
    CHECK(block_distance(matrix_of(heisenberg_outcome(m, 1, x), dim),
                         c * sandwich[0] + 0.5 * (1 - c) * both, block) < 1e-9);
    CHECK(block_distance(matrix_of(heisenberg_outcome(m, -1, x), dim),
                         c * sandwich[1] + 0.5 * (1 - c) * both, block) < 1e-9);
    CHECK(block_distance(matrix_of(heisenberg_signed(m, x), dim), c * (sandwich[0] - sandwich[1]),
                         block) < 1e-9);
    CHECK(block_distance(matrix_of(heisenberg_unselective(m, x), dim), both, block) < 1e-9);
  }
}

TEST_CASE("one-sided Kraus operator is D(beta/2) times the symmetric one", "[phase_space]") {
  // DESIGN.md §2 / measurement.hpp: K_o^one-sided = D(beta/2) K_o^symmetric, so the
  // post-measurement states differ by a displacement; checked with truncated matrices.
  const int dim = 70, block = 10;
  ModularMeasurement s;
  s.beta = cplx(-0.4, 1.1);
  s.phase_rad = -1.3;
  ModularMeasurement o = s;
  o.split = Split::one_sided;
  for (int out : {1, -1})
    CHECK(block_distance(kraus_matrix(o, out, dim),
                         displacement_matrix(dim, 0.5 * s.beta) * kraus_matrix(s, out, dim),
                         block) < 1e-10);
}

TEST_CASE("unselective map of the identity is the identity (trace preservation)",
          "[phase_space]") {
  // sum_o K_o^dag K_o = 1 (completeness, DESIGN.md §2).
  for (Split split : {Split::symmetric, Split::one_sided}) {
    ModularMeasurement m;
    m.beta = cplx(2.5, -1.0);
    m.phase_rad = 0.3;
    m.split = split;
    m.contrast = 0.6;
    const auto u = heisenberg_unselective(m, WeylSum::identity());
    REQUIRE(u.size() == 1);
    CHECK_CLOSE(std::abs(u.terms()[0].coeff - cplx(1.0)), 0.0, 1e-15, 0.0);
    const auto sum = heisenberg_outcome(m, 1, WeylSum::identity());
    auto total = sum;
    total.append(heisenberg_outcome(m, -1, WeylSum::identity()));
    total.merge();
    REQUIRE(total.size() == 1);
    CHECK_CLOSE(std::abs(total.terms()[0].coeff - cplx(1.0)), 0.0, 1e-15, 0.0);
  }
}

TEST_CASE("ModularMeasurement: validation messages and split names", "[phase_space]") {
  ModularMeasurement m;
  m.contrast = 1.2;
  CHECK_THROWS_WITH(m.validate(), "contrast = 1.2, but must be in [0, 1]");
  m.contrast = 0.5;
  m.beta = cplx(std::nan(""), 0.0);
  CHECK_THROWS_AS(m.validate(), DomainError);
  CHECK(parse_split("symmetric") == Split::symmetric);
  CHECK(parse_split("one-sided") == Split::one_sided);
  CHECK(to_string(Split::one_sided) == "one-sided");
  CHECK_THROWS_WITH(parse_split("left"), Catch::Contains("must be \"symmetric\" or \"one-sided\""));
}
