// Operators written as finite sums of displacements, O = sum_k c_k D(gamma_k).
//
// This is the algebra the Weyl engine works in (DESIGN.md section 2): products follow
// D(a) D(b) = exp(i Im(a b*)) D(a + b), Gaussian channels map one D(gamma) to a scalar times
// one D(gamma'), and terms with equal gamma are merged. The expectation value in a state is
// then sum_k c_k chi(gamma_k) with chi the state's characteristic function.
#pragma once

#include <vector>

#include "core/types.hpp"

namespace macroreal {

struct WeylTerm {
  cplx coeff;
  cplx gamma;
};

// Phase of the composition D(a) D(b) = composition_phase(a, b) * D(a + b).
cplx composition_phase(cplx a, cplx b);

class WeylSum {
 public:
  WeylSum() = default;
  explicit WeylSum(std::vector<WeylTerm> terms);
  static WeylSum identity();                            // 1 = D(0)
  static WeylSum displacement(cplx gamma, cplx coeff = 1.0);

  const std::vector<WeylTerm>& terms() const { return terms_; }
  std::size_t size() const { return terms_.size(); }
  // Direct access for the engine's allocation-free inner loops (merge() restores the order).
  std::vector<WeylTerm>& mutable_terms() { return terms_; }

  // Adds c * D(gamma) without merging (call merge() afterwards).
  void add(cplx coeff, cplx gamma) { terms_.push_back({coeff, gamma}); }
  void append(const WeylSum& other);
  WeylSum& operator*=(cplx s);

  // Combines terms whose gamma agree within tol_abs + tol_rel * |gamma| and drops terms
  // with |coeff| <= drop_below. Deterministic order (sorted by gamma) so results do not
  // depend on how the sum was built.
  void merge(double tol_abs = 1e-13, double tol_rel = 1e-13, double drop_below = 0.0);

  // Operator adjoint: (sum c D(g))^dagger = sum c* D(-g).
  WeylSum adjoint() const;

 private:
  std::vector<WeylTerm> terms_;
};

// Operator product A * B with the composition phase. When `classical` is true the phase is
// dropped: Weyl symbols of displacements then multiply like classical functions, which is
// how the non-invasive classical model is expressed in the same algebra.
WeylSum multiply(const WeylSum& a, const WeylSum& b, bool classical = false);

}  // namespace macroreal
