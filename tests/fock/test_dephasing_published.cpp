// A published check value for Markovian dephasing in the Fock engine (issue 4): the decay of
// the interference term of a Fock superposition (|0> + |N>)/sqrt2 under d rho/dt = kappa
// D[a^dag a] rho, seen through modular measurements of whole sequences.
//
// Source of the law: for a Hermitian L, D[L] rho = -1/2 [L, [L, rho]], so kappa D[a^dag a] is
// the double-commutator master equation d rho/dt = -(tau/2) [H, [H, rho]] with H = a^dag a
// (hbar = omega = 1) and tau = kappa, whose energy-basis solution is
//     rho_nm(t) = rho_nm(0) exp(-tau t (E_n - E_m)^2 / 2) = rho_nm(0) exp(-kappa t (n - m)^2 / 2):
// G. J. Milburn, "Intrinsic decoherence in quantum mechanics", Phys. Rev. A 44, 5401 (1991)
// (the master equation expanded to first order and its energy-basis solution; restated in
// S. V. Mousavi & S. Miret-Artes, "A survey on the intrinsic decoherence in the Milburn
// formalism", arXiv:2401.09391 (2024), eqs. (2)-(5), which state that the energy-basis
// off-diagonal elements decay exponentially; the formulas as written here are from memory,
// the survey's formula text was not visible). The same phase-damping law for a mode is in
// the textbooks (e.g. Walls & Milburn, Quantum Optics, 2nd ed. (2008) -- from memory,
// section not checked).
//
// What the measurement sees: for rho = (|0> + |N>)(<0| + <N|)/2 with coherence
// rho_0N(t) = rho_N0(t) = e^{-kappa t N^2/2}/2, chi_t(b) = Tr[rho_t D(b)] =
//     e^{-x/2} [1 + L_N(x)]/2 + e^{-kappa t N^2/2} e^{-x/2} [b^N + (-b*)^N] / (2 sqrt(N!)),
// x = |b|^2, with <m|D(b)|n> from Cahill & Glauber, Phys. Rev. 177, 1857 (1969), eq. (B16);
// a symmetric-split measurement gives P(+) = 1/2 [1 + c Re(e^{i phi} chi_t(b))] (DESIGN.md
// section 2). The interference term is the second part; its visibility
//     V(t) = (P_t - P_inf) / (P_0 - P_inf) = exp(-kappa t N^2 / 2)
// follows from the law alone (P_inf: coherence gone).
#include <cmath>

#include <boost/math/special_functions/factorials.hpp>
#include <boost/math/special_functions/laguerre.hpp>
#include <catch2/catch.hpp>

#include "fock/fock_engine.hpp"
#include "phase_space/state.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

// The tabulated state is accurate to ~1e-13 per element (fock_tabulation.hpp); sums over the
// block and two Kraus sandwiches stay below 1e-11.
constexpr double kTol = 1e-11;

StatePtr zero_plus_n(int n) {
  return make_superposition({{PureComponent::Kind::fock, 1.0, 0.0, 0},
                             {PureComponent::Kind::fock, 1.0, 0.0, n}});
}

TimedMeasurement step(const std::string& label, cplx beta, double phase, double time_s) {
  TimedMeasurement tm;
  tm.label = label;
  tm.measurement.beta = beta;
  tm.measurement.phase_rad = phase;
  tm.measurement.split = Split::symmetric;
  tm.time_s = time_s;
  return tm;
}

// P(+) of the closed form above with the coherence factor `coh` (1 at t = 0).
double closed_form_p(int n, cplx beta, double phase, double coh) {
  const double x = std::norm(beta);
  const double pop = 0.5 * std::exp(-x / 2) * (1.0 + boost::math::laguerre(n, x));
  const cplx interference = coh * std::exp(-x / 2) * (std::pow(beta, n) + std::pow(-std::conj(beta), n)) /
                            (2.0 * std::sqrt(boost::math::factorial<double>(n)));
  return 0.5 * (1.0 + (std::polar(1.0, phase) * (pop + interference)).real());
}

}  // namespace

