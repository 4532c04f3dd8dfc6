// Builders of ready protocols (issue 6): Leggett-Garg tests with equal or free spacing and any
// number of times, NSIT A -> B on a plain or prepared input, NSIT scans over orientations in
// phase space, and preparation prefixes that make cat-like or grid-like (approximate GKP)
// inputs by post-selected modular measurements. Every builder returns a checked Protocol whose
// state is described by `state_json` (the protocol-file form of DESIGN.md section 8, parsed by
// the reader's own state code), so protocol_writer.hpp can save it and the reader gives the
// same predictions back.
//
// Conventions (DESIGN.md section 2): in the frame rotating at the mode frequency a later
// measurement is a rotated displacement, so an "equally spaced" test has times 0, tau, 2 tau,
// ... and displacement angles theta_0, theta_0 + dtheta, ...; dtheta is the phase-space
// rotation per interval (e.g. a detuning times tau). LG: K_n = sum C_{k,k+1} - C_{1n} <= n - 2
// (Leggett & Garg, PRL 54, 857 (1985)); NSIT: S = P_B(+) - sum_a P_AB(a, +) (Kofler & Brukner,
// PRA 87, 052115 (2013)).
//
// Grid-like prefix (approximate GKP, Gottesman, Kitaev & Preskill, PRA 64, 012310 (2001)): a
// squeezed vacuum S(r) (x squeezed, Var x = e^{-2r}/2) followed by k symmetric modular
// measurements of beta = sqrt(pi) e^{i angle} (a phase-space displacement of sqrt(2 pi)), each
// post-selected on "+". For angle 0 the Kraus operator is K_+ = cos(sqrt(pi/2) p), so
//   psi(p)  ~ cos^k(sqrt(pi/2) p) psi_sq(p)   (a comb of spacing sqrt(2 pi) in p, Gaussian envelope)
//   psi(x)  ~ sum_{m=0..k} C(k, m) psi_sq(x - (m - k/2) sqrt(2 pi))   (binomial comb in x)
//   P_k     = 4^{-k} sum_{j=0..2k} C(2k, j) exp(-(k - j)^2 pi e^{2r} / 2),
// and chi is concentrated near the lattice beta in sqrt(pi)(Z + iZ). This is the repeated
// conditional-displacement construction of Travaglione & Milburn, PRA 66, 052322 (2002)
// (arXiv quant-ph/0205114) in its post-selected form, cf. the phase-estimation preparation of
// Terhal & Weigand, PRA 93, 012315 (2016) (journal references from memory).
//
// Cat-like prefix: one symmetric modular measurement on a coherent or squeezed state,
// post-selected: K_+ |gamma> = (D(-beta/2) + e^{i phi} D(beta/2)) |gamma> / 2, a cat of
// separation |beta| (for gamma = 0 the cat (|beta/2> + e^{-i phi}|-beta/2>)/norm), with success
// probability 1/2 [1 + Re(e^{i phi} chi(beta))] (DESIGN.md section 2).
#pragma once

#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "protocol/protocol.hpp"

