// Gauss-Hermite rules for the standard normal weight.
#include <catch2/catch.hpp>

#include "phase_space/hermite_rule.hpp"
#include "support/compare.hpp"

using namespace macroreal;

TEST_CASE("gauss_hermite_rule integrates normal moments exactly up to degree 2n-1",
          "[phase_space]") {
  // E[Z^{2k}] = (2k-1)!! for Z ~ N(0,1), odd moments 0 (common practice, no source); an n-point
  // Gauss rule is exact to degree 2n - 1 (Golub & Welsch, Math. Comp. 23, 221 (1969)).
  for (int n : {1, 2, 5, 12, 24, 48, 96, 192, 384}) {
    const auto& r = detail::gauss_hermite_rule(n);
    REQUIRE(static_cast<int>(r.nodes.size()) == n);
    for (int deg = 0; deg <= std::min(2 * n - 1, 16); ++deg) {
      double s = 0.0, scale = 0.0;  // scale = sum |terms|: bounds the rounding of the sum
      for (int i = 0; i < n; ++i) {
        s += r.weights[i] * std::pow(r.nodes[i], deg);
        scale += r.weights[i] * std::pow(std::abs(r.nodes[i]), deg);
      }
      double ref = 0.0;
      if (deg % 2 == 0) {
        ref = 1.0;
        for (int k = deg - 1; k > 0; k -= 2) ref *= k;
      }
      INFO("n " << n << " degree " << deg);
      CHECK_CLOSE(s, ref, 1e-13 * scale, 1e-11);
    }
  }
  // 3-point rule: nodes 0, +-sqrt3, weights 2/3, 1/6 (Abramowitz & Stegun 25.4.46, rescaled
  // to the normal weight, from memory).
  const auto& r3 = detail::gauss_hermite_rule(3);
  CHECK_CLOSE(r3.nodes[2], std::sqrt(3.0), 1e-14, 0.0);
  CHECK_CLOSE(r3.weights[1], 2.0 / 3.0, 1e-14, 0.0);
  CHECK_CLOSE(r3.weights[0], 1.0 / 6.0, 1e-14, 0.0);
}
