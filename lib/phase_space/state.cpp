// Default expectation value and classical mixtures of states (state.hpp).
#include "phase_space/state.hpp"

#include <cmath>
#include <sstream>

#include "core/error.hpp"
#include "phase_space/number_text.hpp"

namespace macroreal {

cplx State::expectation(const WeylSum& op) const {
  cplx s = 0.0;
  for (const auto& t : op.terms()) s += t.coeff * characteristic(t.gamma);
  return s;
}

namespace {

class MixtureState final : public State {
 public:
  explicit MixtureState(std::vector<std::pair<double, StatePtr>> c) : c_(std::move(c)) {}
  cplx characteristic(cplx b) const override {
    cplx s = 0.0;
    for (const auto& [w, st] : c_) s += w * st->characteristic(b);
    return s;
  }
  cplx expectation(const WeylSum& op) const override {
    cplx s = 0.0;
    for (const auto& [w, st] : c_) s += w * st->expectation(op);
    return s;
  }
  bool wigner_nonnegative() const override {
    for (const auto& c : c_)
      if (!c.second->wigner_nonnegative()) return false;
    return true;
  }
  bool rotation_invariant() const override {
    for (const auto& c : c_)
      if (!c.second->rotation_invariant()) return false;
    return true;
  }
  std::optional<GaussianMoments> gaussian_moments() const override {
    // A mixture of several Gaussians is not Gaussian.
    if (c_.size() == 1) return c_[0].second->gaussian_moments();
    return std::nullopt;
  }
  std::string describe() const override {
    std::ostringstream os;
    os << "mixture of " << c_.size() << " states (";
    for (std::size_t k = 0; k < c_.size(); ++k)
      os << (k ? "; " : "") << detail::number_text(c_[k].first) << " x "
         << c_[k].second->describe();
    os << ")";
    return os.str();
  }

 private:
  std::vector<std::pair<double, StatePtr>> c_;
};

}  // namespace

StatePtr make_mixture(std::vector<std::pair<double, StatePtr>> components) {
  double total = 0.0;
  std::vector<std::pair<double, StatePtr>> kept;
  for (auto& [w, st] : components) {
    if (!(std::isfinite(w) && w >= 0.0))
      throw DomainError("mixture weight = " + detail::number_text(w) +
                        ", but must be finite and >= 0");
    if (!st) throw DomainError("mixture component is empty");
    total += w;
    if (w > 0.0) kept.emplace_back(w, st);
  }
  if (!(total > 0.0)) throw DomainError("mixture weights sum to 0, but must sum to > 0");
  for (auto& c : kept) c.first /= total;
  return std::make_shared<MixtureState>(std::move(kept));
}

}  // namespace macroreal