TEST_CASE("Fock engine: dephasing decays the interference term of |0> + |N> as exp(-kappa t N^2/2)",
          "[fock]") {
  const double kappa = 400.0;
  for (int n : {1, 2, 3, 5}) {
    const auto state = zero_plus_n(n);
    const FockEngine engine(state);
    // |b|^2 = n maximises |b|^n e^{-|b|^2/2}; b^n + (-b*)^n is 2 Re(b^n) (n even) or
    // 2i Im(b^n) (n odd), largest for arg b = 0 or pi/(2n); the phase turns it real. Then
    // P_0 - P_inf = e^{-n/2} n^{n/2} / (2 sqrt(n!)) >= 0.2 for these n.
    const cplx beta = std::polar(std::sqrt(static_cast<double>(n)), n % 2 ? kPi / (2 * n) : 0.0);
    const double phase = n % 2 ? -kPi / 2 : 0.0;
    auto p_at = [&](double t) {
      MeasurementSequence seq;
      seq.noise.dephasing_rate_per_s = kappa;
      seq.steps.push_back(step("B", beta, phase, t));
      return engine.probability(seq, {+1}).value;
    };
    const double p0 = p_at(0.0);
    // kappa t n^2 / 2 = 800: e^{-800} underflows against 1, the coherence is gone.
    const double p_inf = p_at(1600.0 / (kappa * n * n));
    INFO("N = " << n << ": P_0 = " << p0 << ", P_inf = " << p_inf);
    REQUIRE(std::abs(p0 - p_inf) > 0.15);  // the term is well visible
    CHECK_CLOSE(p0, closed_form_p(n, beta, phase, 1.0), kTol, 0.0);
    CHECK_CLOSE(p_inf, closed_form_p(n, beta, phase, 0.0), kTol, 0.0);
    for (double t : {50e-6, 300e-6, 1e-3}) {
      const double law = std::exp(-kappa * t * n * n / 2.0);  // Milburn 1991, see the top
      INFO("t = " << t);
      const double p = p_at(t);
      CHECK_CLOSE((p - p_inf) / (p0 - p_inf), law, 1e-10, 0.0);
      CHECK_CLOSE(p, closed_form_p(n, beta, phase, law), kTol, 0.0);
    }
  }
}

TEST_CASE("Fock engine: dephasing composes across measurement steps (published law)", "[fock]") {
  // A first measurement with b = 0 has K_o = (1 + o e^{i phi})/2, a scalar: it leaves the
  // state alone and selects outcome + with weight cos^2(phi/2) (DESIGN.md section 2). The
  // interference term seen by the second measurement at t2 must then have decayed by
  // exp(-kappa t2 N^2/2) over the two intervals [0, t1] and [t1, t2] together (the law above
  // is a semigroup), in the outcome-selective, the correlator and the unselective paths.
  const int n = 3;
  const double kappa = 900.0, t1 = 120e-6, t2 = 410e-6, phi1 = 0.7;
  const cplx beta = std::polar(std::sqrt(3.0), -0.8);
  const double phase = 0.25;
  MeasurementSequence seq;
  seq.noise.dephasing_rate_per_s = kappa;
  seq.steps.push_back(step("A", 0.0, phi1, t1));
  seq.steps.push_back(step("B", beta, phase, t2));
  const FockEngine engine(zero_plus_n(n));
  const double law = std::exp(-kappa * t2 * n * n / 2.0);  // Milburn 1991, see the top
  const double pb = closed_form_p(n, beta, phase, law);
  const double w = std::pow(std::cos(phi1 / 2.0), 2);
  CHECK_CLOSE(engine.probability(seq, {+1, +1}).value, w * pb, kTol, 0.0);
  CHECK_CLOSE(engine.probability(seq, {-1, +1}).value, (1.0 - w) * pb, kTol, 0.0);
  // Last average <o_B> after an unselective A: 2 P_B(+) - 1.
  CHECK_CLOSE(engine.last_average(seq).value, 2.0 * pb - 1.0, kTol, 0.0);
  // Correlator: sum_o o_A o_B P = (w - (1 - w)) (2 P_B(+) - 1) = cos(phi1) <o_B>.
  CHECK_CLOSE(engine.correlator(seq).value, std::cos(phi1) * (2.0 * pb - 1.0), kTol, 0.0);
}
