// Gaussian states: thermal, coherent and squeezed thermal displaced (state.hpp).
//   rho = D(alpha) S(xi) rho_th(nbar) S(xi)^dag D(alpha)^dag,  xi = r e^{i theta}.
// S^dag a S = a cosh r - a^dag e^{i theta} sinh r gives S^dag D(b) S = D(b cosh r + b* e^{i theta}
// sinh r), and D(-alpha) D(b) D(alpha) = e^{b alpha* - b* alpha} D(b), hence the closed form
//   chi(b) = exp(b alpha* - b* alpha) exp(-(nbar + 1/2) |b cosh r + b* e^{i theta} sinh r|^2).
// Moments in (x, p): mean sqrt2 (Re alpha, Im alpha); covariance
// (nbar + 1/2) R(theta/2) diag(e^{-2r}, e^{2r}) R(theta/2)^T (theta = 0 squeezes x).
#include <cmath>
#include <sstream>

#include "core/error.hpp"
#include "phase_space/number_text.hpp"
#include "phase_space/state.hpp"

namespace macroreal {

namespace {

class GaussianState final : public State {
 public:
  GaussianState(double nbar, double r, double theta, cplx alpha, const char* kind)
      : nbar_(nbar), r_(r), theta_(theta), alpha_(alpha), kind_(kind),
        ch_(std::cosh(r)), sh_phase_(std::polar(std::sinh(r), theta)) {}

  cplx characteristic(cplx b) const override {
    const cplx bs = b * ch_ + std::conj(b) * sh_phase_;
    const double gauss = std::exp(-(nbar_ + 0.5) * std::norm(bs));
    if (alpha_ == cplx(0.0)) return gauss;
    // b alpha* - b* alpha = 2 i Im(b alpha*).
    const double ph = 2.0 * (b.imag() * alpha_.real() - b.real() * alpha_.imag());
    return {gauss * std::cos(ph), gauss * std::sin(ph)};
  }
  bool wigner_nonnegative() const override { return true; }
  bool rotation_invariant() const override { return r_ == 0.0 && alpha_ == cplx(0.0); }
  std::optional<GaussianMoments> gaussian_moments() const override {
    GaussianMoments m;
    m.mean = std::sqrt(2.0) * Eigen::Vector2d(alpha_.real(), alpha_.imag());
    const double c = std::cos(0.5 * theta_), s = std::sin(0.5 * theta_);
    Eigen::Matrix2d rot;
    rot << c, -s, s, c;
    const Eigen::Vector2d d(std::exp(-2.0 * r_), std::exp(2.0 * r_));
    m.covariance = (nbar_ + 0.5) * rot * d.asDiagonal() * rot.transpose();
    return m;
  }
  std::string describe() const override {
    std::ostringstream os;
    os << kind_ << " state (nbar " << detail::number_text(nbar_);
    if (r_ != 0.0)
      os << ", r " << detail::number_text(r_) << ", theta " << detail::number_text(theta_)
         << " rad";
    if (alpha_ != cplx(0.0))
      os << ", alpha " << detail::number_text(alpha_.real()) << (alpha_.imag() < 0 ? "-" : "+")
         << detail::number_text(std::abs(alpha_.imag())) << "i";
    os << ")";
    return os.str();
  }

 private:
  double nbar_, r_, theta_;
  cplx alpha_;
  const char* kind_;
  double ch_;
  cplx sh_phase_;
};

void check_finite_alpha(cplx alpha) {
  if (!std::isfinite(alpha.real()) || !std::isfinite(alpha.imag()))
    throw DomainError("alpha = (" + detail::number_text(alpha.real()) + ", " +
                      detail::number_text(alpha.imag()) + "), but must be finite");
}

void check_nbar(double nbar) {
  if (!(std::isfinite(nbar) && nbar >= 0.0))
    throw DomainError("nbar = " + detail::number_text(nbar) + ", but must be finite and >= 0");
}

}  // namespace

StatePtr make_thermal(double nbar) {
  check_nbar(nbar);
  return std::make_shared<GaussianState>(nbar, 0.0, 0.0, 0.0, "thermal");
}

StatePtr make_coherent(cplx alpha) {
  check_finite_alpha(alpha);
  return std::make_shared<GaussianState>(0.0, 0.0, 0.0, alpha, "coherent");
}

StatePtr make_squeezed(double r, double theta_rad, double nbar, cplx alpha) {
  // |r| <= 20 (174 dB) keeps cosh r e^{2r} far inside the double range.
  if (!(std::isfinite(r) && std::abs(r) <= 20.0))
    throw DomainError("squeezing r = " + detail::number_text(r) + ", but must be in [-20, 20]");
  if (!std::isfinite(theta_rad))
    throw DomainError("squeezing theta = " + detail::number_text(theta_rad) +
                      ", but must be finite");
  check_nbar(nbar);
  check_finite_alpha(alpha);
  return std::make_shared<GaussianState>(nbar, r, theta_rad, alpha, "squeezed");
}

}  // namespace macroreal
