// Photon-count distributions of a fluorescence state detector for one detection window.
//
// Bright state: Poisson(bright_rate). Dark state without decay: Poisson(dark_rate) (background).
// Dark state with decay ("dark-pumped-to-bright"): the dark state is pumped to bright at an
// exponentially distributed time s with mean tau (pump_per_window a = window / tau); after
// that it fluoresces at the bright rate. With u = s / window:
//   P_dark(n) = e^{-a} Pois(n; dark_rate)
//             + int_0^1 a e^{-a u} Pois(n; dark_rate + (bright_rate - dark_rate)(1 - u)) du,
// the single-state-change model of fluorescence detection with off-resonant pumping
// (M. Acton et al., "Near-perfect simultaneous measurement of a qubit register", Quantum Inf.
// Comput. 6:465 (2006), from memory; discussed as the "single possible state change" case in
// S. Woelk, C. Piltz, T. Sriarunothai, C. Wunderlich, "State selective detection of hyperfine
// qubits", arXiv:1406.5821). The integral is done by composite Gauss-Legendre quadrature
// (8 panels x 15 nodes), checked against scipy.integrate.quad in tests/reference.
// Rates are mean counts per window (>= 0); the bright state does not decay in this model.
#pragma once

#include <vector>

namespace macroreal {

struct CountModel {
  double dark_rate = 0;       // mean background counts per window, >= 0
  double bright_rate = 0;     // mean counts per window of the bright state, > dark_rate
  double pump_per_window = 0; // window / dark lifetime; 0 = no decay
};

// Throws DomainError unless 0 <= dark_rate < bright_rate (finite) and pump_per_window >= 0.
void validate(const CountModel& m);

// Poisson(n; lambda) and P(N <= n), P(N > n) for lambda >= 0 (lambda = 0: all mass at 0).
// The tails use the regularised incomplete gamma functions (Boost.Math), accurate far out.
double poisson_probability(long n, double lambda);
double poisson_lower_tail(long n, double lambda);
double poisson_upper_tail(long n, double lambda);

// pmf tables for n = 0..n_max of the two states under the model.
std::vector<double> dark_pmf(const CountModel& m, long n_max);
std::vector<double> bright_pmf(const CountModel& m, long n_max);

// Misassignment probabilities at `threshold` (a count <= threshold reads dark):
//   dark_read_bright = P_dark(N > t), bright_read_dark = P_bright(N <= t).
struct Misassignment {
  double dark_read_bright = 0, bright_read_dark = 0;
  double total() const { return dark_read_bright + bright_read_dark; }
};
Misassignment misassignment(const CountModel& m, long threshold);

// The model for a window `factor` times as long: rates and pump_per_window scale linearly
// (stationary fluorescence and background; common practice, no source).
CountModel scaled_window(const CountModel& m, double factor);

}  // namespace macroreal
