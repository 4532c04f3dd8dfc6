// A tabulated oscillator state: a density matrix in the truncated Fock basis |0>..|N-1>
// (DESIGN.md section 8, state.kind "density_matrix"). It is also a `State`, so the Weyl
// engine can use it through chi(beta) = Tr[rho D(beta)] = sum_mn rho_mn <n|D(beta)|m>, with the
// exact matrix elements of fock/displacement_matrix.hpp (Cahill & Glauber 1969).
//
// File formats (our own; both describe the same matrix):
//   JSON  {"format": "macroreal-density-matrix/1", "dimension": N,
//          "real": [[...N numbers...], ... N rows ...],
//          "imag": [[...], ...]}                 ("imag" may be omitted: a real matrix)
//         row m, column n is rho_mn = <m|rho|n>.
//   CSV   one entry per line "m,n,re,im" (0-based Fock indices; "im" may be omitted);
//         an optional header line "m,n,re,im"; '#' lines and blank lines are comments;
//         entries not listed are 0; the dimension is 1 + the largest index (or an explicit
//         "# dimension: N" comment). Both triangles must be listed (rho_nm = conj(rho_mn)).
// Checks on reading (tolerances below, stated in DensityMatrixTolerances): Hermitian,
// unit trace, positive semi-definite; a violation is an InputError naming the file and, for
// positivity, the smallest eigenvalue.
#pragma once

#include <string>

#include <Eigen/Dense>

#include "phase_space/state.hpp"

namespace macroreal {

struct DensityMatrixTolerances {
  double hermiticity = 1e-10;  // max_mn |rho_mn - conj(rho_nm)|
  double trace = 1e-8;         // |Tr rho - 1|
  double positivity = 1e-10;   // smallest eigenvalue must be >= -positivity
};

// Throws InputError(file, where, ...) when the matrix is not square, not finite, not
// Hermitian, not of unit trace or not positive semi-definite within the tolerances.
void check_density_matrix(const Eigen::MatrixXcd& rho, const std::string& file,
                          const DensityMatrixTolerances& tol = {});

class DensityMatrixState final : public State {
 public:
  // Checked with check_density_matrix (file names the source in messages), then made
  // exactly Hermitian ((rho + rho^dag)/2). Not renormalised.
  explicit DensityMatrixState(Eigen::MatrixXcd rho, std::string source = "density matrix",
                              const DensityMatrixTolerances& tol = {});

  cplx characteristic(cplx beta) const override;
  // The Wigner function of a general tabulated state is not known to be non-negative.
  bool wigner_nonnegative() const override { return false; }
  // Diagonal in the Fock basis (all |rho_mn| for m != n below 1e-14) commutes with a^dag a.
  bool rotation_invariant() const override { return diagonal_; }
  std::string describe() const override;

  const Eigen::MatrixXcd& matrix() const { return rho_; }
  int dimension() const { return static_cast<int>(rho_.rows()); }
  const std::string& source() const { return source_; }

 private:
  Eigen::MatrixXcd rho_;
  std::string source_;
  bool diagonal_ = false;
};

// Readers (throw InputError naming the file and the line or JSON field).
Eigen::MatrixXcd read_density_matrix_json(const std::string& path);
Eigen::MatrixXcd read_density_matrix_csv(const std::string& path);
// By extension: ".json" or ".csv" (case-insensitive); checked and wrapped as a state.
std::shared_ptr<const DensityMatrixState> read_density_matrix(
    const std::string& path, const DensityMatrixTolerances& tol = {});

}  // namespace macroreal
