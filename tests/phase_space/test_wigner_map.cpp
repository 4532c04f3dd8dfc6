// wigner_map against closed-form Wigner functions.
#include <catch2/catch.hpp>

#include <cmath>
#include <numbers>

#include <boost/math/special_functions/laguerre.hpp>

#include "phase_space/state.hpp"
#include "phase_space/wigner_map.hpp"
#include "support/compare.hpp"

using namespace macroreal;


TEST_CASE("Wigner map of Fock states equals the closed form with Laguerre polynomials",
          "[phase_space][wigner]") {
  // W_n(alpha) = (2/pi) (-1)^n exp(-2|alpha|^2) L_n(4|alpha|^2) per d^2alpha (Cahill & Glauber,
  // Phys. Rev. 177, 1882 (1969), eq. 4.35 ff.; per dx dp this is (-1)^n/pi at the origin,
  // Leonhardt, Measuring the Quantum State of Light (1997), sec. 3.2).
  for (int n : {0, 1, 3}) {
    const auto state = make_fock(n);
    const WignerMap map = wigner_map(*state, 3.0, 31);
    double worst = 0.0;
    for (std::size_t i = 0; i < map.re_alpha.size(); ++i)
      for (std::size_t j = 0; j < map.im_alpha.size(); ++j) {
        const double r2 = map.re_alpha[i] * map.re_alpha[i] + map.im_alpha[j] * map.im_alpha[j];
        const double exact = 2.0 / kPi * (n % 2 ? -1.0 : 1.0) * std::exp(-2.0 * r2) *
                             boost::math::laguerre(n, 4.0 * r2);
        worst = std::max(worst, std::abs(map.w[i][j] - exact));
      }
    CHECK(worst < 1e-10);
    // The map's own trapezoidal integral on its 0.2-spaced grid (a summary, not the method).
    CHECK_CLOSE(map.integral, 1.0, 1e-3, 0.0);
    if (n % 2) CHECK(map.min_value < -0.6);  // 2(-1)^n/pi = -0.6366 at the origin
  }
}

TEST_CASE("Wigner map of thermal and coherent states is the Gaussian", "[phase_space][wigner]") {
  // Thermal: W = exp(-|alpha|^2/(nbar+1/2)) / (pi (nbar+1/2)) (Gaussian transform of
  // chi = exp(-(nbar+1/2)|beta|^2), DESIGN.md section 2); coherent: the vacuum Gaussian
  // (2/pi) exp(-2|alpha - alpha0|^2) moved to alpha0.
  const auto thermal = make_thermal(1.5);
  const WignerMap t = wigner_map(*thermal, 5.0, 21);
  const auto coherent = make_coherent(cplx(1.0, -0.5));
  const WignerMap c = wigner_map(*coherent, 4.0, 21);
  double worst_t = 0.0, worst_c = 0.0;
  for (std::size_t i = 0; i < 21; ++i)
    for (std::size_t j = 0; j < 21; ++j) {
      const double r2 = t.re_alpha[i] * t.re_alpha[i] + t.im_alpha[j] * t.im_alpha[j];
      worst_t = std::max(worst_t, std::abs(t.w[i][j] - std::exp(-r2 / 2.0) / (kPi * 2.0)));
      const double dx = c.re_alpha[i] - 1.0, dy = c.im_alpha[j] + 0.5;
      worst_c = std::max(worst_c, std::abs(c.w[i][j] - 2.0 / kPi * std::exp(-2.0 * (dx * dx + dy * dy))));
    }
  CHECK(worst_t < 1e-10);
  CHECK(worst_c < 1e-10);
  CHECK(t.min_value > -1e-12);
}

TEST_CASE("Wigner map of a cat state shows the negative interference fringes",
          "[phase_space][wigner]") {
  // Even cat (|a> + |-a>)/N, a real: W(alpha) = (2/pi) / (2(1 + e^{-2a^2})) *
  // [e^{-2|alpha-a|^2} + e^{-2|alpha+a|^2} + 2 e^{-2|alpha|^2} cos(4 a Im alpha)]
  // (from memory; it follows from the coherent-state Wigner cross terms, Schleich, Quantum
  // Optics in Phase Space (2001), ch. 11).
  const double a = 2.0;
  const auto cat = make_cat(cplx(a, 0.0), 0.0);
  const WignerMap map = wigner_map(*cat, 4.0, 41);
  double worst = 0.0;
  for (std::size_t i = 0; i < 41; ++i)
    for (std::size_t j = 0; j < 41; ++j) {
      const double x = map.re_alpha[i], y = map.im_alpha[j];
      const double exact =
          2.0 / kPi / (2.0 * (1.0 + std::exp(-2.0 * a * a))) *
          (std::exp(-2.0 * ((x - a) * (x - a) + y * y)) + std::exp(-2.0 * ((x + a) * (x + a) + y * y)) +
           2.0 * std::exp(-2.0 * (x * x + y * y)) * std::cos(4.0 * a * y));
      worst = std::max(worst, std::abs(map.w[i][j] - exact));
    }
  CHECK(worst < 1e-10);
  // The deepest fringe, -(2/pi) exp(-2 (pi/8a)^2) / (1 + e^{-2a^2}) = -0.468 at Im alpha = pi/8a,
  // falls between grid points (0.2 apart): the grid's minimum is -0.461.
  CHECK(map.min_value < -0.45);
}