namespace macroreal {

// ---- states, as protocol-file JSON ----------------------------------------------------------
nlohmann::json thermal_state_json(double nbar);
nlohmann::json coherent_state_json(cplx alpha);
nlohmann::json squeezed_state_json(double r, double theta_deg, double nbar = 0.0,
                                   cplx alpha = 0.0);
nlohmann::json fock_state_json(int n);
nlohmann::json cat_state_json(double alpha, double relative_phase_deg);

// One modular measurement as set by a builder: displacement modulus and angle (degrees), Ramsey
// phase (degrees), split, contrast and interaction duration.
struct MeasurementSetting {
  double modulus = 1.0;
  double angle_deg = 0.0;
  double phase_deg = 0.0;
  Split split = Split::symmetric;
  double contrast = 1.0;
  double duration_s = 0.0;  // only for measurements of a test, not for preparation steps
};

// A post-selected preparation step: a setting and the outcome kept (+1 or -1).
struct PreparationStep {
  MeasurementSetting setting;
  int outcome = +1;
};

// {"kind": "prepared", "from": from, "steps": [...], "outcomes": "..."}.
nlohmann::json prepared_state_json(const nlohmann::json& from,
                                   const std::vector<PreparationStep>& steps);

// Cat-like prefix: one post-selected symmetric modular measurement of displacement
// `separation` along `angle_deg` with Ramsey phase `phase_deg` on `from` (default vacuum;
// coherent_state_json / squeezed_state_json for displaced or squeezed cats).
struct CatPrefixOptions {
  nlohmann::json from = fock_state_json(0);
  double separation = 4.0;   // |beta| > 0
  double angle_deg = 0.0;
  double phase_deg = 0.0;
  int outcome = +1;
};
nlohmann::json cat_prefix_json(const CatPrefixOptions& options);

// Grid-like prefix (see the header comment): squeezed vacuum of `squeezing_db` (> 0; r =
// dB / 8.686) squeezed along the direction of the comb's peaks, then `rounds` (>= 1)
// post-selected symmetric modular measurements of modulus sqrt(pi) along `angle_deg`.
// Even `rounds` put a peak at the origin; odd ones shift the comb in x by half a spacing.
struct GridPrefixOptions {
  double squeezing_db = 10.0;
  int rounds = 4;
  double angle_deg = 0.0;
  double phase_deg = 0.0;
};
nlohmann::json grid_prefix_json(const GridPrefixOptions& options);
double grid_lattice_beta();  // sqrt(pi): the displacement modulus of one lattice step

// ---- protocols ------------------------------------------------------------------------------
// What every builder shares: the title, the model of the experiment, and whether the
// configurations the tests need are listed in the file (destructive readout: every dark
// pattern of every step set, DESIGN.md section 8) or left to be generated on reading.
struct ProtocolCommon {
  std::string title;
  nlohmann::json state = thermal_state_json(0.0);
  Readout readout = Readout::destructive;
  NoiseModel noise;
  std::vector<UncertainValue> uncertain_noise;  // noise holds the means (set by the builder)
  DetectionSpec detection;
  bool list_configurations = true;
};

// Measurement names used by the builders: "A", "B", ..., "Z", then "M26", "M27", ...
std::string measurement_name(std::size_t index);

// Leggett-Garg test with free settings and times (n = settings.size() >= 3, times
// non-decreasing, >= 0). `nsit_controls` adds NSIT k -> k+1 for every adjacent pair.
struct LgOptions {
  ProtocolCommon common;
  std::vector<MeasurementSetting> settings;
  std::vector<double> times_s;
  bool nsit_controls = false;
};
Protocol build_leggett_garg(const LgOptions& options);

// Equally spaced n-time LG: settings[k] = first with angle first.angle_deg + k * rotation_deg
// (and the same phase, split, contrast), times k * spacing_s.
struct EqualSpacingOptions {
  ProtocolCommon common;
  int times = 3;                 // n >= 3
  MeasurementSetting first;
  double rotation_deg = 60.0;    // phase-space rotation per interval
  double spacing_s = 100e-6;
  bool nsit_controls = false;
};
Protocol build_leggett_garg_equal(const EqualSpacingOptions& options);

// NSIT from A (at time_from_s) to B (at time_to_s >= time_from_s), with an optional
// equivalence margin. The input (plain or prepared) is common.state.
struct NsitOptions {
  ProtocolCommon common;
  MeasurementSetting from, to;
  double time_from_s = 0.0;
  double time_to_s = 50e-6;
  std::optional<double> margin;
};
Protocol build_nsit(const NsitOptions& options);

// NSIT over orientations: the earlier measurement A takes each angle of `from_angles_deg`
// (its other fields from `from`), the later B is fixed. One protocol with measurements
// A0, A1, ... and B and the tests A_i -> B (build_nsit_scan), or a family of protocols, one per
// angle, each with A and B (build_nsit_scan_family; titles get " (A at <angle> deg)").
struct NsitScanOptions {
  ProtocolCommon common;
  MeasurementSetting from, to;
  std::vector<double> from_angles_deg;
  double time_from_s = 0.0;
  double time_to_s = 50e-6;
  std::optional<double> margin;
};
Protocol build_nsit_scan(const NsitScanOptions& options);
std::vector<Protocol> build_nsit_scan_family(const NsitScanOptions& options);

// The configurations (sequences) the tests of `protocol` need and that it does not list, named
// as the reader names generated sequences (generated_sequence_name), marked not generated.
std::vector<SequenceSpec> needed_configurations(const Protocol& protocol);

// Completes a Protocol assembled by hand: parses `state_json` into `state` (throws DomainError
// with the reader's message for a bad state), copies `uncertain_noise` means into `noise`,
// validates measurements, times and tests, and lists the needed configurations if asked.
void finish_protocol(Protocol& protocol, bool list_configurations);

}  // namespace macroreal
