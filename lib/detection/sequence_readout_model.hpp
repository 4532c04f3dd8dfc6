// The readout model of a whole measurement sequence: the linear map from the probabilities of
// the true outcome cells of one run sequence to the probabilities of its recorded cells, when
// every detector result is misassigned with e1 = P(read bright | true dark) and
// e2 = P(read dark | true bright), independently between steps and shots and the same at
// every step (stationary detection). Its inverse turns recorded cell counts into
// misassignment-corrected ones. The derivation is in docs/readout_correction.md.
//
// Destructive readout (a shot goes on only while the detector reads dark). Let b be the step
// (0-based) of the first true bright result of a true cell (b = n: all n true results dark)
// and k the step of the first recorded bright (k = n: all read dark). Then
//   k < b           (1 - e1)^k e1                      a true dark misread as bright ends the shot
//   k = b < n       (1 - e1)^b (1 - e2)
//   b < k < n       (1 - e1)^b e2 d^(k-b-1) (1 - d)     a true bright misread as dark goes on
//   k = n, b = n    (1 - e1)^n
//   k = n, b < n    (1 - e1)^b e2 d^(n-1-b)
// with d = r (1 - e1) + (1 - r) e2 the chance that a step after a misread bright reads dark.
// ASSUMPTION (MisreadContinuation): after a true bright is misread as dark the oscillator state
// is ruined (the probe scattered photons) and every later true result of that shot is dark with
// probability r, independently; r = 1/2 ("fair": fair coin flips) is the default and is what
// `macroreal simulate` assumes (design/campaign_simulation.hpp), so simulated campaigns and
// this correction agree.
// Non-destructive readout: every step is recorded and a misread changes nothing, so the map is
// the Kronecker product of one 2 x 2 confusion matrix per step.
// Confusion-matrix inversion itself is common practice, no source; the destructive-readout
// continuation model is our own.
#pragma once

#include <string>
#include <vector>

#include <Eigen/Dense>

#include "protocol/protocol.hpp"
#include "stats/bootstrap.hpp"
#include "stats/campaign_counts.hpp"

namespace macroreal {

struct MisassignmentRates {
  double dark_read_bright = 0.0;  // e1 = P(read bright | true dark)
  double bright_read_dark = 0.0;  // e2 = P(read dark | true bright)
};

// Throws DomainError unless e1, e2 are in [0, 1) and e1 + e2 < 1 (otherwise a recorded
// result carries no information about the true one and the map is singular).
void validate_rates(const MisassignmentRates& rates);

// What a shot does after a true bright result was misread as dark (destructive readout).
struct MisreadContinuation {
  double dark_probability = 0.5;  // r: P(later true result dark | ruined state), in [0, 1]
};
// "fair" or "dark=P" (P in [0, 1]); throws DomainError naming the text otherwise.
MisreadContinuation parse_misread_continuation(const std::string& text);
std::string to_string(const MisreadContinuation& c);  // "fair" or "dark=P"

// M with M(i, j) = P(recorded cell i | true cell j), in the cell order of `sequence`
// (campaign_counts.hpp). Columns sum to 1. Throws DomainError for invalid rates or a
// destructive sequence whose dark_is does not cover every step.
Eigen::MatrixXd readout_map(const SequenceCounts& sequence, Readout readout,
                            const MisassignmentRates& rates, const MisreadContinuation& continuation = {});

// Probabilities (or counts) of the recorded cells from those of the true cells: M p.
std::vector<double> recorded_from_true(const SequenceCounts& sequence, Readout readout,
                                       const std::vector<double>& true_cells,
                                       const MisassignmentRates& rates,
                                       const MisreadContinuation& continuation = {});
// The inverse: M^-1 q (an LU solve). Totals are kept (columns of M sum to 1). Entries may be
// negative by chance and are not clipped (clipping would bias the estimates).
std::vector<double> true_from_recorded(const SequenceCounts& sequence, Readout readout,
                                       const std::vector<double>& recorded,
                                       const MisassignmentRates& rates,
                                       const MisreadContinuation& continuation = {});

// Every sequence of a campaign corrected: counts[s] -> M_s^-1 counts[s] (layout gives the
// sequences' cells, in the same order as `counts`).
CellCounts corrected_counts(const CampaignCounts& layout, const CellCounts& counts,
                            const MisassignmentRates& rates,
                            const MisreadContinuation& continuation = {});

}  // namespace macroreal
