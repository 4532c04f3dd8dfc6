// global_search: the generic bounded maximiser, on standard global-optimisation test functions
// and against dense grid searches.
#include <catch2/catch.hpp>

#include <cmath>
#include <limits>
#include <numbers>
#include <stdexcept>

#include "core/error.hpp"
#include "design/global_search.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

// Branin-Hoo function on [-5, 10] x [0, 15]; global minimum 0.397887 at three points
// (Dixon & Szegő, "Towards Global Optimisation 2", North-Holland 1978; value from memory,
// and checked below against our own dense grid).
double branin(double x, double y) {
  const double pi = std::numbers::pi;
  const double a = 1.0, b = 5.1 / (4 * pi * pi), c = 5 / pi, r = 6, s = 10, t = 1 / (8 * pi);
  return a * std::pow(y - b * x * x + c * x - r, 2) + s * (1 - t) * std::cos(x) + s;
}

// Hartmann 3-D function on [0, 1]^3; global minimum -3.86278 at (0.114614, 0.555649,
// 0.852547) (Dixon & Szegő 1978; value and constants from memory, cross-checked by the grid).
double hartmann3(const std::vector<double>& x) {
  const double alpha[4] = {1.0, 1.2, 3.0, 3.2};
  const double A[4][3] = {{3, 10, 30}, {0.1, 10, 35}, {3, 10, 30}, {0.1, 10, 35}};
  const double P[4][3] = {{0.3689, 0.1170, 0.2673},
                          {0.4699, 0.4387, 0.7470},
                          {0.1091, 0.8732, 0.5547},
                          {0.0381, 0.5743, 0.8828}};
  double sum = 0.0;
  for (int i = 0; i < 4; ++i) {
    double e = 0.0;
    for (int j = 0; j < 3; ++j) e += A[i][j] * std::pow(x[j] - P[i][j], 2);
    sum += alpha[i] * std::exp(-e);
  }
  return -sum;
}

}  // namespace

TEST_CASE("maximise finds the Branin global optimum and matches a dense grid", "[design]") {
  SearchProblem p;
  p.lower = {-5.0, 0.0};
  p.upper = {10.0, 15.0};
  p.objective = [](const std::vector<double>& x) { return -branin(x[0], x[1]); };
  const SearchResult r = maximise(p);
  // Published minimum 0.397887 (Dixon & Szegő 1978, from memory): six digits.
  CHECK_CLOSE(-r.value, 0.397887, 1e-6, 0.0);
  CHECK(r.evaluations <= SearchOptions{}.max_evaluations);
  CHECK(r.converged);
  // Dense grid of 400 x 400 = 1.6e5 points; the grid optimum can only be below the true one,
  // by at most the grid's resolution effect, so the search must be >= grid - 1e-12 and within
  // 1e-4 of it (the check on 2-parameter problems).
  double grid_best = -std::numeric_limits<double>::infinity();
  const int m = 400;
  for (int i = 0; i <= m; ++i)
    for (int j = 0; j <= m; ++j)
      grid_best = std::max(grid_best, -branin(-5.0 + 15.0 * i / m, 15.0 * j / m));
  CHECK(r.value >= grid_best - 1e-12);
  CHECK_CLOSE(r.value, grid_best, 1e-3, 0.0);  // grid step 0.0375: the grid is coarser than 1e-4
}

TEST_CASE("maximise finds the Hartmann-3 global optimum", "[design]") {
  SearchProblem p;
  p.lower = {0.0, 0.0, 0.0};
  p.upper = {1.0, 1.0, 1.0};
  p.objective = [](const std::vector<double>& x) { return -hartmann3(x); };
  const SearchResult r = maximise(p);
  // Dixon & Szegő 1978 (from memory): minimum -3.86278 at (0.114614, 0.555649, 0.852547).
  CHECK_CLOSE(r.value, 3.86278, 1e-5, 0.0);
  CHECK_CLOSE(r.x[0], 0.114614, 1e-4, 0.0);
  CHECK_CLOSE(r.x[1], 0.555649, 1e-4, 0.0);
  CHECK_CLOSE(r.x[2], 0.852547, 1e-4, 0.0);
  // Dense grid 47^3 ~ 1.04e5 points: the search may not be worse than the grid.
  double grid_best = -std::numeric_limits<double>::infinity();
  const int m = 46;
  for (int i = 0; i <= m; ++i)
    for (int j = 0; j <= m; ++j)
      for (int k = 0; k <= m; ++k)
        grid_best = std::max(grid_best, -hartmann3({1.0 * i / m, 1.0 * j / m, 1.0 * k / m}));
  CHECK(r.value >= grid_best - 1e-12);
}

