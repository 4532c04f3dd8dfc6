// Weyl-sum algebra: composition phase, merging, products, adjoint (see weyl_sum.hpp).
#include "phase_space/weyl_sum.hpp"

#include <algorithm>
#include <cmath>

namespace macroreal {

cplx composition_phase(cplx a, cplx b) {
  // D(a) D(b) = exp((a b* - a* b)/2) D(a + b) = exp(i Im(a b*)) D(a + b).
  const double im = a.imag() * b.real() - a.real() * b.imag();  // Im(a conj(b))
  return {std::cos(im), std::sin(im)};
}

WeylSum::WeylSum(std::vector<WeylTerm> terms) : terms_(std::move(terms)) {}

WeylSum WeylSum::identity() { return displacement(0.0, 1.0); }

WeylSum WeylSum::displacement(cplx gamma, cplx coeff) {
  WeylSum s;
  s.terms_.push_back({coeff, gamma});
  return s;
}

void WeylSum::append(const WeylSum& other) {
  terms_.insert(terms_.end(), other.terms_.begin(), other.terms_.end());
}

WeylSum& WeylSum::operator*=(cplx s) {
  for (auto& t : terms_) t.coeff *= s;
  return *this;
}

namespace {

// Total order on terms: by gamma, then by coefficient, so that the summation order inside a
// merged group (and hence the rounding) does not depend on how the sum was built.
bool term_less(const WeylTerm& x, const WeylTerm& y) {
  if (x.gamma.real() != y.gamma.real()) return x.gamma.real() < y.gamma.real();
  if (x.gamma.imag() != y.gamma.imag()) return x.gamma.imag() < y.gamma.imag();
  if (x.coeff.real() != y.coeff.real()) return x.coeff.real() < y.coeff.real();
  return x.coeff.imag() < y.coeff.imag();
}

}  // namespace

void WeylSum::merge(double tol_abs, double tol_rel, double drop_below) {
  const std::size_t n = terms_.size();
  if (n == 0) return;
  if (n > 1) std::sort(terms_.begin(), terms_.end(), term_less);
  // Sweep in order of Re(gamma): a term absorbs every later unconsumed term whose gamma lies
  // within the tolerance of its own (the window is bounded by the Re ordering). Terms that are
  // close in Re but far in Im are skipped, not merged, so near-equal gammas separated in the
  // sort by another term still combine.
  std::vector<WeylTerm>& t = terms_;
  std::size_t out = 0;
  std::vector<char> used;  // only allocated when a skip makes it necessary
  for (std::size_t i = 0; i < n; ++i) {
    if (!used.empty() && used[i]) continue;
    WeylTerm acc = t[i];
    const double tol = tol_abs + tol_rel * std::abs(t[i].gamma);
    for (std::size_t j = i + 1; j < n; ++j) {
      if (t[j].gamma.real() - t[i].gamma.real() > tol) break;
      if (!used.empty() && used[j]) continue;
      if (std::abs(t[j].gamma - t[i].gamma) <= tol) {
        acc.coeff += t[j].coeff;
        if (used.empty()) used.assign(n, 0);
        used[j] = 1;
      }
    }
    if (std::abs(acc.coeff) > drop_below) t[out++] = acc;
  }
  t.resize(out);
}

WeylSum WeylSum::adjoint() const {
  WeylSum r;
  r.terms_.reserve(terms_.size());
  for (const auto& t : terms_) r.terms_.push_back({std::conj(t.coeff), -t.gamma});
  return r;
}

WeylSum multiply(const WeylSum& a, const WeylSum& b, bool classical) {
  std::vector<WeylTerm> out;
  out.reserve(a.size() * b.size());
  for (const auto& x : a.terms())
    for (const auto& y : b.terms()) {
      const cplx c = classical ? x.coeff * y.coeff
                               : x.coeff * y.coeff * composition_phase(x.gamma, y.gamma);
      out.push_back({c, x.gamma + y.gamma});
    }
  WeylSum r(std::move(out));
  r.merge();
  return r;
}

}  // namespace macroreal
