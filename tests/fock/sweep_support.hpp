// Random protocols for the engine agreement sweeps (fixed seeds; our own uniform draws so the
// protocols are the same on every platform).
#pragma once

#include <cmath>
#include <cstdint>
#include <random>
#include <string>

#include "core/types.hpp"
#include "phase_space/sequence.hpp"
#include "phase_space/state.hpp"

namespace macroreal::testing {

class Draw {
 public:
  explicit Draw(std::uint64_t seed) : rng_(seed) {}
  double uniform(double lo, double hi) {
    return lo + (hi - lo) * static_cast<double>(rng_() >> 11) * 0x1.0p-53;
  }
  int integer(int lo, int hi) { return lo + static_cast<int>(rng_() % (hi - lo + 1)); }
  bool coin(double p = 0.5) { return uniform(0.0, 1.0) < p; }
  cplx disc(double rmax) { return std::polar(uniform(0.0, rmax), uniform(0.0, 2.0 * kPi)); }

 private:
  std::mt19937_64 rng_;
};

struct RandomProtocol {
  StatePtr state;
  std::string state_text;
  MeasurementSequence seq;
  OutcomeString outcomes;
};

struct SweepLimits {
  double beta_max = 1.6;
  double nbar_max = 0.5;
  bool dephasing = true;
};

inline RandomProtocol random_protocol(Draw& d, int index, const SweepLimits& lim = {}) {
  RandomProtocol p;
  switch (index % 5) {
    case 0: {
      const double nbar = d.uniform(0.0, lim.nbar_max);
      p.state = make_thermal(nbar);
      p.state_text = "thermal " + std::to_string(nbar);
      break;
    }
    case 1: {
      const cplx a = d.disc(1.2);
      p.state = make_coherent(a);
      p.state_text = "coherent";
      break;
    }
    case 2: {
      const double r = d.uniform(0.0, 0.5), th = d.uniform(0.0, 2.0 * kPi);
      const double nbar = d.uniform(0.0, 0.3);
      p.state = make_squeezed(r, th, nbar, d.disc(0.6));
      p.state_text = "squeezed r " + std::to_string(r);
      break;
    }
    case 3: {
      const int n = d.integer(0, 3);
      p.state = make_fock(n);
      p.state_text = "fock " + std::to_string(n);
      break;
    }
    default: {
      const cplx a = std::polar(d.uniform(0.5, 1.5), d.uniform(0.0, 2.0 * kPi));
      p.state = make_cat(a, d.uniform(0.0, 2.0 * kPi));
      p.state_text = "cat";
      break;
    }
  }
  const int steps = (index / 5) % 2 == 0 ? 2 : 3;
  double t = d.uniform(0.0, 50e-6);
  for (int j = 0; j < steps; ++j) {
    TimedMeasurement tm;
    tm.label = std::string(1, static_cast<char>('A' + j));
    tm.measurement.beta = std::polar(d.uniform(0.3, lim.beta_max), d.uniform(0.0, 2.0 * kPi));
    tm.measurement.phase_rad = d.uniform(0.0, 2.0 * kPi);
    tm.measurement.split = d.coin() ? Split::symmetric : Split::one_sided;
    tm.measurement.contrast = d.coin() ? 1.0 : d.uniform(0.7, 1.0);
    tm.time_s = t;
    t += d.uniform(0.0, 100e-6);
    p.seq.steps.push_back(tm);
    p.outcomes.push_back(d.coin() ? +1 : -1);
  }
  auto& nz = p.seq.noise;
  if (d.coin(0.6)) {
    nz.damping_rate_per_s = d.uniform(0.0, 2000.0);
    nz.bath_nbar = d.uniform(0.0, 0.5);
  }
  if (d.coin(0.5)) nz.heating_quanta_per_s = d.uniform(0.0, 500.0);
  if (d.coin(0.3)) nz.frequency_noise_sd_rad_per_s = d.uniform(0.0, 3000.0);
  if (lim.dephasing && steps == 2 && d.coin(0.4)) nz.dephasing_rate_per_s = d.uniform(0.0, 300.0);
  return p;
}

}  // namespace macroreal::testing
