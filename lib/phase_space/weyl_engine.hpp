// The Weyl engine: exact sequence probabilities from effect operators written as sums of
// displacements (DESIGN.md section 2).
//
// The effect operator of outcomes o_1..o_k is built backwards in the Heisenberg picture:
// E = 1; for j = k..1: E -> (measurement j, outcome o_j)^dag(E), then the Gaussian channel
// from step j-1 to j. Then P = sum_k c_k chi(gamma_k): exact, no truncation, cost
// independent of nbar. Rotations (quasi-static frequency noise: one offset delta per shot,
// angle delta*t; Markovian dephasing: an independent Gaussian angle of variance kappa*dt per
// interval) act on the displacement arguments; they are averaged by Gauss-Hermite product
// quadrature, the node count doubled until two successive estimates agree within
// `rotation_tolerance`; the last difference is reported as the error estimate. When the
// number of evaluations would exceed `max_rotation_evaluations` the engine throws
// UnsupportedError naming the Fock engine (--engine fock) as the one to use.
//
// Finite-duration measurements (TimedMeasurement::duration_s > 0, issue 4): the displacement is
// applied in n = interaction_slices slices with the Gaussian noise in between, exactly as in
// the Fock engine's discretisation (sliced_measurement.hpp); each slice maps a displacement to
// a displacement, so the sliced effect operator stays a finite Weyl sum. The engine evaluates
// n and 2n slices, returns the Richardson combination (4 v_2n - v_n)/3 and reports
// |v_2n - v_n| as the slicing error estimate. Durations together with rotations (dephasing,
// frequency noise) are refused with UnsupportedError naming the Fock engine.
#pragma once

#include <string>

#include "phase_space/sequence.hpp"
#include "phase_space/state.hpp"

namespace macroreal {

struct WeylEngineOptions {
  int initial_hermite_nodes = 12;          // per rotation dimension
  int max_hermite_nodes = 384;           // 1-2 angles only: the evaluation limit caps more
  double rotation_tolerance = 1e-12;       // absolute, on each probability
  long max_rotation_evaluations = 2000000; // product-quadrature size limit
  int interaction_slices = 16;             // slices n of a finite-duration measurement (also 2n)
};

// A value with how it was obtained.
struct EngineValue {
  double value = 0.0;
  double error_estimate = 0.0;  // quadrature or slicing error estimate (0 when exact)
  int hermite_nodes = 0;        // nodes per rotation dimension used (0: no quadrature)
  int rotation_dimensions = 0;
  long evaluations = 1;
  double slicing_change = 0.0;  // |v(2n) - v(n)| for finite-duration measurements
  int slices = 0;               // n (0: every measurement instantaneous)
};

class WeylEngine {
 public:
  explicit WeylEngine(StatePtr state, WeylEngineOptions options = {});

  // P(o_1..o_k) with only the first k = outcomes.size() steps performed.
  EngineValue probability(const MeasurementSequence& seq, const OutcomeString& outcomes) const;
  // <o_1 o_2 ... o_n> over all steps of the sequence (every step performed).
  EngineValue correlator(const MeasurementSequence& seq) const;
  // <o_last> after the earlier steps were performed and their outcomes ignored.
  EngineValue last_average(const MeasurementSequence& seq) const;

  // Plain-double fast paths for optimisers and benchmarks.
  double probability_value(const MeasurementSequence& seq, const OutcomeString& o) const {
    return probability(seq, o).value;
  }
  double correlator_value(const MeasurementSequence& seq) const { return correlator(seq).value; }

  const State& state() const { return *state_; }
  const StatePtr& state_ptr() const { return state_; }
  const WeylEngineOptions& options() const { return options_; }
  std::string name() const { return "weyl"; }

 private:
  StatePtr state_;
  WeylEngineOptions options_;
};

}  // namespace macroreal
