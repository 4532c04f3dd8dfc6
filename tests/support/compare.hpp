// The one comparison helper of the test suite: |a - b| <= abs_tol + rel_tol * |b|, with a
// message that shows both values and the tolerances when it fails.
#pragma once

#include <cmath>
#include <complex>
#include <sstream>
#include <string>

#include <catch2/catch.hpp>

namespace macroreal::testing {

inline bool close(double a, double b, double abs_tol, double rel_tol = 0.0) {
  return std::isfinite(a) && std::isfinite(b) && std::abs(a - b) <= abs_tol + rel_tol * std::abs(b);
}

inline std::string describe(double a, double b, double abs_tol, double rel_tol) {
  std::ostringstream os;
  os.precision(17);
  os << a << " vs " << b << " (diff " << std::abs(a - b) << ", abs_tol " << abs_tol
     << ", rel_tol " << rel_tol << ")";
  return os.str();
}

}  // namespace macroreal::testing

#define CHECK_CLOSE(a, b, abs_tol, rel_tol)                                                  \
  do {                                                                                       \
    const double mr_a_ = (a), mr_b_ = (b);                                                   \
    INFO(#a " ~ " #b ": " << ::macroreal::testing::describe(mr_a_, mr_b_, abs_tol, rel_tol)); \
    CHECK(::macroreal::testing::close(mr_a_, mr_b_, abs_tol, rel_tol));                      \
  } while (0)

#define REQUIRE_CLOSE(a, b, abs_tol, rel_tol)                                                \
  do {                                                                                       \
    const double mr_a_ = (a), mr_b_ = (b);                                                   \
    INFO(#a " ~ " #b ": " << ::macroreal::testing::describe(mr_a_, mr_b_, abs_tol, rel_tol)); \
    REQUIRE(::macroreal::testing::close(mr_a_, mr_b_, abs_tol, rel_tol));                    \
  } while (0)
