// Fock characteristic function and displacement matrix elements against independent
// evaluations: Boost.Math Laguerre polynomials, a 50-digit recurrence, a naive normal-ordered
// sum in long double, truncated matrix exponentials and the thermal-as-Fock-mixture identity.
#include <cmath>

#include <boost/math/special_functions/laguerre.hpp>
#include <boost/multiprecision/cpp_bin_float.hpp>
#include <catch2/catch.hpp>

#include "phase_space/fock_matrices.hpp"
#include "phase_space/state.hpp"
#include "support/compare.hpp"

using namespace macroreal;
using namespace macroreal::testing;
using Big = boost::multiprecision::cpp_bin_float_50;

namespace {

// exp(-x/2) L_n(x) with 50 significant digits, by the recurrence of Abramowitz & Stegun
// 22.7.12 in cpp_bin_float_50 (exponent range large enough that nothing overflows).
double fock_chi_50_digits(int n, double x_in) {
  const Big x = x_in;
  Big y0 = 1, y1 = 1 - x;
  if (n == 0) return static_cast<double>(exp(-x / 2));
  for (int k = 1; k < n; ++k) {
    Big y2 = ((2 * k + 1 - x) * y1 - k * y0) / (k + 1);
    y0 = y1;
    y1 = y2;
  }
  return static_cast<double>(y1 * exp(-x / 2));
}

// <m|D(b)|n> = e^{-|b|^2/2} sum_k sqrt(m! n!) / (k! (m-k)! (n-k)!) b^{m-k} (-b*)^{n-k}, from the
// normal-ordered form D(b) = e^{-|b|^2/2} e^{b a^dag} e^{-b* a} (Cahill & Glauber, Phys. Rev.
// 177, 1857 (1969), eq. 2.10), summed directly in long double.
std::complex<long double> naive_element(int m, int n, std::complex<long double> b) {
  std::complex<long double> s = 0;
  auto fact = [](int k) {
    long double f = 1;
    for (int i = 2; i <= k; ++i) f *= i;
    return f;
  };
  for (int k = 0; k <= std::min(m, n); ++k)
    s += std::sqrt(fact(m) * fact(n)) / (fact(k) * fact(m - k) * fact(n - k)) *
         std::pow(b, m - k) * std::pow(-std::conj(b), n - k);
  return s * std::exp(-std::norm(b) / 2);
}

}  // namespace

TEST_CASE("fock_characteristic matches Boost.Math laguerre where that does not overflow",
          "[phase_space]") {
  // Reference: boost::math::laguerre(n, x) (Boost.Math 1.74) times exp(-x/2).
  for (int n : {0, 1, 2, 5, 17, 50, 120, 200})
    for (double x : {1e-8, 0.01, 0.5, 1.0, 3.7, 10.0, 42.0, 100.0, 250.0}) {
      const double ref = boost::math::laguerre(n, x) * std::exp(-0.5 * x);
      CHECK_CLOSE(fock_characteristic(n, x), ref, 1e-11, 1e-9);
    }
}

TEST_CASE("fock_characteristic is accurate for n <= 200 and |beta| <= 40", "[phase_space]") {
  // Reference: the same recurrence carried out in 50-digit arithmetic (boost::multiprecision).
  // The absolute error stays at the level of the double rounding of the Laguerre recurrence.
  double worst = 0.0;
  for (int n : {0, 1, 3, 10, 31, 64, 100, 150, 199, 200})
    for (double b : {0.05, 0.7, 1.5, 3.0, 6.0, 10.0, 15.0, 20.0, 25.0, 30.0, 35.0, 40.0}) {
      const double x = b * b;
      const double ref = fock_chi_50_digits(n, x);
      const double got = fock_characteristic(n, x);
      REQUIRE(std::isfinite(got));
      CHECK(std::abs(got) <= 1.0 + 1e-12);  // |<n|D|n>| <= 1 for a unitary D
      CHECK_CLOSE(got, ref, 1e-11, 1e-9);
      worst = std::max(worst, std::abs(got - ref));
    }
  INFO("worst absolute error " << worst);
  CHECK(worst < 1e-11);
}

TEST_CASE("Fock states mixed with geometric weights give the thermal characteristic function",
          "[phase_space]") {
  // A thermal state has p_n = nbar^n / (nbar+1)^{n+1} (Mandel & Wolf, Optical Coherence and
  // Quantum Optics (1995), eq. 13.2-4, from memory) and chi = exp(-(nbar+1/2)|b|^2); so
  // sum_n p_n exp(-x/2) L_n(x) = exp(-(nbar+1/2) x).
  for (double nbar : {0.1, 0.8, 3.0}) {
    const double q = nbar / (nbar + 1.0);
    for (double x : {0.01, 0.3, 1.0, 4.0, 12.0}) {
      double s = 0.0, p = 1.0 / (nbar + 1.0);
      for (int n = 0; n <= 2000 && p > 1e-20; ++n, p *= q) s += p * fock_characteristic(n, x);
      CHECK_CLOSE(s, std::exp(-(nbar + 0.5) * x), 1e-13, 1e-10);
    }
  }
}

TEST_CASE("displacement_matrix_element matches the normal-ordered sum and matrix exponentials",
          "[phase_space]") {
  const int dim = 90;
  for (cplx b : {cplx(0.3, 0.2), cplx(-1.1, 0.7), cplx(0.0, -2.0), cplx(2.4, 1.0)}) {
    const Mat d = displacement_matrix(dim, b);  // reference 2: truncated exp (fock_matrices.hpp)
    for (int m = 0; m <= 12; ++m)
      for (int n = 0; n <= 12; ++n) {
        const cplx got = displacement_matrix_element(m, n, b);
        const auto ref = naive_element(m, n, std::complex<long double>(b.real(), b.imag()));
        CHECK_CLOSE(got.real(), static_cast<double>(ref.real()), 1e-12, 1e-10);
        CHECK_CLOSE(got.imag(), static_cast<double>(ref.imag()), 1e-12, 1e-10);
        CHECK_CLOSE(std::abs(got - d(m, n)), 0.0, 1e-10, 0.0);
      }
  }
}

TEST_CASE("displacement_matrix_element is finite and unitary-bounded far out", "[phase_space]") {
  // |<m|D|n>| <= 1; diagonal equals fock_characteristic; large arguments neither overflow nor
  // return NaN. Rows of a unitary have unit norm: sum_m |<m|D|n>|^2 = 1 (common practice, no
  // source), checked for n = 5 with enough rows.
  for (int m : {0, 7, 60, 200})
    for (int n : {0, 3, 60, 199}) {
      const cplx v = displacement_matrix_element(m, n, cplx(25.0, -31.0));
      REQUIRE(std::isfinite(v.real()));
      REQUIRE(std::isfinite(v.imag()));
      CHECK(std::abs(v) <= 1.0 + 1e-12);
    }
  CHECK_CLOSE(displacement_matrix_element(40, 40, cplx(3.0, 4.0)).real(),
              fock_characteristic(40, 25.0), 1e-13, 1e-10);
  const cplx b(1.3, -0.4);
  double norm = 0.0;
  for (int m = 0; m < 200; ++m) norm += std::norm(displacement_matrix_element(m, 5, b));
  CHECK_CLOSE(norm, 1.0, 1e-12, 0.0);
}
