// Classical (macrorealist) reference models of a modular-measurement protocol.
//
// The oscillator is a classical phase-space point alpha = (x + i p)/sqrt2 drawn from the
// state's Wigner function, moved by the same Gaussian noise (shrink + isotropic diffusion)
// and the same random rotations. A measurement M(beta, phi, c) gives outcome o with
// probability 1/2 [1 + o c Re(e^{i phi} exp(beta alpha* - beta* alpha))] (the Weyl symbol of
// D(beta)) and:
//   non_invasive: leaves the point alone (Leggett & Garg, PRL 54, 857 (1985): K_3 <= 1);
//   kicked:       moves it by the split's deterministic, outcome-independent displacement
//                 (+beta/2 for the one-sided split, none for the symmetric one).
// Computed independently of the Weyl algebra, by Gaussian integrals over the joint
// distribution of the points at the measurement times. Refuses (UnsupportedError) states
// whose Wigner function is not known to be non-negative, and non-Gaussian states, and
// sequences with finite-duration measurements (duration_s > 0; see refuse_durations).
#pragma once

#include <string>

#include "phase_space/sequence.hpp"
#include "phase_space/state.hpp"
#include "phase_space/weyl_engine.hpp"

namespace macroreal {

enum class ClassicalKind { non_invasive, kicked };
std::string to_string(ClassicalKind k);

class ClassicalModel {
 public:
  ClassicalModel(StatePtr state, ClassicalKind kind, WeylEngineOptions options = {});

  EngineValue probability(const MeasurementSequence& seq, const OutcomeString& outcomes) const;
  EngineValue correlator(const MeasurementSequence& seq) const;
  EngineValue last_average(const MeasurementSequence& seq) const;
  double probability_value(const MeasurementSequence& seq, const OutcomeString& o) const {
    return probability(seq, o).value;
  }
  double correlator_value(const MeasurementSequence& seq) const { return correlator(seq).value; }
  ClassicalKind kind() const { return kind_; }
  std::string name() const { return "classical-" + to_string(kind_); }

 private:
  StatePtr state_;
  ClassicalKind kind_;
  WeylEngineOptions options_;
};

// Throws UnsupportedError naming `duration_s` and the measurement's label when one of the
// first k steps of `seq` has a finite interaction duration: the classical models (and the
// closed-form NSIT decomposition) treat measurements as instantaneous, and a finite
// interaction with noise acting during it is not modelled, so they refuse rather than give a
// value for a different experiment.
void refuse_durations(const MeasurementSequence& seq, std::size_t k);

// True when the classical models can be built for this state.
bool classical_model_applies(const State& state, std::string* why_not = nullptr);

}  // namespace macroreal
