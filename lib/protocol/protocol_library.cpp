#include "protocol/protocol_library.hpp"

#include "protocol/protocol_builders.hpp"

namespace macroreal {

namespace {

// The invented lab model shared by the files: heating 20 quanta/s and 0.1 % readout errors
// each way (the values of the hand-written demo files).
ProtocolCommon invented_lab(const std::string& title, const nlohmann::json& state) {
  ProtocolCommon c;
  c.title = title;
  c.state = state;
  c.noise.heating_quanta_per_s = 20.0;
  c.detection.dark_read_bright = 1e-3;
  c.detection.bright_read_dark = 1e-3;
  return c;
}

// The cat (|2> + |-2>)/norm from the ground state (separation 4, outcome +).
nlohmann::json ground_state_cat() {
  CatPrefixOptions cat;
  cat.separation = 4.0;
  return cat_prefix_json(cat);
}

MeasurementSetting symmetric(double modulus, double angle_deg, double phase_deg) {
  MeasurementSetting s;
  s.modulus = modulus;
  s.angle_deg = angle_deg;
  s.phase_deg = phase_deg;
  return s;
}

}  // namespace

std::vector<LibraryEntry> protocol_library() {
  std::vector<LibraryEntry> lib;

  {  // Equally spaced three-time LG on the prepared cat; settings from a coarse grid scan.
    EqualSpacingOptions o;
    o.common = invented_lab(
        "three-time LG, equal spacing, on a cat prepared by a post-selected modular "
        "measurement (invented settings)",
        ground_state_cat());
    o.times = 3;
    o.first = symmetric(2.0, 165.0, 90.0);
    o.rotation_deg = -165.0;
    o.spacing_s = 50e-6;
    o.nsit_controls = true;
    lib.push_back({"lg3_equal_spacing_cat.json",
                   "three-time LG with equal time and rotation steps on a Wigner-negative input",
                   build_leggett_garg_equal(o)});
  }
  {  // Free spacing: the directions and phases of lg3_prepared_cat_conclusive.json with
     // unequal intervals (30 us, then 70 us).
    LgOptions o;
    o.common = invented_lab(
        "three-time LG, free spacing, on a cat prepared by a post-selected modular "
        "measurement (invented settings)",
        ground_state_cat());
    o.settings = {symmetric(2.0, 0.0, 270.0), symmetric(2.0, -15.0, 90.0),
                  symmetric(2.0, -165.0, 90.0)};
    o.times_s = {0.0, 30e-6, 100e-6};
    o.nsit_controls = true;
    lib.push_back({"lg3_free_spacing_cat.json",
                   "three-time LG with free times and directions on a Wigner-negative input",
                   build_leggett_garg(o)});
  }
  {  // Four-time LG, equal spacing, same step as the three-time file.
    EqualSpacingOptions o;
    o.common = invented_lab(
        "four-time LG, equal spacing, on a prepared cat (invented settings)", ground_state_cat());
    o.times = 4;
    o.first = symmetric(2.0, 165.0, 90.0);
    o.rotation_deg = -165.0;
    o.spacing_s = 50e-6;
    lib.push_back({"lgN_equal_spacing_cat.json",
                   "n-time LG (n = 4, bound n - 2 = 2) with every configuration listed",
                   build_leggett_garg_equal(o)});
  }
  {  // NSIT on a plain Gaussian input; settings from a coarse grid scan of |S|.
    NsitOptions o;
    o.common = invented_lab("NSIT A -> B on a thermal mode, plain input (invented settings)",
                            thermal_state_json(0.3));
    o.from = symmetric(1.5, 90.0, 90.0);
    o.to = symmetric(2.0, 0.0, 0.0);
    o.margin = 0.01;
    lib.push_back({"nsit_plain_thermal.json",
                   "NSIT A -> B on a Gaussian input: S measures the invasiveness of A directly",
                   build_nsit(o)});
  }
  {  // NSIT scan over the orientation of A on the prepared cat.
    NsitScanOptions o;
    o.common = invented_lab(
        "NSIT scan over the direction of A on a prepared cat (invented settings)",
        ground_state_cat());
    o.from = symmetric(3.0, 0.0, 0.0);
    o.to = symmetric(4.0, 0.0, 0.0);
    o.from_angles_deg = {0.0, 30.0, 60.0, 90.0, 120.0, 150.0};
    o.margin = 0.01;
    lib.push_back({"nsit_orientation_scan_cat.json",
                   "NSIT A_i -> B with A rotated in phase space, one protocol with six tests",
                   build_nsit_scan(o)});
  }
  {  // Cat-like prefix on a squeezed vacuum (squeezed along p), then an equally spaced LG.
    CatPrefixOptions cat;
    cat.separation = 4.0;
    cat.from = squeezed_state_json(0.3, 180.0);
    EqualSpacingOptions o;
    o.common = invented_lab(
        "three-time LG on a squeezed cat: cat-like preparation prefix on a squeezed vacuum "
        "(invented settings)",
        cat_prefix_json(cat));
    o.times = 3;
    o.first = symmetric(2.0, 15.0, 90.0);
    o.rotation_deg = 165.0;
    o.spacing_s = 50e-6;
    lib.push_back({"cat_prefix_squeezed_lg3.json",
                   "the cat-like preparation prefix on a squeezed input, with an LG test",
                   build_leggett_garg_equal(o)});
  }
  {  // Approximate GKP (grid) prefix: 10 dB squeezed vacuum, four post-selected modular
     // measurements of sqrt(pi); NSIT from a measurement at 45 deg to one along the lattice
     // of the conjugate quadrature (settings from a coarse grid scan of |S|).
    GridPrefixOptions grid;
    grid.squeezing_db = 10.0;
    grid.rounds = 4;
    NsitOptions o;
    o.common = invented_lab(
        "NSIT A -> B on an approximate GKP grid state prepared by four post-selected modular "
        "measurements (invented settings)",
        grid_prefix_json(grid));
    o.from = symmetric(2.5, 45.0, 0.0);
    o.to = symmetric(grid_lattice_beta(), 90.0, 0.0);
    o.margin = 0.01;
    lib.push_back({"gkp_prefix_nsit.json",
                   "the grid-like (approximate GKP) preparation prefix, with an NSIT test",
                   build_nsit(o)});
  }
  return lib;
}

}  // namespace macroreal
