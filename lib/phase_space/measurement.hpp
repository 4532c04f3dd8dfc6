// The modular measurement M(beta, phi, split, contrast): a probe Ramsey sequence with a
// spin-dependent displacement of the oscillator, outcomes o = +1 / -1 (DESIGN.md section 2).
//   symmetric:  K_o = 1/2 [ D(-beta/2) + o e^{i phi} D(beta/2) ]
//   one-sided:  K_o = 1/2 [ 1 + o e^{i phi} D(beta) ]  =  D(beta/2) K_o^symmetric
// Both give P(o) = 1/2 [1 + o Re(e^{i phi} chi(beta))] for a single measurement. Contrast c
// mixes the outcome: c K_o rho K_o^dag + (1 - c)/2 sum_o' K_o' rho K_o'^dag.
#pragma once

#include <string>

#include "core/types.hpp"
#include "phase_space/weyl_sum.hpp"

namespace macroreal {

enum class Split { symmetric, one_sided };
std::string to_string(Split s);
Split parse_split(const std::string& s);  // "symmetric" | "one-sided"; throws DomainError

struct ModularMeasurement {
  cplx beta = 0.0;
  double phase_rad = 0.0;
  Split split = Split::symmetric;
  double contrast = 1.0;  // in [0, 1]

  void validate() const;  // throws DomainError naming the field
};

// Kraus operator K_o as a Weyl sum.
WeylSum kraus(const ModularMeasurement& m, int outcome);

// Heisenberg-picture effect maps on an operator X (sums over Kraus terms, contrast included):
//   outcome o:  X -> c K_o^dag X K_o + (1-c)/2 sum_o' K_o'^dag X K_o'
//   signed:     X -> sum_o o K_o^dag X K_o        (the contrast-mixed part cancels: factor c)
//   unsigned:   X -> sum_o K_o^dag X K_o          (the non-selective measurement)
// `classical` drops composition phases (see weyl_sum.hpp) for the classical models.
WeylSum heisenberg_outcome(const ModularMeasurement& m, int outcome, const WeylSum& x,
                           bool classical = false);
WeylSum heisenberg_signed(const ModularMeasurement& m, const WeylSum& x, bool classical = false);
WeylSum heisenberg_unselective(const ModularMeasurement& m, const WeylSum& x,
                               bool classical = false);

}  // namespace macroreal
