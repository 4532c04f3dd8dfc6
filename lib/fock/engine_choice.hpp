// Which engine computes a prediction (DESIGN.md section 2, "Two engines"), and one object that
// holds whichever was chosen behind the common interface.
//
// automatic:
//   - Fock engine for a tabulated state (density_matrix files), for finite-duration
//     measurements (slicing) and for Markovian dephasing over so many intervals that the Weyl
//     engine's product quadrature (one angle per interval) would exceed its evaluation limit;
//   - Weyl engine otherwise (closed-form states, Gaussian channels, quasi-static rotations):
//     exact, no truncation, cost independent of the occupation;
//   - and at evaluation time, when the Weyl engine refuses a sequence (UnsupportedError), the
//     Fock engine is used for it and the reason is recorded.
// weyl / fock: that engine only (its own UnsupportedError reaches the caller).
#pragma once

#include <string>
#include <vector>

#include "fock/fock_engine.hpp"
#include "phase_space/weyl_engine.hpp"

namespace macroreal {

enum class EngineKind { automatic, weyl, fock };
std::string to_string(EngineKind k);                 // "auto", "weyl", "fock"
EngineKind parse_engine_kind(const std::string& s);  // "auto" | "automatic" | "weyl" | "fock"; DomainError

struct EngineChoice {
  EngineKind kind = EngineKind::weyl;  // weyl or fock, never automatic
  std::string reason;
};

// The engine for these sequences. `fock_options` carries the interaction durations.
EngineChoice choose_engine(EngineKind requested, const State& state,
                           const std::vector<MeasurementSequence>& sequences,
                           const FockEngineOptions& fock_options = {},
                           const WeylEngineOptions& weyl_options = {});

class ModelEngine {
 public:
  ModelEngine(StatePtr state, EngineKind requested,
              const std::vector<MeasurementSequence>& sequences,
              WeylEngineOptions weyl_options = {}, FockEngineOptions fock_options = {});

  EngineValue probability(const MeasurementSequence& seq, const OutcomeString& outcomes) const;
  EngineValue correlator(const MeasurementSequence& seq) const;
  EngineValue last_average(const MeasurementSequence& seq) const;
  double probability_value(const MeasurementSequence& seq, const OutcomeString& o) const {
    return probability(seq, o).value;
  }
  double correlator_value(const MeasurementSequence& seq) const { return correlator(seq).value; }

  const EngineChoice& choice() const { return choice_; }
  // Reasons for sequences that fell back from the Weyl to the Fock engine (automatic only).
  const std::vector<std::string>& fallbacks() const { return fallbacks_; }
  std::string name() const { return to_string(choice_.kind); }

 private:
  template <class F>
  EngineValue dispatch(F&& f) const;

  EngineKind requested_;
  EngineChoice choice_;
  WeylEngine weyl_;
  FockEngine fock_;
  mutable std::vector<std::string> fallbacks_;
};

}  // namespace macroreal
