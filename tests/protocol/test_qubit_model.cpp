// The textbook two-level Leggett-Garg check through the same correlator / K code
// (phase_space/temporal_tests.hpp) as the oscillator engines: a spin-1/2 under
// H = (omega/2) sigma_x, measured projectively along z.
#include <cmath>
#include <vector>

#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "phase_space/temporal_tests.hpp"
#include "protocol/qubit_model.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

static_assert(ProbabilityModel<PrecessingQubitModel>);


// Equally spaced times 0, tau, ..., (n-1) tau.
MeasurementSequence equally_spaced(int n, double tau) {
  std::vector<double> t;
  for (int k = 0; k < n; ++k) t.push_back(k * tau);
  return qubit_sequence(t);
}

struct ScanMax {
  double theta = 0.0, K = -1e300;
};

// Simple 1-D scan of K_n over omega tau in (0, pi] on a uniform grid.
ScanMax scan_K(int n, int points) {
  const double omega = 2.0 * kPi * 1e3;  // 1 kHz precession
  const PrecessingQubitModel model(omega);
  ScanMax best;
  for (int i = 1; i <= points; ++i) {
    const double theta = kPi * i / points;
    const double K = leggett_garg_n(model, equally_spaced(n, theta / omega)).K;
    if (K > best.K) best = {theta, K};
  }
  return best;
}

}  // namespace

TEST_CASE("PrecessingQubitModel: probabilities of the textbook spin-1/2", "[protocol][qubit]") {
  const double omega = 3.0;
  // From |up> (Bloch vector +z): P(up at t) = cos^2(omega t / 2) (Rabi precession about x,
  // common practice, no source).
  const PrecessingQubitModel up(omega, {0.0, 0.0, 1.0});
  for (double t : {0.0, 0.2, 0.7, 1.9}) {
    const double c = std::cos(0.5 * omega * t);
    CHECK_CLOSE(up.probability_value(qubit_sequence({t}), {+1}), c * c, 1e-14, 0);
    CHECK_CLOSE(up.probability_value(qubit_sequence({t}), {-1}), 1.0 - c * c, 1e-14, 0);
  }
  // The maximally mixed state gives 1/2 for any single measurement (common practice, no
  // source); joint probabilities over full strings sum to 1.
  const PrecessingQubitModel mixed(omega);
  CHECK_CLOSE(mixed.probability_value(qubit_sequence({0.4}), {-1}), 0.5, 1e-15, 0);
  const MeasurementSequence three = qubit_sequence({0.1, 0.5, 1.3});
  double total = 0.0;
  for (int a : {1, -1})
    for (int b : {1, -1})
      for (int c : {1, -1}) total += mixed.probability_value(three, {a, b, c});
  CHECK_CLOSE(total, 1.0, 1e-14, 0);
  // A prefix of the outcome string is the marginal of the first steps (later steps not made).
  CHECK_CLOSE(mixed.probability_value(three, {1, -1}),
              mixed.probability_value(three, {1, -1, 1}) +
                  mixed.probability_value(three, {1, -1, -1}),
              1e-15, 0);
  CHECK_THROWS_AS(mixed.probability_value(three, {1, 1, 1, 1}), DomainError);
  CHECK_THROWS_AS(mixed.probability_value(qubit_sequence({0.5, 0.1}), {1, 1}), DomainError);
  CHECK_THROWS_AS(PrecessingQubitModel(1.0, {1.0, 1.0, 0.0}), DomainError);
}

TEST_CASE("PrecessingQubitModel: C_ij = cos(omega (t_j - t_i)) and K_3 = 2 cos - cos 2",
          "[protocol][qubit]") {
  // Emary, Lambert & Nori, Rep. Prog. Phys. 77, 016001 (2014), section 3 (two-level system,
  // H = omega sigma_x / 2, Q = sigma_z): C_ij = cos(omega (t_j - t_i)) for any initial state,
  // K_3 = 2 cos(omega tau) - cos(2 omega tau).
  const double omega = 2.0;
  for (const auto& bloch : {std::array<double, 3>{0, 0, 0}, std::array<double, 3>{0, 0, 1},
                            std::array<double, 3>{0.3, -0.4, 0.5}}) {
    const PrecessingQubitModel model(omega, bloch);
    CHECK_CLOSE(model.correlator_value(qubit_sequence({0.3, 1.1})), std::cos(omega * 0.8),
                1e-14, 0);
    for (double tau : {0.1, kPi / 6.0, 0.9, 1.4}) {
      const LeggettGarg3 lg = leggett_garg3(model, equally_spaced(3, tau));
      CHECK_CLOSE(lg.K, 2.0 * std::cos(omega * tau) - std::cos(2.0 * omega * tau), 1e-13, 0);
    }
  }
  // At omega tau = pi/3: K_3 = 3/2 exactly (same source).
  const PrecessingQubitModel model(omega);
  CHECK_CLOSE(leggett_garg3(model, equally_spaced(3, kPi / 3.0 / omega)).K, 1.5, 1e-13, 0);
}

TEST_CASE("PrecessingQubitModel: a 1-D scan over tau finds K_n = n cos(pi/n) at pi/n",
          "[protocol][qubit]") {
  // Emary, Lambert & Nori (2014), section 3: the largest K_n of the two-level system is
  // n cos(pi/n), at omega tau = pi/n. Grid of 6000 points on (0, pi]: step h = pi/6000, so
  // the grid maximum lies within h/2 of the optimum and K within K''(theta*) h^2 / 8
  // (|K''| <= (n-1) + (n-1)^2 <= 30 here, i.e. < 1e-6) of the maximum.
  const int points = 6000;
  const double h = kPi / points;
  for (int n = 3; n <= 6; ++n) {
    INFO("n = " << n);
    const ScanMax best = scan_K(n, points);
    CHECK_CLOSE(best.K, n * std::cos(kPi / n), 1e-6, 0);
    CHECK(best.K <= n * std::cos(kPi / n) + 1e-12);
    CHECK(std::abs(best.theta - kPi / n) <= 0.5 * h + 1e-12);
    CHECK(best.K > n - 2);  // the macrorealist bound is violated
  }
}
