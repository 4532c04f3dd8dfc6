// The analysis of a finished campaign (`macroreal analyse`): orchestration of the statistics
// core over one protocol and its outcome counts, with no statistics of its own except the
// drift check of drift_check.hpp. For every named quantity of CampaignEstimator (estimator.hpp)
// the pooled-MLE estimate, its delta-method SE and the stratified bootstrap intervals
// (bootstrap.hpp; default: smoothed BCa, as documented there), plus the binomial intervals
// (proportion_intervals.hpp) where a quantity is one proportion; for every LG test the
// z, Hoeffding, empirical-Bernstein and parametric-bootstrap p-values
// (leggett_garg_tests.hpp); for every NSIT test the score, Barnard exact and TOST p-values
// (nsit_tests.hpp); Holm and BH adjustments and the max-statistic calibration
// (multiplicity.hpp); the NSIT bound on invasiveness (invasiveness.hpp); and, when the
// protocol carries a model, the predicted K next to the kicked classical K
// (protocol/prediction.hpp) with a one-sided z test of the measured K against the latter.
// The cautions of DESIGN.md section 7 are part of the result, as sentences.
//
// Deterministic: every random part draws from a seed derived from AnalysisOptions::seed
// (random_variates.hpp derive_seed), so the same input and seed give the same result.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "protocol/protocol.hpp"
#include "stats/campaign_counts.hpp"
#include "stats/drift_check.hpp"
#include "stats/estimator.hpp"
#include "stats/invasiveness.hpp"
#include "stats/leggett_garg_tests.hpp"
#include "stats/multiplicity.hpp"
#include "stats/readout_corrected_result.hpp"

namespace macroreal {

inline constexpr std::uint64_t kDefaultAnalysisSeed = 20261202;

struct AnalysisOptions {
  double level = 0.95;              // two-sided confidence level of intervals; tests use
                                    // alpha = 1 - level for their verdicts
  std::uint64_t seed = kDefaultAnalysisSeed;
  long replicates = 10000;          // B of the bootstrap intervals and of every resampling test
  std::optional<double> margin;     // NSIT TOST margin for tests without their own "margin"
  bool model = true;                // compare with the protocol's model when it has a state
  int threads = 0;                  // 0: OpenMP default; results do not depend on it
  std::optional<DriftCheck> drift;  // drift check of the table (drift_check.hpp), if any
  bool keep_replicates = false;     // keep the bootstrap replicates of every K and S (figures)
  void validate() const;            // DomainError naming the option
};

// One interval of one estimate.
struct IntervalEstimate {
  std::string method;   // "bca", "percentile", "basic", "studentized", "wilson", ...
  double lo = 0.0, hi = 0.0;
  bool valid = false;
  std::string note;     // what it is an interval of, or why it is missing
};

struct QuantityEstimate {
  std::string name;                  // e.g. "K[ABC]"
  QuantityKind kind = QuantityKind::joint_probability;
  double estimate = 0.0;             // pooled MLE (NaN where undefined)
  double std_error = 0.0;            // delta method
  double level = 0.95;
  IntervalEstimate ci;               // the default interval
  std::vector<IntervalEstimate> intervals;  // every interval computed, default first
  std::string status = "ok";         // estimator / bootstrap status
  std::string note;
  // Only with AnalysisOptions::keep_replicates, for K (lg_k) and S (nsit_s): the B bootstrap
  // replicates in replicate order, recentred as in bootstrap.hpp (so the default interval is
  // computed from exactly these values); NaN entries are replicates that were not finite.
  std::vector<double> bootstrap_replicates;
};

struct ModelComparison {             // only when the protocol has a state
  double K_model = 0.0;              // the model's quantum prediction
  std::optional<double> K_classical, K_classical_kicked;
  std::string classical_unavailable;
  std::optional<TestResult> versus_kicked;  // one-sided z, H0: K <= K_classical_kicked
  std::string verdict;
};

struct LeggettGargAnalysis {
  std::string label;                 // "LG ABC"
  std::string quantity;              // "K[ABC]"
  std::vector<std::string> order;
  double bound = 1.0;
  double K = 0.0, std_error = 0.0;   // pooled MLE and delta-method SE
  double K_linear = 0.0;             // the non-pooled estimate used by the finite-sample and
                                     // bootstrap tests (linear_functional.hpp)
  std::vector<TestResult> tests;     // z-asymptotic, hoeffding, empirical-bernstein,
                                     // parametric-bootstrap (a failed one has a note, p NaN)
  std::string primary_method = "parametric-bootstrap";  // enters the multiplicity adjustment
  std::optional<InvasivenessBound> invasiveness;
  std::string invasiveness_unavailable;
  std::optional<ModelComparison> model;
  std::string verdict;
};

struct NsitAnalysis {
  std::string label;                 // "NSIT A->B"
  std::string quantity;              // "S[A->B]"
  std::string from, to;
  double S = 0.0, std_error = 0.0;
  std::vector<TestResult> tests;     // score, barnard-exact (or a note), tost (with a margin)
  std::optional<double> margin;
  std::string margin_source;         // "protocol" or "--margin"
  std::optional<double> S_model;
  std::string primary_method = "score";
  std::string verdict;
};

struct MultiplicityEntry {
  std::string label;                 // test label
  std::string method;                // the p-value that enters
  double p_value = 1.0;
  double holm = 1.0;
  double benjamini_hochberg = 1.0;
};

struct MultiplicityAnalysis {
  std::vector<MultiplicityEntry> entries;
  std::string which;                 // which p-values enter, in words
  std::optional<MaxStatisticResult> max_statistic;  // with two or more LG tests
  std::vector<std::string> max_statistic_labels;
  std::string max_statistic_note;
};

struct SequenceShots {
  std::string name;
  double shots = 0.0;
  bool listed = true;                // false: generated name (not in the file)
};

struct AnalysisResult {
  std::string protocol_file, title, runs_file;
  Readout readout = Readout::destructive;
  double level = 0.95;
  std::uint64_t seed = 0;
  long replicates = 0;
  std::string default_interval;      // e.g. "bca (smoothed, pseudo count 0.5)"
  RowSummary rows;
  std::vector<SequenceShots> sequences;   // sequences with shots
  std::vector<std::string> unobserved;    // listed sequences without any shot
  std::vector<QuantityEstimate> estimates;
  std::vector<LeggettGargAnalysis> leggett_garg;
  std::vector<NsitAnalysis> nsit;
  MultiplicityAnalysis multiplicity;
  DriftCheck drift;
  std::string detection_model;
  // Where the photon-count threshold came from ("" when the runs had no photon counts).
  std::string threshold_note;
  // With `--correct-readout` (detection/readout_corrected_analysis.hpp): the corrected
  // estimates next to the raw ones above, which stay the recorded-results analysis.
  std::optional<ReadoutCorrectedAnalysis> readout_corrected;
  std::vector<std::string> cautions;
  std::vector<std::string> not_established;
};

// Throws DomainError for invalid options or a campaign with no shots at all.
AnalysisResult analyse_campaign(const Protocol& protocol, const CampaignCounts& counts,
                                const AnalysisOptions& options = {});

}  // namespace macroreal
