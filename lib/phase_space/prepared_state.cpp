// Post-selected (prepared) states, evaluated in the Heisenberg picture (prepared_state.hpp).
#include "phase_space/prepared_state.hpp"

#include <cmath>

#include "core/error.hpp"
#include "phase_space/number_text.hpp"

namespace macroreal {

PreparedState::PreparedState(StatePtr from, std::vector<ModularMeasurement> steps,
                             OutcomeString outcomes, NoiseModel noise,
                             std::vector<double> times)
    : from_(std::move(from)), steps_(std::move(steps)), outcomes_(std::move(outcomes)) {
  if (!from_) throw DomainError("prepared state: the base state is empty");
  if (outcomes_.size() != steps_.size())
    throw DomainError("prepared state: " + std::to_string(outcomes_.size()) +
                      " outcomes for " + std::to_string(steps_.size()) +
                      " steps, but there must be one outcome per step");
  for (std::size_t j = 0; j < steps_.size(); ++j) {
    try {
      steps_[j].validate();
    } catch (const DomainError& e) {
      throw DomainError("prepared state: step " + std::to_string(j + 1) + ": " + e.what());
    }
    if (outcomes_[j] != 1 && outcomes_[j] != -1)
      throw DomainError("prepared state: outcome = " + std::to_string(outcomes_[j]) +
                        ", but must be +1 or -1");
  }
  noise.validate();
  if (noise.has_rotations())
    throw UnsupportedError(
        "prepared state: dephasing and frequency noise inside a preparation are not modelled "
        "by the Weyl engine; use the Fock engine (--engine fock)");
  if (!times.empty() && times.size() != steps_.size())
    throw DomainError("prepared state: " + std::to_string(times.size()) + " times for " +
                      std::to_string(steps_.size()) + " steps");
  between_.assign(steps_.size(), GaussianChannel{});
  for (std::size_t j = 1; j < times.size(); ++j) {
    if (!(times[j] >= times[j - 1]))
      throw DomainError("prepared state: time of step " + std::to_string(j + 1) + " = " +
                        detail::number_text(times[j]) + ", but times must not decrease");
    between_[j] = GaussianChannel::over(noise, times[j] - times[j - 1]);
  }
  p_ = from_->expectation(pull_back(WeylSum::identity())).real();
  if (!(p_ >= 1e-14))
    throw DomainError("preparation outcome has probability " + detail::number_text(p_) +
                      ", but must be >= 1e-14 to condition on it");
}

WeylSum PreparedState::pull_back(const WeylSum& op) const {
  WeylSum x = op;
  for (std::size_t j = steps_.size(); j-- > 0;) {
    x = heisenberg_outcome(steps_[j], outcomes_[j], x);
    between_[j].apply_adjoint(x);
  }
  return x;
}

cplx PreparedState::expectation(const WeylSum& op) const {
  return from_->expectation(pull_back(op)) / p_;
}

cplx PreparedState::characteristic(cplx beta) const {
  return expectation(WeylSum::displacement(beta));
}

std::string PreparedState::describe() const {
  return "state prepared from " + from_->describe() + " by " + std::to_string(steps_.size()) +
         " modular measurement(s) with outcomes " + to_string(outcomes_) + " (probability " +
         detail::number_text(p_) + ")";
}

StatePtr make_prepared(StatePtr from, std::vector<ModularMeasurement> steps,
                       OutcomeString outcomes, NoiseModel noise, std::vector<double> times) {
  return std::make_shared<PreparedState>(std::move(from), std::move(steps),
                                         std::move(outcomes), noise, std::move(times));
}

}  // namespace macroreal
