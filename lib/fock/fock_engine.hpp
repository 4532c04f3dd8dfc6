// The Fock engine: sequence probabilities from a truncated density matrix (DESIGN.md
// section 2, "Fock engine"), with the same interface as the Weyl engine.
//
// Schroedinger picture on rho (Eigen matrices, Fock levels 0..N-1):
//   rho0 = the state's N x N block (fock_tabulation.hpp);
//   between measurements: exact phase-covariant Lindblad noise (damping + bath, heating,
//   force noise, Markovian dephasing, acting together), lindblad_propagator.hpp, and the
//   rotation exp(-i delta dt a^dag a) of a quasi-static frequency offset delta;
//   measurement j: the Kraus sandwich of its outcome map (T0 + c o T1, fock_tabulation.hpp),
//   the signed map 2 c T1 (correlators) or the unselective map 2 T0; the last measurement
//   only needs traces: P(o) = 1/2 Tr X + c o 1/2 Re(e^{i phi} Tr[D(beta) X]).
//   Quasi-static noise is averaged over delta = sigma u, u ~ N(0, 1) (one offset per shot),
//   by the trapezoidal rule on u in [-9, 9] with the step halved (nested: only the new nodes
//   are evaluated) until two estimates agree within `rotation_tolerance`. For an integrand
//   analytic in a strip times the Gaussian the trapezoidal rule converges geometrically in
//   1/h^2 and needs fewer nodes than Gauss-Hermite, whose nodes spread over +-sqrt(2M)
//   (Trefethen & Weideman, "The exponentially convergent trapezoidal rule", SIAM Review 56,
//   385 (2014); section from memory). P(delta) carries phases e^{-i delta dt (m - n)} up to
//   |m - n| ~ the cutoff; an earlier Gauss-Hermite doubling (12, 24, ..., 192 nodes) stopped
//   short of 1e-11 on one case of the QuTiP reference set, which 65-129 nested trapezoidal
//   nodes now reach (tests/fock/test_qutip_weyl_reference.cpp).
//
// Finite-duration measurements (an interaction of duration T starting at time_s: the step's
// duration_s, or else a duration per measurement label in the options): the
// probe is kept as four oscillator branch operators R_ss' (s, s' the probe states; branches
// D(-beta/2), D(+beta/2) for the symmetric split, D(0), D(beta) for the one-sided one). Each
// of `interaction_slices` slices applies the kick D(s beta/(2 n)) (one-sided: D(s beta / n))
// on the left and D(s' beta/(2 n))^dag on the right, with the noise over T/n split
// symmetrically around it (Strang splitting, error O(n^-2) with only even powers); the
// closing Ramsey projection combines them as T0 = (R_AA + R_BB)/4, T1 = (e^{i phi} R_BA +
// h.c.)/4. The engine evaluates n and 2n slices, returns the Richardson combination
// (4 v_2n - v_n)/3 and reports |v_2n - v_n| as the slicing error estimate.
//
// Truncation control: the cutoff is chosen automatically (or given); the result is recomputed
// with the cutoff grown by 25 % and the change is the truncation error estimate; the largest
// population in the top tenth of the levels during the run is reported as well. When
// `truncation_tolerance` > 0 and the change exceeds it, the engine throws UnsupportedError.
#pragma once

#include <map>
#include <memory>
#include <mutex>
#include <string>

#include <Eigen/Dense>

#include "fock/lindblad_propagator.hpp"
#include "phase_space/sequence.hpp"
#include "phase_space/state.hpp"
#include "phase_space/weyl_engine.hpp"

