// Density matrices of oscillator states in the truncated Fock basis |0>..|N-1>: the exact
// top-left N x N block of the state's (infinite) density matrix.
//
// Two independent routes:
// 1. From the characteristic function of ANY State (tabulate_from_characteristic): the
//    inversion rho = (1/pi) int d^2b chi(b) D(-b) (Cahill & Glauber, Phys. Rev. 177, 1857
//    (1969), eq. (4.20)) split into angular Fourier modes q and the radial variable x = |b|^2.
//    With chi_q(x) = (1/2pi) int chi(sqrt(x) e^{i t}) e^{-i q t} dt and the normalised
//    Laguerre functions f_n^{(k)}(x) of displacement_matrix.hpp, which are orthonormal on
//    [0, inf) (Abramowitz & Stegun 22.2.12):
//        rho_{m, m+k} = int_0^inf chi_k(x) f_m^{(k)}(x) dx,
//        rho_{n+k, n} = (-1)^k int_0^inf chi_{-k}(x) f_n^{(k)}(x) dx,     k >= 0.
//    For a state supported on the first S levels chi_k f_m is e^{-x} x^k times a polynomial
//    of degree <= S + m, so R-node Gauss-Laguerre quadrature (A&S 25.4.45) is exact when
//    2R - 1 >= S + N; the angular average over L equally spaced angles is exact when no
//    component with |q| >= L - N is present. Beyond that the error is of the order of the
//    state's population above the levels covered.
// 2. Directly from known Fock amplitudes (thermal geometric, coherent/cat/superposition
//    from <n|alpha>, squeezed via the column recurrence S|n+1> = (cosh r a^dag +
//    e^{-i theta} sinh r a) S|n> / sqrt(n+1) started from the squeezed vacuum
//    (Gerry & Knight, Introductory Quantum Optics (2005), eq. (7.64)), displaced by the
//    exact D matrix). These are used by tests as an independent check of route 1 and for the
//    agreement sweeps.
#pragma once

#include <vector>

#include <Eigen/Dense>

#include "phase_space/measurement.hpp"
#include "phase_space/state.hpp"

namespace macroreal {

struct TabulationOptions {
  // Levels assumed to carry the state (S above); 0 = cutoff + 40. The quadrature is exact
  // for states supported on S levels.
  int support = 0;
};

// The N x N block of rho from chi (route 1). N >= 1.
Eigen::MatrixXcd tabulate_from_characteristic(const State& state, int cutoff,
                                              const TabulationOptions& options = {});

// Route 1 for closed-form states; a DensityMatrixState is copied (zero-padded or cut).
Eigen::MatrixXcd tabulate(const State& state, int cutoff, const TabulationOptions& options = {});

// Route 2: known amplitudes (each N x N, the exact block).
Eigen::MatrixXcd thermal_density(double nbar, int cutoff);
Eigen::MatrixXcd fock_density(int n, int cutoff);
Eigen::VectorXcd coherent_amplitudes(cplx alpha, int cutoff);  // <m|alpha>
Eigen::MatrixXcd pure_density(const Eigen::VectorXcd& amplitudes);  // |psi><psi|
Eigen::MatrixXcd coherent_density(cplx alpha, int cutoff);
// (|alpha> + e^{i phase}|-alpha>)/norm with the exact norm 2 + 2 cos(phase) e^{-2|alpha|^2}.
Eigen::MatrixXcd cat_density(cplx alpha, double relative_phase_rad, int cutoff);
// D(alpha) S(xi) rho_thermal(nbar) S(xi)^dag D(alpha)^dag, xi = r e^{i theta}. Works on a
// larger internal dimension, grown until the discarded population is below 1e-15.
Eigen::MatrixXcd squeezed_density(double r, double theta_rad, double nbar, cplx alpha, int cutoff);

// The unnormalised post-measurement state of outcome o (DESIGN.md section 2, contrast
// included): T0 + c o T1, T0 = (A rho A^dag + B rho B^dag)/4, T1 = (e^{i phi} B rho A^dag +
// h.c.)/4 with (A, B) = (D(-beta/2), D(beta/2)) or (1, D(beta)). Exact on the block when rho
// has no weight near the cutoff.
Eigen::MatrixXcd apply_outcome(const ModularMeasurement& m, int outcome, const Eigen::MatrixXcd& rho);

// Population of the levels >= cutoff - edge (edge >= 1), i.e. near the truncation edge.
double edge_population(const Eigen::MatrixXcd& rho, int edge);

}  // namespace macroreal