TEST_CASE("maximise: infeasible points (NaN) are never chosen, fixed parameters stay fixed",
          "[design]") {
  SearchProblem p;
  p.lower = {-2.0, -2.0, 0.7};
  p.upper = {2.0, 2.0, 0.7};
  long calls = 0;
  // Maximise x + y on the unit disc (NaN outside): optimum sqrt(2) at (1/sqrt2, 1/sqrt2),
  // elementary (Lagrange multipliers).
  p.objective = [&calls](const std::vector<double>& x) {
    ++calls;
    CHECK(x[2] == 0.7);
    if (x[0] * x[0] + x[1] * x[1] > 1.0) return std::numeric_limits<double>::quiet_NaN();
    return x[0] + x[1];
  };
  SearchOptions o;
  o.max_evaluations = 6000;
  const SearchResult r = maximise(p, o);
  INFO(r.method);
  CHECK(r.evaluations == calls);
  CHECK(r.evaluations <= o.max_evaluations);
  CHECK(r.x[0] * r.x[0] + r.x[1] * r.x[1] <= 1.0);
  CHECK_CLOSE(r.value, std::sqrt(2.0), 1e-5, 0.0);
}

TEST_CASE("maximise: one free parameter, all fixed, determinism and errors", "[design]") {
  SECTION("one parameter: max of sin on [0, 3] is 1 at pi/2") {
    SearchProblem p;
    p.lower = {0.0};
    p.upper = {3.0};
    p.objective = [](const std::vector<double>& x) { return std::sin(x[0]); };
    const SearchResult r = maximise(p);
    CHECK_CLOSE(r.x[0], std::numbers::pi / 2, 1e-6, 0.0);
    CHECK_CLOSE(r.value, 1.0, 1e-12, 0.0);
  }
  SECTION("all fixed: one evaluation") {
    SearchProblem p;
    p.lower = {1.0, 2.0};
    p.upper = {1.0, 2.0};
    p.objective = [](const std::vector<double>& x) { return x[0] * x[1]; };
    const SearchResult r = maximise(p);
    CHECK(r.evaluations == 1);
    CHECK(r.value == 2.0);
  }
  SECTION("same seed, same bytes, with CRS2 (random) global stage") {
    SearchProblem p;
    p.lower = {0.0, 0.0, 0.0};
    p.upper = {1.0, 1.0, 1.0};
    p.objective = [](const std::vector<double>& x) { return -hartmann3(x); };
    SearchOptions o;
    o.global = GlobalStage::crs2;
    o.seed = 42;
    o.max_evaluations = 3000;
    const SearchResult a = maximise(p, o), b = maximise(p, o);
    CHECK(a.x == b.x);
    CHECK(a.value == b.value);
    CHECK(a.evaluations == b.evaluations);
  }
  SECTION("the objective's own exception comes through with its type") {
    SearchProblem p;
    p.lower = {0.0};
    p.upper = {1.0};
    p.objective = [](const std::vector<double>&) -> double { throw InputError("objective.json", "field", "a typed error from the objective"); };
    CHECK_THROWS_AS(maximise(p), InputError);
  }
  SECTION("bad bounds") {
    SearchProblem p;
    p.lower = {1.0};
    p.upper = {0.0};
    p.objective = [](const std::vector<double>&) { return 0.0; };
    CHECK_THROWS_WITH(maximise(p), Catch::Contains("lower <= upper"));
    p.upper = {2.0, 3.0};
    CHECK_THROWS_AS(maximise(p), DomainError);
  }
  SECTION("budget respected") {
    SearchProblem p;
    p.lower = {-5.0, 0.0};
    p.upper = {10.0, 15.0};
    p.objective = [](const std::vector<double>& x) { return -branin(x[0], x[1]); };
    SearchOptions o;
    o.max_evaluations = 300;
    const SearchResult r = maximise(p, o);
    CHECK(r.evaluations <= 300);
    CHECK(std::isfinite(r.value));
  }
}