namespace macroreal {

struct FockEngineOptions {
  int cutoff = 0;                    // Fock levels; 0 = automatic (see automatic_cutoff)
  int max_cutoff = 400;              // automatic choices above this throw UnsupportedError
  double state_tail = 1e-12;         // automatic: state population allowed above the cutoff
                                     // (the tabulation from chi is accurate to ~1e-13)
  bool check_truncation = true;      // recompute with the cutoff grown by 25 %
  double truncation_tolerance = 0.0; // > 0: required |change|, else UnsupportedError
  // Quasi-static frequency noise: nested trapezoidal nodes (2^k + 1; the first count is
  // rounded up to that form); refinement stops with UnsupportedError beyond the maximum.
  int initial_quadrature_nodes = 33;
  int max_quadrature_nodes = 1025;
  // Quadrature tolerance: looser than the Weyl engine's 1e-12 because the tabulated state's
  // round-off (~1e-13 per element, fock_tabulation.hpp) puts a noise floor under P(delta).
  double rotation_tolerance = 1e-11;
  int interaction_slices = 16;       // slices n of a finite-duration measurement (also 2n)
  // Interaction duration (seconds, >= 0) by measurement label; missing = instantaneous.
  std::map<std::string, double> interaction_duration_s;
};

// How a value was obtained, beyond EngineValue.
struct FockDiagnostics {
  int cutoff = 0;
  int check_cutoff = 0;              // 0 when the truncation check was off
  double state_population_outside = 0.0;  // 1 - Tr rho0 at the cutoff
  double edge_population = 0.0;      // largest population in the top tenth of levels
  double truncation_change = 0.0;    // |v(1.25 N) - v(N)|
  double slicing_change = 0.0;       // |v(2n) - v(n)| for finite-duration measurements
  double rotation_change = 0.0;      // last quadrature halving difference
  int quadrature_nodes = 0;          // trapezoidal nodes used (0: no frequency-noise average)
  int slices = 0;                    // n (0: every measurement instantaneous)
};

struct FockValue {
  EngineValue value;
  FockDiagnostics diagnostics;
};

class FockEngine {
 public:
  explicit FockEngine(StatePtr state, FockEngineOptions options = {});

  EngineValue probability(const MeasurementSequence& seq, const OutcomeString& outcomes) const;
  EngineValue correlator(const MeasurementSequence& seq) const;
  EngineValue last_average(const MeasurementSequence& seq) const;
  double probability_value(const MeasurementSequence& seq, const OutcomeString& o) const {
    return probability(seq, o).value;
  }
  double correlator_value(const MeasurementSequence& seq) const { return correlator(seq).value; }

  // The same with the full diagnostics.
  FockValue probability_detailed(const MeasurementSequence& seq, const OutcomeString& o) const;
  FockValue correlator_detailed(const MeasurementSequence& seq) const;
  FockValue last_average_detailed(const MeasurementSequence& seq) const;

  // The cutoff used for this sequence: options.cutoff, or the smallest N holding the state
  // to 1 - state_tail, grown by the largest excursion B of the measurement displacements
  // before the last step (sum of |beta|/2, symmetric, or |beta|, one-sided):
  // (sqrt(N_state) + B)^2 + 8 B + 20 (a coherent state's Poisson tail below 1e-15 lies
  // within about 8 sqrt(mean) of the mean), plus ten times the quanta the noise may add.
  // Common practice, no source; the 25 % truncation check verifies it.
  int automatic_cutoff(const MeasurementSequence& seq) const;

  const State& state() const { return *state_; }
  const FockEngineOptions& options() const { return options_; }
  std::string name() const { return "fock"; }

 private:
  enum class Plan { probability, correlator, last_average };
  FockValue run(const MeasurementSequence& seq, std::size_t k, Plan plan,
                const OutcomeString* outcomes) const;
  double evaluate(const MeasurementSequence& seq, std::size_t k, Plan plan,
                  const OutcomeString* outcomes, int cutoff, int slices,
                  double* edge, double* rotation_change, int* nodes_used) const;
  double evaluate_at(const MeasurementSequence& seq, std::size_t k, Plan plan,
                     const OutcomeString* outcomes, const Eigen::MatrixXcd& rho0, int slices,
                     double delta, double* edge) const;
  std::shared_ptr<const Eigen::MatrixXcd> initial(int cutoff) const;
  double duration_of(const TimedMeasurement& m) const;
  int state_levels() const;

  StatePtr state_;
  FockEngineOptions options_;
  LindbladPropagator propagator_;
  mutable std::mutex mu_;
  mutable std::map<int, std::shared_ptr<const Eigen::MatrixXcd>> initial_;
  mutable int state_levels_ = -1;
};

}  // namespace macroreal
