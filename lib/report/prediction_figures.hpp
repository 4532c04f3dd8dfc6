// Figures of `macroreal predict` and `macroreal optimise` as data (figure.hpp):
//   - K (or S) of one test of a protocol against |beta|: every displacement of the test's
//     measurements is scaled by one common factor (directions, phases, splits, times and the
//     input state unchanged), so the protocol's own setting lies on the curve at factor 1;
//     with the model curve, the classical model that matches the split (where it exists), the
//     classical bound of the library's prediction (LG: n - 2; NSIT: S = 0) as a line, the
//     curve's optimum and the protocol's setting marked;
//   - S of an NSIT test against the direction of its first measurement (0..360 deg), with
//     every test of the protocol that differs from it only in that direction marked (the
//     orientation scans of protocols/);
//   - the Wigner function of the input state, and of the states a "prepared" input was made
//     from, on a symmetric diverging colour scale around 0 (negative regions in blue).
// Every value on a curve comes from predict() (protocol/prediction.hpp) on a copy of the
// protocol reduced to that test, with the command's engine options, so the curve at the
// protocol's setting is the number the report prints.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "protocol/prediction.hpp"
#include "protocol/protocol.hpp"
#include "report/command_figures.hpp"

namespace macroreal {

struct SettingScanOptions {
  int points = 121;          // grid points of the curve (>= 3); the setting is added to them
  double beta_max = 0.0;     // largest |beta| on the axis; 0: max(2 x the setting's, 1)
  PredictOptions predict{};  // engine and tolerances, as the command uses them
};

struct ScanMark {
  std::string label;         // e.g. "protocol setting" or the test label
  double x = 0.0, value = 0.0;
};

struct SettingScan {
  std::string test_label;    // "LG ABC", "NSIT A->B"
  std::string quantity;      // "K_3", "K_4", "S"
  bool leggett_garg = true;
  std::string x_label;       // with units (PLplot text escapes, "#gb" is beta)
  std::vector<double> x, value;
  std::vector<double> classical;  // the classical model matching the split; empty: none
  std::string classical_label;    // which model, or why there is none
  double bound = 0.0;        // LG: the prediction's bound n - 2; NSIT: 0
  std::vector<ScanMark> settings;   // the protocol's own setting(s) on this curve
  double optimum_x = 0.0, optimum_value = 0.0;  // LG: largest K; NSIT: largest |S|
};

// Throws DomainError for a test index out of range, points < 3, a test whose measurements
// all have beta = 0 (nothing to scale) or a negative beta_max.
SettingScan scan_test_over_beta(const Protocol& protocol, std::size_t test_index,
                                const SettingScanOptions& options = {});

// The direction of the test's "from" measurement over [0, 360] deg, on a grid of three times
// the intervals of options.points (3 (points - 1) + 1 directions) plus the setting. Throws
// DomainError for an LG test or an index out of range.
SettingScan scan_nsit_over_direction(const Protocol& protocol, std::size_t test_index,
                                     const SettingScanOptions& options = {});

Figure setting_scan_figure(const SettingScan& scan, const std::string& title);

struct WignerFigureOptions {
  double half_width = 0.0;   // |Re alpha|, |Im alpha| <= half_width; 0: fitted to the state
  int points = 81;           // grid points per axis when half_width is given
  // Fitted to the state: one map on a grid of this spacing that surely covers it, cropped
  // (symmetrically about 0) to where |W| exceeds 1e-3 of its largest value, plus 1.
  double spacing = 0.1;
};

// Title says what is shown and the most negative value on the grid.
Figure wigner_figure(const State& state, const std::string& what,
                     const WignerFigureOptions& options = {});

struct PredictionFigureOptions {
  SettingScanOptions scan{};
  WignerFigureOptions wigner{};
};

// Every figure of `predict` for the protocol (which must have a state):
//   K_vs_beta_<test> / S_vs_beta_<test> for every test, S_vs_direction_<test> for every
//   group of NSIT tests that differ only in the direction of "from", wigner_input, and for a
//   prepared input wigner_before_preparation (then _2, _3 for nested preparations).
std::vector<NamedFigure> prediction_figures(const Protocol& protocol,
                                            const PredictionFigureOptions& options = {});

// The Wigner figures alone (wigner_input and the states a prepared input was made from).
std::vector<NamedFigure> wigner_figures(const Protocol& protocol,
                                        const WignerFigureOptions& options = {});

}  // namespace macroreal
