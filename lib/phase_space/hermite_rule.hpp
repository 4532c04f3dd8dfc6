// Gauss-Hermite quadrature for the standard normal weight (the probabilists' form):
//   E[f(Z)], Z ~ N(0, 1)  ~=  sum_i w_i f(x_i),  sum_i w_i = 1,
// exact for polynomials of degree <= 2n - 1. Nodes and weights by the Golub-Welsch method
// (Golub & Welsch, Math. Comp. 23, 221 (1969)): the nodes are the eigenvalues of the Jacobi
// matrix of the monic He_k recurrence x He_k = He_{k+1} + k He_{k-1} (zero diagonal,
// off-diagonal sqrt(k)), the weights the squared first components of its eigenvectors.
#pragma once

#include <vector>

namespace macroreal::detail {

struct HermiteRule {
  std::vector<double> nodes;
  std::vector<double> weights;
};

// Cached per n (thread-safe); n >= 1.
const HermiteRule& gauss_hermite_rule(int n);

}  // namespace macroreal::detail
