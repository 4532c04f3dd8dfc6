// Fock states |n>: chi(b) = exp(-|b|^2/2) L_n(|b|^2), evaluated log-scaled (fock_functions.hpp).
#include "core/error.hpp"
#include "phase_space/state.hpp"

namespace macroreal {

namespace {

class FockState final : public State {
 public:
  explicit FockState(int n) : n_(n) {}
  cplx characteristic(cplx b) const override { return fock_characteristic(n_, std::norm(b)); }
  bool wigner_nonnegative() const override { return n_ == 0; }  // |0> is the vacuum
  bool rotation_invariant() const override { return true; }
  std::optional<GaussianMoments> gaussian_moments() const override {
    if (n_ != 0) return std::nullopt;
    return GaussianMoments{Eigen::Vector2d::Zero(), 0.5 * Eigen::Matrix2d::Identity()};
  }
  std::string describe() const override { return "Fock state |" + std::to_string(n_) + ">"; }

 private:
  int n_;
};

}  // namespace

StatePtr make_fock(int n) {
  if (n < 0 || n > 2000)
    throw DomainError("Fock n = " + std::to_string(n) + ", but must be in [0, 2000]");
  return std::make_shared<FockState>(n);
}

}  // namespace macroreal
