// Sliced finite-duration measurement in the Heisenberg picture (sliced_measurement.hpp).
#include "phase_space/sliced_measurement.hpp"

#include <cmath>

#include "core/error.hpp"

namespace macroreal::detail {

namespace {

inline double im_ab(cplx a, cplx b) { return a.imag() * b.real() - a.real() * b.imag(); }
inline cplx expi(double x) { return {std::cos(x), std::sin(x)}; }

}  // namespace

void apply_sliced_effect_map(const ModularMeasurement& m, EffectMode mode, int outcome,
                             const NoiseModel& noise, double duration_s, int slices,
                             const std::vector<WeylTerm>& x, std::vector<WeylTerm>& out) {
  if (slices < 1)
    throw DomainError("interaction_slices = " + std::to_string(slices) + ", but must be >= 1");
  const bool sym = m.split == Split::symmetric;
  const double n = static_cast<double>(slices);
  const cplx kick[2] = {sym ? -m.beta / (2.0 * n) : cplx(0.0), sym ? m.beta / (2.0 * n) : m.beta / n};
  const GaussianChannel half = GaussianChannel::over(noise, duration_s / (2.0 * n));
  const GaussianChannel full = GaussianChannel::over(noise, duration_s / n);
  const cplx eph = expi(m.phase_rad);
  const double c = m.contrast;
  double a0 = 0.0, a1 = 0.0;  // weights of T0 and of T1, as in apply_effect_map
  switch (mode) {
    case EffectMode::outcome: a0 = 1.0; a1 = c * static_cast<double>(outcome); break;
    case EffectMode::signed_sum: a0 = 0.0; a1 = 2.0 * c; break;
    case EffectMode::unselective: a0 = 2.0; a1 = 0.0; break;
  }
  // Branches (s, s') with their weight in the projection.
  struct Branch {
    int s, sp;
    cplx w;
  };
  Branch branches[4];
  int nb = 0;
  if (a0 != 0.0) {
    branches[nb++] = {0, 0, 0.25 * a0};
    branches[nb++] = {1, 1, 0.25 * a0};
  }
  if (a1 != 0.0) {
    branches[nb++] = {1, 0, 0.25 * a1 * eph};
    branches[nb++] = {0, 1, 0.25 * a1 * std::conj(eph)};
  }
  auto channel = [](const GaussianChannel& ch, cplx& coeff, cplx& g) {
    coeff *= std::exp(-ch.diffusion * std::norm(g));
    g *= ch.shrink;
  };
  out.reserve(out.size() + x.size() * static_cast<std::size_t>(nb));
  for (int b = 0; b < nb; ++b) {
    const cplx ks = kick[branches[b].s], ksp = kick[branches[b].sp];
    const cplx shift = ks - ksp;
    const double p_kk = im_ab(ksp, ks);
    for (const WeylTerm& t : x) {
      cplx coeff = t.coeff * branches[b].w, g = t.gamma;
      channel(half, coeff, g);
      for (int i = 0; i < slices; ++i) {
        coeff *= expi(im_ab(g, ksp) + im_ab(g, ks) - p_kk);
        g += shift;
        channel(i + 1 == slices ? half : full, coeff, g);
      }
      out.push_back({coeff, g});
    }
  }
}

}  // namespace macroreal::detail
