// Inverting the readout model of one final-step outcome (not yet wired into analyse).
// With misassignment e1 = P(read bright | dark) and e2 = P(read dark | bright):
//   P_obs(dark) = (1 - e1) P(dark) + e2 (1 - P(dark))
//   =>  P(dark) = (P_obs(dark) - e2) / (1 - e1 - e2),   needs e1 + e2 < 1
// (the standard confusion-matrix inversion; common practice, no source). Linear in P_obs, so
// the corrected estimate is unbiased when e1, e2 are known; it may leave [0, 1] by chance and is
// not clipped (clipping would bias it).
#pragma once

namespace macroreal {

// Throws DomainError unless e1, e2 are in [0, 1) with e1 + e2 < 1.
double corrected_dark_probability(double observed_dark_fraction, double dark_read_bright,
                                  double bright_read_dark);

}  // namespace macroreal
