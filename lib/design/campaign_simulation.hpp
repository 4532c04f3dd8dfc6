// Simulated campaigns: per-shot outcome tables (DESIGN.md section 8) drawn from a protocol's
// model, for demo data and for checking designs by simulation before lab time is spent.
//
// Model. The ideal +/-1 outcome probabilities of every sequence come from model_cells.hpp
// (the engines of DESIGN.md section 2). A step's true result is dark when its sign is the
// sequence's dark_is sign. Detection errors act on each step's true result:
//   dark read bright with probability e_db, bright read dark with e_bd (or, with a photon-count
//   model, a Poisson count with the dark or bright mean, read dark when count <= threshold).
// Destructive readout: the shot goes on only while the detector reads dark.
//   - A true dark misread as bright ends the shot (recorded as bright).
//   - A true bright misread as dark goes on with a ruined oscillator state (the probe
//     scattered photons). ASSUMPTION: every later true result of that shot is a fair coin
//     flip (dark or bright with probability 1/2 each), still subject to detection errors.
//   - While the state is intact, the true result of step k is dark with the conditional
//     probability P(d_1..d_k) / P(d_1..d_{k-1}), from the prefix probabilities of the model's
//     outcome strings (d = the dark signs).
// Non-destructive readout: every step is recorded; the true outcome string is drawn from the
// 2^n model probabilities and each step's reading is flipped independently.
// Without photon counts, each (sequence, recorded result string) has a closed-form
// probability (a two-state forward recursion: intact / ruined), so one uniform draw per shot
// picks the row from a cumulative table.
//
// Schedule. Sequences are interleaved evenly over the campaign: the k-th of the n_s shots of
// sequence s sits at campaign fraction (k + 1/2) / n_s and rows are merged in that order
// (ties: protocol order), so a slow drift touches every sequence alike. A shot of a sequence
// with m steps lasts cycle_time_s + m * step_time_s (rounded to whole nanoseconds); time_s of
// a row is the start of its shot, the first at 0.
//
// Drift. A linear drift of one noise parameter from `start` (time 0) to `end` (end of the
// campaign) is approximated piecewise constant: the campaign's time span is cut into
// `drift_blocks` equal blocks and the model is re-evaluated at each block's midpoint value;
// within a block the parameter differs from the linear one by at most |end - start| /
// (2 blocks).
//
// Random streams. Row r (in campaign order) uses the engine seeded with derive_seed(seed,
// r / kRowsPerStream), fresh at each stream boundary, so the table is a function of the seed
// alone (any split of the work over threads reproduces it).
#pragma once

#include <array>
#include <cstdint>
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "design/model_cells.hpp"
#include "protocol/prediction.hpp"
#include "protocol/protocol.hpp"

