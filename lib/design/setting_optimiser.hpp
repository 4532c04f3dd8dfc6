// The setting optimiser behind `macroreal optimise` (issue 6): chooses the displacements
// (|beta| and direction), Ramsey phases and, optionally, a prepared cat input of a protocol to
// maximise one of the figures of merit of design/objectives.hpp, under a maximum |beta|, a list
// of free settings and the allowed input states, optionally averaged over (or minimised over)
// the uncertainty of the noise parameters. The search is design/global_search.hpp (global stage
// then multi-start local polish). The result carries the optimised protocol (in memory and as a
// file ready for predict), the figures at the optimum and a tolerance table: the objective
// after changing each setting by -5 % and +5 % (see ToleranceRow), so the experimenter sees which
// knob needs care.
//
// Robust design over an uncertain noise parameter (Protocol::uncertain_noise):
//   {mean, sd}: mean = E over N(mean, sd^2) by probabilists' Gauss-Hermite quadrature
//               (nodes clipped at 0, every noise parameter being >= 0); worst = the minimum
//               over the same nodes;
//   {range}:    mean = the average over a uniform distribution on the range by Gauss-Legendre
//               quadrature; worst = the minimum over the Legendre nodes and both ends.
// Several uncertain parameters are combined on the tensor grid of their rules.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "design/global_search.hpp"
#include "design/objectives.hpp"
#include "protocol/protocol.hpp"

namespace macroreal {

enum class RobustMode { none, mean, worst };
std::string to_string(RobustMode m);
RobustMode parse_robust_mode(const std::string& s);  // "none" | "mean" | "worst"

struct OptimiseOptions {
  ObjectiveOptions objective;
  double max_beta = 4.0;              // |beta| of every measurement in [0, max_beta]
  // Free settings: "beta", "angle", "phase" (every measurement) or "<name>.beta" etc. (one).
  std::vector<std::string> free = {"beta", "angle", "phase"};
  // Allowed input states: "protocol" (the file's state) and/or "cat" (vacuum sent through one
  // symmetric modular measurement of free real |beta_0| in [0.5, max_preparation_beta], the
  // "+" outcome kept: the cat (|-beta_0/2> + |beta_0/2>)/norm, Wigner-negative). With several,
  // each is optimised and the best kept.
  std::vector<std::string> inputs = {"protocol"};
  double max_preparation_beta = 6.0;
  // Search box of directions and phases: the protocol's value +/- span (degrees, in (0, 180]);
  // smaller spans fine-tune a known design.
  double angle_span_deg = 180.0;
  double phase_span_deg = 180.0;
  double min_beta = 0.0;              // lower bound of |beta| (>= 0, < max_beta)
  RobustMode robust = RobustMode::none;
  int robust_nodes = 5;               // quadrature nodes per uncertain parameter
  SearchOptions search{};
  double tolerance_step = 0.05;       // relative change of each setting in the tolerance table
};

struct SettingParameter {
  std::string label;        // "A.beta", "B.angle", "C.phase", "preparation.beta"
  std::string measurement;  // empty for the preparation
  std::string kind;         // "beta", "angle", "phase", "preparation"
  std::string unit;         // "" (|beta|) or "deg"
  double lower = 0.0, upper = 0.0;
  double start = 0.0;       // the protocol's value
  double value = 0.0;       // at the optimum
};

// Magnitudes (|beta|, preparation |beta_0|) change by -/+ step of their value; directions and
// phases by -/+ step of a quarter turn (4.5 deg at 5 %): a relative change of an angle would
// depend on the arbitrary zero of the angle.
struct ToleranceRow {
  std::string label;
  double value = 0.0;
  double step = 0.0;                // the change applied, in the setting's unit
  double minus = 0.0, plus = 0.0;   // objective at value - step and value + step
  double drop = 0.0;                // objective at the optimum - min(minus, plus)
};

struct InputCandidate {
  std::string input;                // "protocol" or "cat"
  double objective = 0.0;
  long evaluations = 0;
};

struct OptimisationResult {
  Protocol protocol;                // the optimised protocol
  nlohmann::json protocol_json;     // the same as a protocol file (ready for predict)
  std::string input;                // which input state won
  std::vector<InputCandidate> candidates;
  std::vector<SettingParameter> parameters;
  ObjectiveKind objective_kind = ObjectiveKind::K;
  RobustMode robust = RobustMode::none;
  double objective = 0.0;           // robust aggregate at the optimum (shots: see figures)
  double start_objective = 0.0;     // the same at the protocol's own settings (NaN if undefined)
  DesignFigures figures;            // at the optimum, noise at its means, classical models on
  SearchResult search;              // of the winning input
  long evaluations = 0;             // objective evaluations over all inputs and the table
  std::vector<ToleranceRow> tolerance;
  std::vector<std::string> notes;   // what the result does and does not establish
};

// `original` is the protocol file's JSON (the output patches it; pass {} to build from scratch
// is not supported: the protocol must come from a file). Throws DomainError for bad options
// (unknown free setting or input, max_beta <= 0, no free parameter and one input).
OptimisationResult optimise_settings(const Protocol& protocol, const nlohmann::json& original,
                                     const OptimiseOptions& options);

// The robust aggregate of the objective for one protocol (exposed for tests and the bench).
double robust_objective(const Protocol& protocol, const OptimiseOptions& options);

}  // namespace macroreal
