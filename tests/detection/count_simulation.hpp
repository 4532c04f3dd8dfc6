// Test-only simulation of calibration shots: Poisson counts by inversion from uniform draws
// (sequential search; Devroye, "Non-Uniform Random Variate Generation", 1986, sec. X.3.3),
// and the dark-pumped-to-bright model by drawing the pumping time first. Seeded, portable.
#pragma once

#include <cmath>
#include <vector>

#include "detection/calibration_counts.hpp"
#include "detection/count_model.hpp"
#include "stats/random_variates.hpp"

namespace macroreal::test_support {

inline long poisson_draw(RandomEngine& g, double lambda) {
  if (lambda <= 0) return 0;
  const double u = uniform01(g);
  double p = std::exp(-lambda), c = p;
  long n = 0;
  while (u > c && n < 100000) {
    ++n;
    p *= lambda / static_cast<double>(n);
    c += p;
    if (p == 0 && c < u) break;  // round-off floor far in the tail
  }
  return n;
}

inline long dark_draw(RandomEngine& g, const CountModel& m) {
  if (m.pump_per_window > 0) {
    const double s = -std::log(uniform01(g)) / m.pump_per_window;  // pumping time / window
    if (s < 1) return poisson_draw(g, m.dark_rate + (m.bright_rate - m.dark_rate) * (1 - s));
  }
  return poisson_draw(g, m.dark_rate);
}

inline void add(std::vector<long>& h, long n) {
  if (static_cast<long>(h.size()) <= n) h.resize(static_cast<std::size_t>(n) + 1, 0);
  ++h[static_cast<std::size_t>(n)];
}

// n_dark, n_bright labelled shots and n_unknown shots that are bright with probability w.
inline CountHistograms simulate_calibration(RandomEngine& g, const CountModel& m, long n_dark,
                                            long n_bright, long n_unknown, double w) {
  CountHistograms h;
  h.file = "simulated";
  for (long i = 0; i < n_dark; ++i) add(h.dark, dark_draw(g, m));
  for (long i = 0; i < n_bright; ++i) add(h.bright, poisson_draw(g, m.bright_rate));
  for (long i = 0; i < n_unknown; ++i)
    add(h.unknown, uniform01(g) < w ? poisson_draw(g, m.bright_rate) : dark_draw(g, m));
  h.rows = n_dark + n_bright + n_unknown;
  return h;
}

}  // namespace macroreal::test_support
