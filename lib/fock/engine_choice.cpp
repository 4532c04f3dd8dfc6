// Engine choice (engine_choice.hpp).
#include "fock/engine_choice.hpp"

#include <cmath>

#include "core/error.hpp"
#include "fock/density_matrix_state.hpp"

namespace macroreal {

std::string to_string(EngineKind k) {
  switch (k) {
    case EngineKind::automatic: return "auto";
    case EngineKind::weyl: return "weyl";
    case EngineKind::fock: return "fock";
  }
  return "auto";
}

EngineKind parse_engine_kind(const std::string& s) {
  if (s == "auto" || s == "automatic") return EngineKind::automatic;
  if (s == "weyl") return EngineKind::weyl;
  if (s == "fock") return EngineKind::fock;
  throw DomainError("engine = \"" + s + "\", but must be \"auto\", \"weyl\" or \"fock\"");
}

EngineChoice choose_engine(EngineKind requested, const State& state,
                           const std::vector<MeasurementSequence>& sequences,
                           const FockEngineOptions& fock_options,
                           const WeylEngineOptions& weyl_options) {
  if (requested == EngineKind::weyl) return {EngineKind::weyl, "requested (--engine weyl)"};
  if (requested == EngineKind::fock) return {EngineKind::fock, "requested (--engine fock)"};
  if (dynamic_cast<const DensityMatrixState*>(&state))
    return {EngineKind::fock, "the state is a tabulated density matrix"};
  for (const auto& [label, t] : fock_options.interaction_duration_s)
    if (t > 0.0)
      return {EngineKind::fock, "measurement '" + label +
                                    "' has a finite interaction duration (sliced in the Fock engine)"};
  for (const auto& seq : sequences) {
    if (!(seq.noise.dephasing_rate_per_s > 0.0)) continue;
    // The Weyl engine integrates one Gaussian angle per interval with dt > 0 (and one for
    // frequency noise); its first doubling needs (2 n0)^d evaluations.
    int d = seq.noise.frequency_noise_sd_rad_per_s > 0.0 ? 1 : 0;
    double t_prev = 0.0;
    for (const auto& s : seq.steps) {
      if (s.time_s > t_prev) ++d;
      t_prev = s.time_s;
    }
    const double evaluations = std::pow(2.0 * weyl_options.initial_hermite_nodes, d);
    if (evaluations > static_cast<double>(weyl_options.max_rotation_evaluations))
      return {EngineKind::fock, "Markovian dephasing over " + std::to_string(d) +
                                    " intervals needs a " + std::to_string(d) +
                                    "-dimensional angle quadrature in the Weyl engine"};
  }
  // Say what the Weyl engine will do with this noise: exact sums, or exact sums averaged by
  // a Gauss-Hermite quadrature over rotation angles (still within its evaluation limit).
  bool dephasing = false, frequency = false;
  for (const auto& seq : sequences) {
    dephasing = dephasing || seq.noise.dephasing_rate_per_s > 0.0;
    frequency = frequency || seq.noise.frequency_noise_sd_rad_per_s > 0.0;
  }
  if (dephasing || frequency)
    return {EngineKind::weyl,
            std::string("the state's characteristic function is known and the ") +
                (dephasing ? "Markovian dephasing" : "quasi-static frequency noise") +
                " fits the Weyl engine's angle quadrature: exact displacement sums averaged "
                "by Gauss-Hermite quadrature, no truncation"};
  return {EngineKind::weyl,
          "the state's characteristic function is known and the noise is Gaussian channels: "
          "exact displacement sums, no truncation"};
}

ModelEngine::ModelEngine(StatePtr state, EngineKind requested,
                         const std::vector<MeasurementSequence>& sequences,
                         WeylEngineOptions weyl_options, FockEngineOptions fock_options)
    : requested_(requested),
      choice_(choose_engine(requested, *state, sequences, fock_options, weyl_options)),
      weyl_(state, weyl_options),
      fock_(state, fock_options) {}

template <class F>
EngineValue ModelEngine::dispatch(F&& f) const {
  if (choice_.kind == EngineKind::fock) return f(fock_);
  if (requested_ != EngineKind::automatic) return f(weyl_);
  try {
    return f(weyl_);
  } catch (const UnsupportedError& e) {
    fallbacks_.push_back(std::string("Weyl engine refused, Fock engine used: ") + e.what());
    return f(fock_);
  }
}

EngineValue ModelEngine::probability(const MeasurementSequence& seq, const OutcomeString& o) const {
  return dispatch([&](const auto& e) { return e.probability(seq, o); });
}
EngineValue ModelEngine::correlator(const MeasurementSequence& seq) const {
  return dispatch([&](const auto& e) { return e.correlator(seq); });
}
EngineValue ModelEngine::last_average(const MeasurementSequence& seq) const {
  return dispatch([&](const auto& e) { return e.last_average(seq); });
}

}  // namespace macroreal
