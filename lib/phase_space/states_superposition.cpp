// Finite pure superpositions of coherent and Fock components, and cat states (state.hpp).
//   chi(b) = sum_ij conj(c_i) c_j <psi_i|D(b)|psi_j> / sum_ij conj(c_i) c_j <psi_i|psi_j>,
// with the matrix elements
//   <a|D(b)|a'> = e^{i Im(b a'*)} <a|a'+b>,  <a|g> = exp(-|a|^2/2 - |g|^2/2 + a* g),
//   <m|D(b)|a'> = e^{i Im(b a'*)} e^{-|a'+b|^2/2} (a'+b)^m / sqrt(m!),
//   <a|D(b)|n>  = conj(<n|D(-b)|a>),  <m|D(b)|n> from displacement_matrix_element
// (D(b) D(a') = e^{i Im(b a'*)} D(b + a'), DESIGN.md §2; Cahill & Glauber 1969).
#include <cmath>
#include <sstream>

#include "core/error.hpp"
#include "phase_space/fock_functions.hpp"
#include "phase_space/number_text.hpp"
#include "phase_space/state.hpp"

namespace macroreal {

namespace {

using Kind = PureComponent::Kind;

inline double im_ab(cplx a, cplx b) { return a.imag() * b.real() - a.real() * b.imag(); }

// <psi_i| D(b) |psi_j> for two components (amplitudes not included).
cplx component_element(const PureComponent& i, const PureComponent& j, cplx b) {
  if (j.kind == Kind::coherent) {
    const cplx g = j.alpha + b;
    const double ph = im_ab(b, j.alpha);
    if (i.kind == Kind::coherent) {
      const cplx e = cplx(0.0, ph) - 0.5 * std::norm(i.alpha) - 0.5 * std::norm(g) +
                     std::conj(i.alpha) * g;
      return std::exp(e);
    }
    return std::polar(1.0, ph) * detail::fock_coherent_overlap(i.n, g);
  }
  if (i.kind == Kind::coherent) return std::conj(component_element(j, i, -b));
  return displacement_matrix_element(i.n, j.n, b);
}

class SuperpositionState final : public State {
 public:
  explicit SuperpositionState(std::vector<PureComponent> c) : c_(std::move(c)) {
    cplx n2 = 0.0;
    for (const auto& i : c_)
      for (const auto& j : c_) n2 += std::conj(i.amplitude) * j.amplitude * component_element(i, j, 0.0);
    norm2_ = n2.real();
    if (!(norm2_ > 1e-300) || !std::isfinite(norm2_))
      throw DomainError("superposition norm^2 = " + detail::number_text(norm2_) +
                        ", but must be > 0 (the components cancel)");
  }
  cplx characteristic(cplx b) const override {
    cplx s = 0.0;
    for (const auto& i : c_)
      for (const auto& j : c_) s += std::conj(i.amplitude) * j.amplitude * component_element(i, j, b);
    return s / norm2_;
  }
  bool wigner_nonnegative() const override {
    // A single coherent component (or the vacuum) is Gaussian; anything else is treated as
    // "negative somewhere or not known".
    return c_.size() == 1 && (c_[0].kind == Kind::coherent || c_[0].n == 0);
  }
  bool rotation_invariant() const override {
    return c_.size() == 1 && (c_[0].kind == Kind::fock ||
                              (c_[0].kind == Kind::coherent && c_[0].alpha == cplx(0.0)));
  }
  std::optional<GaussianMoments> gaussian_moments() const override {
    if (!wigner_nonnegative()) return std::nullopt;
    const cplx a = c_[0].kind == Kind::coherent ? c_[0].alpha : 0.0;
    return GaussianMoments{std::sqrt(2.0) * Eigen::Vector2d(a.real(), a.imag()),
                           0.5 * Eigen::Matrix2d::Identity()};
  }
  std::string describe() const override {
    std::ostringstream os;
    os << "superposition of " << c_.size() << " components (";
    for (std::size_t k = 0; k < c_.size(); ++k) {
      if (k) os << ", ";
      if (c_[k].kind == Kind::fock) os << "|" << c_[k].n << ">";
      else
        os << "coherent " << detail::number_text(c_[k].alpha.real())
           << (c_[k].alpha.imag() < 0 ? "-" : "+")
           << detail::number_text(std::abs(c_[k].alpha.imag())) << "i";
    }
    os << ")";
    return os.str();
  }

 private:
  std::vector<PureComponent> c_;
  double norm2_ = 1.0;
};

}  // namespace

StatePtr make_superposition(std::vector<PureComponent> components) {
  std::vector<PureComponent> kept;
  for (const auto& c : components) {
    if (!std::isfinite(c.amplitude.real()) || !std::isfinite(c.amplitude.imag()))
      throw DomainError("superposition amplitude is not finite");
    if (c.kind == Kind::fock && (c.n < 0 || c.n > 2000))
      throw DomainError("Fock n = " + std::to_string(c.n) + ", but must be in [0, 2000]");
    if (c.kind == Kind::coherent &&
        (!std::isfinite(c.alpha.real()) || !std::isfinite(c.alpha.imag())))
      throw DomainError("superposition alpha is not finite");
    if (c.amplitude != cplx(0.0)) kept.push_back(c);
  }
  if (kept.empty()) throw DomainError("superposition has no component with amplitude != 0");
  return std::make_shared<SuperpositionState>(std::move(kept));
}

StatePtr make_cat(cplx alpha, double relative_phase_rad) {
  if (!std::isfinite(relative_phase_rad))
    throw DomainError("cat relative phase = " + detail::number_text(relative_phase_rad) +
                      ", but must be finite");
  PureComponent p{PureComponent::Kind::coherent, 1.0, alpha, 0};
  PureComponent m{PureComponent::Kind::coherent, std::polar(1.0, relative_phase_rad), -alpha, 0};
  return make_superposition({p, m});
}

}  // namespace macroreal
