// Kraus operators of the modular measurement and their Heisenberg-picture effect maps
// (measurement.hpp). Each displacement term c D(gamma) of X is sandwiched in closed form:
// with K_o = a0 D(d0) + o a1 D(d1), a0 = 1/2, a1 = e^{i phi}/2,
//   K_o^dag D(g) K_o = A(g) + o B(g),
//   A(g) = 1/4 [e^{i 2 Im(g d0*)} + e^{i 2 Im(g d1*)}] D(g),
//   B(g) = 1/4 e^{i phi} e^{i p01} D(g - d0 + d1) + 1/4 e^{-i phi} e^{i p10} D(g - d1 + d0),
//   p_ij = Im(g d_i*) + Im(g d_j*) - Im(d_i d_j*)   (from D(-d_i) D(g) D(d_j), DESIGN.md §2),
// so the outcome map is A + c o B, the signed map 2 c B and the unselective one 2 A.
#include "phase_space/measurement.hpp"

#include <cmath>

#include "core/error.hpp"
#include "phase_space/measurement_maps.hpp"
#include "phase_space/number_text.hpp"

namespace macroreal {

std::string to_string(Split s) { return s == Split::symmetric ? "symmetric" : "one-sided"; }

Split parse_split(const std::string& s) {
  if (s == "symmetric") return Split::symmetric;
  if (s == "one-sided") return Split::one_sided;
  throw DomainError("split = \"" + s + "\", but must be \"symmetric\" or \"one-sided\"");
}

void ModularMeasurement::validate() const {
  if (!std::isfinite(beta.real()) || !std::isfinite(beta.imag()))
    throw DomainError("beta = (" + detail::number_text(beta.real()) + ", " +
                      detail::number_text(beta.imag()) + "), but must be finite");
  if (!std::isfinite(phase_rad))
    throw DomainError("phase = " + detail::number_text(phase_rad) + ", but must be finite");
  if (!(contrast >= 0.0 && contrast <= 1.0))
    throw DomainError("contrast = " + detail::number_text(contrast) + ", but must be in [0, 1]");
}

namespace {

// The two displacements of K_o: (d0, d1) with K_o = 1/2 [D(d0) + o e^{i phi} D(d1)].
void kraus_displacements(const ModularMeasurement& m, cplx& d0, cplx& d1) {
  if (m.split == Split::symmetric) {
    d0 = -0.5 * m.beta;
    d1 = 0.5 * m.beta;
  } else {
    d0 = 0.0;
    d1 = m.beta;
  }
}

inline double im_ab(cplx a, cplx b) { return a.imag() * b.real() - a.real() * b.imag(); }
inline cplx expi(double x) { return {std::cos(x), std::sin(x)}; }

}  // namespace

WeylSum kraus(const ModularMeasurement& m, int outcome) {
  cplx d0, d1;
  kraus_displacements(m, d0, d1);
  WeylSum k;
  k.add(0.5, d0);
  k.add(0.5 * static_cast<double>(outcome) * expi(m.phase_rad), d1);
  return k;
}

namespace detail {

void apply_effect_map(const ModularMeasurement& m, EffectMode mode, int outcome,
                      const std::vector<WeylTerm>& x, std::vector<WeylTerm>& out,
                      bool classical) {
  cplx d0, d1;
  kraus_displacements(m, d0, d1);
  const cplx eph = expi(m.phase_rad);
  const double p_d01 = im_ab(d0, d1);  // Im(d0 d1*); Im(d1 d0*) = -p_d01
  const double c = m.contrast;
  // Weight of A and of B in each mode.
  double wa = 0.0, wb = 0.0;
  switch (mode) {
    case EffectMode::outcome: wa = 1.0; wb = c * static_cast<double>(outcome); break;
    case EffectMode::signed_sum: wa = 0.0; wb = 2.0 * c; break;
    case EffectMode::unselective: wa = 2.0; wb = 0.0; break;
  }
  const cplx plus_shift = d1 - d0;  // g - d0 + d1 (= g + beta for both splits)
  out.reserve(out.size() + x.size() * ((wa != 0.0) + 2 * (wb != 0.0)));
  for (const WeylTerm& t : x) {
    const cplx g = t.gamma;
    const double q0 = classical ? 0.0 : im_ab(g, d0);
    const double q1 = classical ? 0.0 : im_ab(g, d1);
    if (wa != 0.0) {
      const cplx a = 0.25 * wa * (expi(2.0 * q0) + expi(2.0 * q1));
      out.push_back({t.coeff * a, g});
    }
    if (wb != 0.0) {
      const double p01 = classical ? 0.0 : q0 + q1 - p_d01;
      const double p10 = classical ? 0.0 : q0 + q1 + p_d01;
      out.push_back({t.coeff * (0.25 * wb) * eph * expi(p01), g + plus_shift});
      out.push_back({t.coeff * (0.25 * wb) * std::conj(eph) * expi(p10), g - plus_shift});
    }
  }
}

}  // namespace detail

namespace {

WeylSum apply(const ModularMeasurement& m, detail::EffectMode mode, int outcome,
              const WeylSum& x, bool classical) {
  WeylSum r;
  detail::apply_effect_map(m, mode, outcome, x.terms(), r.mutable_terms(), classical);
  r.merge();
  return r;
}

}  // namespace

WeylSum heisenberg_outcome(const ModularMeasurement& m, int outcome, const WeylSum& x,
                           bool classical) {
  if (outcome != 1 && outcome != -1)
    throw DomainError("outcome = " + std::to_string(outcome) + ", but must be +1 or -1");
  return apply(m, detail::EffectMode::outcome, outcome, x, classical);
}

WeylSum heisenberg_signed(const ModularMeasurement& m, const WeylSum& x, bool classical) {
  return apply(m, detail::EffectMode::signed_sum, 0, x, classical);
}

WeylSum heisenberg_unselective(const ModularMeasurement& m, const WeylSum& x,
                               bool classical) {
  return apply(m, detail::EffectMode::unselective, 0, x, classical);
}

}  // namespace macroreal
