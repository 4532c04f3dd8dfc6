// Phase-insensitive Gaussian channel over an interval (channel.hpp).
#include "phase_space/channel.hpp"

#include <cmath>
#include <string>

#include "core/error.hpp"
#include "phase_space/number_text.hpp"

namespace macroreal {

namespace {

void check_rate(const char* field, double v) {
  if (!std::isfinite(v))
    throw DomainError(std::string("noise.") + field + " = " + detail::number_text(v) +
                      ", but must be finite and >= 0");
  if (v < 0.0)
    throw DomainError(std::string("noise.") + field + " = " + detail::number_text(v) +
                      ", but must be >= 0");
}

}  // namespace

void NoiseModel::validate() const {
  check_rate("heating_quanta_per_s", heating_quanta_per_s);
  check_rate("damping_rate_per_s", damping_rate_per_s);
  check_rate("bath_nbar", bath_nbar);
  check_rate("dephasing_rate_per_s", dephasing_rate_per_s);
  check_rate("frequency_noise_sd_rad_per_s", frequency_noise_sd_rad_per_s);
  check_rate("force_noise_quanta_per_s", force_noise_quanta_per_s);
}

GaussianChannel GaussianChannel::over(const NoiseModel& noise, double dt_s) {
  if (!(std::isfinite(dt_s) && dt_s >= 0.0))
    throw DomainError("time interval = " + detail::number_text(dt_s) + " s, but must be >= 0");
  GaussianChannel ch;
  if (dt_s == 0.0) return ch;
  const double g = noise.damping_rate_per_s;
  const double drive = noise.heating_quanta_per_s + noise.force_noise_quanta_per_s;
  const double gt = g * dt_s;
  // 1 - e^{-gamma t} without cancellation, and (1 - e^{-gamma t}) / gamma -> t as gamma -> 0.
  const double one_minus = -std::expm1(-gt);
  const double integral = gt > 0.0 ? one_minus / g : dt_s;
  ch.shrink = std::exp(-0.5 * gt);
  ch.diffusion = (noise.bath_nbar + 0.5) * one_minus + drive * integral;
  return ch;
}

void GaussianChannel::apply_adjoint(WeylSum& x) const {
  if (is_identity()) return;
  for (WeylTerm& t : x.mutable_terms()) {
    t.coeff *= std::exp(-diffusion * std::norm(t.gamma));
    t.gamma *= shrink;
  }
}

GaussianChannel GaussianChannel::then(const GaussianChannel& next) const {
  // chi -> chi(b s1) e^{-D1 |b|^2}, then b -> b s2: chi(b s1 s2) e^{-(D1 s2^2 + D2) |b|^2}.
  GaussianChannel r;
  r.shrink = shrink * next.shrink;
  r.diffusion = diffusion * next.shrink * next.shrink + next.diffusion;
  return r;
}

}  // namespace macroreal
