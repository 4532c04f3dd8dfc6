// Model predictions for a protocol file (`macroreal predict`): the probability of every
// outcome string of every sequence (listed and generated), and for each test the quantum
// value next to the classical reference models of DESIGN.md section 2:
//   Leggett-Garg: K_3 = C_12 + C_23 - C_13 <= 1 (and the family of four), K_n <= n - 2,
//                 with K_classical (non-invasive point model, Leggett & Garg, PRL 54, 857
//                 (1985)) and K_classical_kicked (the point also takes the split's kick);
//   NSIT A -> B:  S = P_B(+) - sum_a P_AB(a, +), with its closed-form decomposition.
// A violation is "explained by the classical model" when the model that matches the split in
// use (symmetric <-> non-invasive, one-sided or mixed <-> kicked) reproduces it; where the
// Wigner function is not known to be non-negative the classical values are absent (null).
// Probabilities are those of the ideal +/-1 outcomes, before any detection errors.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "fock/engine_choice.hpp"
#include "phase_space/classical_model.hpp"
#include "phase_space/temporal_tests.hpp"
#include "phase_space/weyl_engine.hpp"
#include "protocol/protocol.hpp"

namespace macroreal {

struct PredictOptions {
  // Which engine computes the quantum probabilities: the automatic choice of
  // fock/engine_choice.hpp (default: Weyl where it applies, Fock for tabulated states, finite
  // interaction durations and dephasing beyond the Weyl quadrature, and Fock for any sequence
  // the Weyl engine refuses), or the Weyl or Fock engine only. The classical models always
  // use the Weyl-engine quadrature settings.
  EngineKind engine_kind = EngineKind::automatic;
  WeylEngineOptions engine{};               // Gauss-Hermite settings for rotating noise
  FockEngineOptions fock{};                 // cutoff and truncation checks of the Fock engine
  // A sequence whose outcome probabilities sum to 1 within this counts as consistent; a
  // larger deviation is reported as a status (not thrown), see PredictionResult::status.
  double sum_tolerance = 1e-9;
  // A classical K within this of the quantum K (or above it) counts as reproducing it; the
  // quantum K must exceed the bound by more than this to count as a violation.
  double match_tolerance = 1e-9;
  bool classical_models = true;             // compute K_classical / K_classical_kicked
};

struct OutcomeProbability {
  OutcomeString outcomes;     // the ideal signs of the steps performed (may be truncated)
  double p = 0.0;
  double error_estimate = 0.0;
};

struct SequencePrediction {
  std::string name;
  std::vector<std::string> steps;
  std::vector<int> dark_is;
  bool generated = false;
  // Destructive readout: the strings that end at the first non-dark sign plus the full ones;
  // nondestructive: all 2^n full strings. Order: "+" before "-" at each position, shorter
  // strings where they branch off.
  std::vector<OutcomeProbability> outcomes;
  double total = 0.0;         // sum of p over outcomes (1 up to rounding)
};

struct PairCorrelator {
  std::string pair;           // measurement names concatenated, e.g. "AB"
  std::string first, second;
  double quantum = 0.0;       // from the joint probabilities of the sequences of the pair
  std::optional<double> classical, classical_kicked;
};

// What one classical model says about a predicted violation.
enum class ClassicalVerdict { no_violation, beaten, reproduces, unavailable };
std::string to_string(ClassicalVerdict v);

struct LeggettGargPrediction {
  std::vector<std::string> order;
  double K = 0.0;
  double bound = 1.0;                          // n - 2
  std::vector<PairCorrelator> correlators;     // every pair i < j of the order
  std::vector<double> family;                  // n = 3: 1 + s1 C12 + s2 C23 + s1 s2 C13 for
                                               // (s1, s2) = ++, +-, -+, -- (each >= 0); else empty
  std::optional<double> K_classical, K_classical_kicked;
  std::string classical_unavailable;           // why the classical values are absent
  std::string split_in_use;                    // "symmetric", "one-sided" or "mixed"
  ClassicalKind model_in_use = ClassicalKind::non_invasive;
  bool violation = false;                      // K > bound + match_tolerance
  ClassicalVerdict versus_non_invasive = ClassicalVerdict::no_violation;
  ClassicalVerdict versus_kicked = ClassicalVerdict::no_violation;
  bool explained_by_classical_model = false;
  double engine_correlator_deviation = 0.0;    // max |C from probabilities - engine correlator|
  std::string verdict;                         // one sentence in words
};

struct NsitPrediction {
  std::string from, to;
  std::optional<double> margin;
  double S = 0.0;
  double p_to_alone = 0.0;                     // P_B(+)
  double p_to_after = 0.0;                     // sum_a P_AB(a, +)
  std::optional<double> S_classical, S_classical_kicked;
  std::string classical_unavailable;
  std::optional<SignallingDecomposition> decomposition;
  std::string decomposition_unavailable;
  std::string verdict;
};

struct TestPrediction {
  TestSpec spec;
  std::optional<LeggettGargPrediction> lg;
  std::optional<NsitPrediction> nsit;
};

// How the numbers were obtained (aggregated over every engine call).
struct EngineSummary {
  std::string name = "weyl";       // the engine used: "weyl" or "fock"
  std::string requested = "auto";  // what was asked for: "auto", "weyl" or "fock"
  std::string choice_reason;       // why that engine ran (the automatic choice or the request)
  std::vector<std::string> fallbacks;  // sequences the automatic choice sent to the Fock engine
  int max_hermite_nodes = 0;       // per rotation dimension; 0: no quadrature was needed
  int max_rotation_dimensions = 0;
  double max_error_estimate = 0.0; // largest quadrature error estimate of any probability
  long evaluations = 0;            // characteristic-function sums evaluated
  long engine_calls = 0;
};

struct PredictionResult {
  std::string file, title;
  std::string state_description;
  bool wigner_nonnegative = false;
  bool classical_model_applies = false;
  std::string classical_unavailable;
  Readout readout = Readout::destructive;
  std::vector<SequencePrediction> sequences;
  std::vector<TestPrediction> tests;
  EngineSummary engine;
  double max_sum_deviation = 0.0;  // max over sequences of |total - 1|
  std::string status = "ok";       // "ok" or what went wrong numerically
  std::vector<std::string> cautions;

  std::string brief() const;       // one line: tests and their values
};

// Throws DomainError when the protocol has no state, UnsupportedError when the chosen engine
// cannot do the noise or state (the Weyl engine's message names the Fock engine).
PredictionResult predict(const Protocol& protocol, const PredictOptions& options = {});

}  // namespace macroreal
