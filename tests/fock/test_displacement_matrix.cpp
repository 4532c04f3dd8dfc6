// Checks of the truncated Fock-basis matrix of D(beta) (lib/fock/displacement_matrix.hpp).
#include <complex>
#include <fstream>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "core/error.hpp"
#include "fock/displacement_matrix.hpp"
#include "phase_space/state.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

nlohmann::json load_reference(const std::string& name) {
  std::ifstream in(std::string(MACROREAL_SOURCE_DIR) + "/tests/reference/" + name);
  REQUIRE(in.good());
  return nlohmann::json::parse(in);
}

}  // namespace

TEST_CASE("displacement_matrix: elements match 60-digit mpmath closed form", "[fock]") {
  // Source: tests/reference/mpmath_displacement_reference.py (mpmath at 60 digits, closed
  // form of Cahill & Glauber, Phys. Rev. 177, 1857 (1969)); n up to 399, |beta| up to 20.
  const auto ref = load_reference("mpmath_displacement_reference.json");
  int checked = 0;
  for (const auto& c : ref["cases"]) {
    const int m = c["m"], n = c["n"];
    const cplx beta(c["beta"][0].get<double>(), c["beta"][1].get<double>());
    const cplx want(c["value"][0].get<double>(), c["value"][1].get<double>());
    const auto d = displacement_matrix(400, beta);
    INFO("m = " << m << ", n = " << n << ", beta = " << beta);
    CHECK_CLOSE(d(m, n).real(), want.real(), 1e-12, 1e-10);
    CHECK_CLOSE(d(m, n).imag(), want.imag(), 1e-12, 1e-10);
    ++checked;
  }
  CHECK(checked >= 100);
}

TEST_CASE("displacement_matrix: small indices match QuTiP displace on a large cutoff", "[fock]") {
  // Source: tests/reference/qutip_displace_reference.py (QuTiP 4.7 displace(400, beta),
  // indices < 30, where the truncated exponential has converged).
  const auto ref = load_reference("qutip_displace_reference.json");
  for (const auto& c : ref["cases"]) {
    const int m = c["m"], n = c["n"];
    const cplx beta(c["beta"][0].get<double>(), c["beta"][1].get<double>());
    const cplx want(c["value"][0].get<double>(), c["value"][1].get<double>());
    const auto d = displacement_matrix(40, beta);
    INFO("m = " << m << ", n = " << n << ", beta = " << beta);
    CHECK_CLOSE(d(m, n).real(), want.real(), 1e-12, 0.0);
    CHECK_CLOSE(d(m, n).imag(), want.imag(), 1e-12, 0.0);
  }
}

TEST_CASE("displacement_matrix: unitary on the block well inside the cutoff", "[fock]") {
  // D D^dag = 1 for the infinite operator (common practice, no source); rows m < inner
  // of the truncated matrix carry all their weight below the cutoff when
  // (sqrt(inner) + |beta| + 8)^2 < dim.
  struct Case { int dim; int inner; cplx beta; };
  for (const Case c : {Case{120, 40, {1.0, -0.5}}, Case{400, 100, {6.0, 3.0}},
                       Case{400, 30, {0.0, -10.0}}}) {
    const auto d = displacement_matrix(c.dim, c.beta);
    const Eigen::MatrixXcd u = d.topRows(c.inner) * d.topRows(c.inner).adjoint();
    const double err = (u - Eigen::MatrixXcd::Identity(c.inner, c.inner)).cwiseAbs().maxCoeff();
    INFO("dim = " << c.dim << ", beta = " << c.beta);
    CHECK(err < 1e-12);
  }
}

TEST_CASE("displacement_matrix: composition law D(a)D(b) = exp(i Im(a b*)) D(a+b)", "[fock]") {
  // DESIGN.md section 2 convention; Cahill & Glauber (1969) eq. (2.11).
  const cplx a(0.7, -1.1), b(-0.4, 0.9);
  const int dim = 160, inner = 30;
  const Eigen::MatrixXcd lhs = displacement_matrix(dim, a) * displacement_matrix(dim, b);
  const Eigen::MatrixXcd rhs = std::exp(cplx(0.0, std::imag(a * std::conj(b)))) *
                               displacement_matrix(dim, a + b);
  const double err = (lhs - rhs).topLeftCorner(inner, inner).cwiseAbs().maxCoeff();
  CHECK(err < 1e-13);
}

TEST_CASE("displacement_diagonal: agrees with the full matrix", "[fock]") {
  const cplx beta(2.5, -1.0);
  const auto d = displacement_matrix(50, beta);
  for (int k : {-7, -1, 0, 3, 49}) {
    const auto v = displacement_diagonal(50, k, beta);
    REQUIRE(v.size() == 50 - std::abs(k));
    for (int j = 0; j < v.size(); ++j) {
      const cplx want = k >= 0 ? d(j + k, j) : d(j, j - k);
      CHECK(std::abs(v[j] - want) == 0.0);
    }
  }
}

TEST_CASE("displacement_matrix: rejects a bad dimension", "[fock]") {
  CHECK_THROWS_AS(displacement_matrix(0, 1.0), DomainError);
}
