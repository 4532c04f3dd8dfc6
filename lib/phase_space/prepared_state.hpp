// States post-selected by modular measurements (DESIGN.md §8, state.kind "prepared"):
//   rho' = K_s ... K_1 rho K_1^dag ... K_s^dag / p,   p = Tr[K_s ... K_1 rho K_1^dag ... K_s^dag],
// with the contrast-mixed outcome maps of measurement.hpp and, optionally, the Gaussian noise
// channel acting between consecutive preparation steps (none before the first: the base
// state is taken as given at the first step). Expectations are computed in the Heisenberg
// picture: an operator sum_k c_k D(g_k) is pulled back through the outcome maps (last step
// first) and evaluated in the base state, so prepared states nest without any truncation.
#pragma once

#include <vector>

#include "phase_space/channel.hpp"
#include "phase_space/measurement.hpp"
#include "phase_space/sequence.hpp"
#include "phase_space/state.hpp"

namespace macroreal {

class PreparedState final : public State {
 public:
  // Throws DomainError on mismatched sizes, bad measurements or noise, decreasing times, or
  // an outcome probability below 1e-14; UnsupportedError for rotating noise (dephasing or
  // frequency noise are not modelled inside a preparation).
  PreparedState(StatePtr from, std::vector<ModularMeasurement> steps, OutcomeString outcomes,
                NoiseModel noise = {}, std::vector<double> times = {});

  cplx characteristic(cplx beta) const override;
  cplx expectation(const WeylSum& op) const override;
  bool wigner_nonnegative() const override { return false; }  // not known in general
  bool rotation_invariant() const override { return false; }
  std::string describe() const override;

  double preparation_probability() const { return p_; }
  // The operator pulled back through the preparation (unnormalised: divide by p).
  WeylSum pull_back(const WeylSum& op) const;

 private:
  StatePtr from_;
  std::vector<ModularMeasurement> steps_;
  OutcomeString outcomes_;
  std::vector<GaussianChannel> between_;  // between_[j]: channel before step j (j >= 1)
  double p_ = 1.0;
};

StatePtr make_prepared(StatePtr from, std::vector<ModularMeasurement> steps,
                       OutcomeString outcomes, NoiseModel noise = {},
                       std::vector<double> times = {});

}  // namespace macroreal