namespace macroreal {

inline constexpr std::uint64_t kRowsPerStream = 65536;
inline constexpr int kMaxSimulatedSteps = 16;

struct ReadoutErrorRates {
  double dark_read_bright = 0.0;  // P(read bright | true dark), in [0, 1]
  double bright_read_dark = 0.0;  // P(read dark | true bright), in [0, 1]
};

// Photon counts per detection window: Poisson with mean dark_rate (true dark) or
// bright_rate (true bright); a count <= threshold reads dark (DESIGN.md section 8).
struct PhotonCountModel {
  double dark_rate = 0.0;
  double bright_rate = 0.0;
  double threshold = 0.0;
};

// Linear drift of one NoiseModel field (its protocol JSON name, e.g. "heating_quanta_per_s").
struct NoiseDrift {
  std::string field;
  double start = 0.0, end = 0.0;
};

struct SimulationOptions {
  std::uint64_t seed = 0;
  // Shots per sequence for every sequence of the protocol (listed and generated) ...
  long shots_per_sequence = 0;
  // ... unless named here (replaces shots_per_sequence for the named ones; with
  // `allocation_only` the unnamed ones get none).
  std::map<std::string, long> allocation;
  bool allocation_only = false;
  ReadoutErrorRates errors;                 // ignored when `counts` is set
  std::optional<PhotonCountModel> counts;   // record photon counts instead of dark/bright
  double cycle_time_s = 1e-3;               // > 0
  double step_time_s = 0.0;                 // >= 0, per step of the sequence
  std::optional<NoiseDrift> drift;
  int drift_blocks = 20;                    // >= 1, used only with a drift
  PredictOptions predict;                   // engine settings for model_cells
};

// One recorded result string without photon counts: `length` results, bit k of
// `bright_mask` set when step k+1 reads bright.
struct ReadPattern {
  int length = 0;
  std::uint32_t bright_mask = 0;
};

// Tables of one sequence in one drift block.
struct SequenceTables {
  // Without counts: cumulative[j] = P(pattern 0..j); a draw u in (0, 1) takes the first j
  // with u < cumulative[j] (entries from the last possible pattern on are 2, so round-off
  // never picks an impossible pattern).
  std::vector<double> pattern_probability;
  std::vector<double> cumulative;
  // With counts. Destructive: P(true dark at step k | intact, dark so far), k = 0..n-1.
  std::vector<double> dark_given_intact;
  // Non-destructive: cumulative over the 2^n true strings (bit k set: step k+1 true bright).
  std::vector<double> true_cumulative;
};

struct SimulatedSequence {
  std::string name;
  int steps = 0;
  std::vector<int> dark_is;
  long shots = 0;
  std::uint64_t duration_ns = 0;        // one shot
  std::vector<ReadPattern> patterns;    // possible recorded strings (same in every block)
};

struct DriftBlock {
  std::uint64_t end_ns = 0;             // rows starting before this time (and after the
                                        // previous block's end) belong to the block
  double value = 0.0;                   // the drifting parameter in this block
  std::vector<SequenceTables> tables;   // parallel to SimulationPlan::sequences
};

struct SimulationPlan {
  Readout readout = Readout::destructive;
  std::uint64_t seed = 0;
  ReadoutErrorRates errors;             // the rates in force (from counts: the Poisson tails)
  std::optional<PhotonCountModel> counts;
  std::optional<NoiseDrift> drift;
  double cycle_time_s = 0.0, step_time_s = 0.0;
  std::vector<SimulatedSequence> sequences;  // every sequence of the protocol (some may have 0 shots)
  std::vector<DriftBlock> blocks;            // one without drift
  ModelCells model;                          // the cells at the nominal (undrifted) noise
  std::uint64_t total_shots = 0;
  std::uint64_t total_ns = 0;                // campaign duration
  int max_steps = 0;                         // over sequences with shots (columns r1..)
  std::string engine;                        // the engine that computed the probabilities
};

// Checks the options (DomainError naming the option and the rule: negative shots, an
// unknown sequence in the allocation, rates outside [0, 1], cycle time <= 0, an unknown
// drift field, too many steps) and evaluates the model (once, or once per drift block).
SimulationPlan plan_simulation(const Protocol& protocol, const SimulationOptions& options);

// Probability of each recorded result string of one sequence (the closed-form tables above),
// from the model's cells of that sequence (layout of campaign_counts.hpp).
std::vector<double> recorded_pattern_probabilities(const SequenceCounts& layout,
                                                   const std::vector<double>& cell_probability,
                                                   Readout readout,
                                                   const ReadoutErrorRates& errors,
                                                   std::vector<ReadPattern>* patterns = nullptr);

// One simulated row, as handed to a sink.
struct SimulatedShot {
  std::size_t sequence = 0;     // index into SimulationPlan::sequences
  std::uint64_t shot = 0;       // index within the sequence
  std::uint64_t time_ns = 0;    // start of the shot
  int pattern = -1;             // index into the sequence's patterns (no counts)
  int length = 0;               // results recorded
  std::array<std::uint32_t, kMaxSimulatedSteps> counts{};  // photon counts (counts mode)
};

// Receives the rows in campaign order; the CSV writer (simulated_table_writer.hpp) is one.
class ShotSink {
 public:
  virtual ~ShotSink() = default;
  virtual void shot(const SimulatedShot& s) = 0;
  virtual void finish() {}
};

struct SimulationSummary {
  std::uint64_t rows = 0;
  std::vector<std::uint64_t> rows_per_sequence;
};

// Draws every row of the plan into `sink` (then calls sink.finish()). Memory does not grow
// with the number of rows.
SimulationSummary simulate_campaign(const SimulationPlan& plan, ShotSink& sink);

// The assumptions a simulated table rests on, one sentence each (written as # comments).
std::vector<std::string> simulation_assumptions(const SimulationPlan& plan);

}  // namespace macroreal
