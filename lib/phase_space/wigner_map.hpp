// The Wigner function of any state on a square grid in phase space, computed from the
// characteristic function by the Fourier relation (Cahill & Glauber, Phys. Rev. 177, 1882
// (1969), eq. 4.12 with s = 0):
//     W(alpha) = (1/pi^2) Integral d^2beta chi(beta) exp(alpha beta* - alpha* beta),
// normalised so that Integral d^2alpha W = 1 (alpha = (x + i p)/sqrt2 in DESIGN.md's units;
// per unit dx dp the density is W/2). For figures of input and prepared states, and to show
// where a state is Wigner-negative.
//
// Why this way: chi is what every state here knows exactly (closed forms, prepared states by
// pull-back), so no Fock truncation is involved. chi decays like a Gaussian, so the
// trapezoidal sum over a uniform beta grid converges exponentially; the exponential factor
// separates into exp(2i Im(alpha) Re(beta)) exp(-2i Re(alpha) Im(beta)), so the whole map is
// two dense matrix products. The beta spacing h is chosen so that the periodic images of W
// (period pi/h in alpha) lie beyond the map and the state's extent.
#pragma once

#include <vector>

#include "phase_space/state.hpp"

namespace macroreal {

struct WignerMap {
  std::vector<double> re_alpha;            // grid of Re(alpha)
  std::vector<double> im_alpha;            // grid of Im(alpha)
  std::vector<std::vector<double>> w;      // w[i][j] = W(re_alpha[i] + i im_alpha[j])
  double min_value = 0.0;                  // most negative value on the grid
  double integral = 0.0;                   // trapezoidal integral of W over the map (~1 if
                                           // the map covers the state)
  double chi_extent = 0.0;                 // |beta| beyond which |chi| < 1e-12 was assumed
  int chi_points = 0;                      // beta grid points per axis
};

// W on points x points covering |Re alpha|, |Im alpha| <= half_width. chi_extent <= 0 chooses
// the extent by scanning |chi| along 16 rays. Throws DomainError for points < 2 or
// half_width <= 0.
WignerMap wigner_map(const State& state, double half_width, int points, double chi_extent = 0.0);

}  // namespace macroreal
