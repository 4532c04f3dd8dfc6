// Device parameters -> model parameters (device_mapping.hpp, docs/device_mapping.md).
#include "device/device_mapping.hpp"

#include <cmath>

#include "core/error.hpp"
#include "device/physical_constants.hpp"

namespace macroreal {

namespace {
constexpr double kTwoPi = 2.0 * codata2018::kPi;
}

double bose_einstein_occupation(double frequency_hz, double temperature_k) {
  if (!(frequency_hz > 0.0)) throw DomainError("frequency must be > 0");
  if (!(temperature_k >= 0.0)) throw DomainError("temperature must be >= 0");
  if (temperature_k == 0.0) return 0.0;
  // hbar w = h f; h is exact in the SI, so h f / k_B T is computed from exact constants.
  const double x = codata2018::kPlanck * frequency_hz / (codata2018::kBoltzmann * temperature_k);
  return 1.0 / std::expm1(x);
}

double interaction_duration_s(const DevicePoint& p) {
  const double period = 1.0 / p.mechanical_frequency_hz;
  return p.scheme == InteractionScheme::echo ? 0.5 * p.echo_half_periods * period
                                             : p.interaction_period_fraction * period;
}

cplx interaction_beta(const DevicePoint& p) {
  const double ratio = p.coupling_g_over_2pi_hz / p.mechanical_frequency_hz;  // g / w
  if (p.scheme == InteractionScheme::echo) return 4.0 * p.echo_half_periods * ratio;
  const double wt = kTwoPi * p.interaction_period_fraction;
  return 2.0 * ratio * (1.0 - cplx(std::cos(wt), std::sin(wt)));
}

std::vector<cplx> interaction_path(const DevicePoint& p, int n) {
  if (n < 1) throw DomainError("interaction_path needs n >= 1");
  const double w = kTwoPi * p.mechanical_frequency_hz;
  const double ratio = p.coupling_g_over_2pi_hz / p.mechanical_frequency_hz;
  const double tau = interaction_duration_s(p);
  std::vector<cplx> a(static_cast<std::size_t>(n) + 1);
  for (int i = 0; i <= n; ++i) {
    const double t = tau * i / n;
    if (p.scheme == InteractionScheme::free_evolution) {
      a[i] = ratio * (1.0 - cplx(std::cos(w * t), std::sin(w * t)));
    } else {
      // Segment k = floor(w t / pi) has sign (-1)^k; each completed half period adds 2g/w.
      const double u = w * t / codata2018::kPi;
      int k = static_cast<int>(std::floor(u));
      if (k >= static_cast<int>(p.echo_half_periods)) k = static_cast<int>(p.echo_half_periods) - 1;
      const double sign = (k % 2 == 0) ? 1.0 : -1.0;
      const double tk = k * codata2018::kPi / w;
      // -i g s int_{tk}^{t} e^{iwt'} dt' = -(g/w) s (e^{iwt} - e^{iwtk})
      const cplx part = -ratio * sign *
                        (cplx(std::cos(w * t), std::sin(w * t)) - cplx(std::cos(w * tk), std::sin(w * tk)));
      a[i] = 2.0 * ratio * k + part;
    }
  }
  return a;
}

BranchDecoherence branch_decoherence(const std::vector<cplx>& a, double tau, double gamma,
                                     double nth) {
  if (a.size() < 2) throw DomainError("branch_decoherence needs a path of >= 2 points");
  const int n = static_cast<int>(a.size()) - 1;
  const double h = tau / n;
  // Backward recursion Gamma(s - h) = Gamma(s) e^{-gamma h/2} + 2 (alpha(s) - alpha(s - h))
  // e^{-gamma h/4} (midpoint weight), trapezoid rule for int |Gamma|^2.
  const double shrink = std::exp(-gamma * h / 2.0), mid = std::exp(-gamma * h / 4.0);
  cplx g = 0.0;
  double integral = 0.0, prev = 0.0;
  for (int i = n; i > 0; --i) {
    g = g * shrink + 2.0 * (a[i] - a[i - 1]) * mid;
    const double cur = std::norm(g);
    integral += 0.5 * (prev + cur) * h;
    prev = cur;
  }
  return {std::exp(-(nth + 0.5) * gamma * integral), g};
}

double bath_contrast(const DevicePoint& p, int n) {
  const double w = kTwoPi * p.mechanical_frequency_hz;
  const double nth = bose_einstein_occupation(p.mechanical_frequency_hz, p.bath_temperature_k);
  return branch_decoherence(interaction_path(p, n), interaction_duration_s(p),
                            w / p.quality_factor, nth)
      .decay;
}

double bath_contrast_free_closed_form(const DevicePoint& p) {
  const double w = kTwoPi * p.mechanical_frequency_hz;
  const double g = kTwoPi * p.coupling_g_over_2pi_hz;
  const double gamma = w / p.quality_factor;
  const double nth = bose_einstein_occupation(p.mechanical_frequency_hz, p.bath_temperature_k);
  const double tau = interaction_duration_s(p);
  return std::exp(-(nth + 0.5) * gamma * 8.0 * g * g / (w * w) * (tau - std::sin(w * tau) / w));
}

ModularMeasurement MappedDevice::measurement(double theta_rad, double phase_rad) const {
  ModularMeasurement m;
  m.beta = beta * cplx(std::cos(theta_rad), std::sin(theta_rad));
  m.phase_rad = phase_rad;
  m.split = Split::symmetric;
  m.contrast = contrast;
  return m;
}

double MappedDevice::next_start_s(double previous_start_s, double delta_theta) const {
  // Rotation still to go after the interaction has ended, in [0, 2 pi).
  double rest = std::fmod(delta_theta - omega_rad_per_s * interaction_s, kTwoPi);
  if (rest < 0.0) rest += kTwoPi;
  return previous_start_s + interaction_s + rest / omega_rad_per_s;
}

MappedDevice map_device(const DevicePoint& p) {
  p.validate();
  MappedDevice m;
  m.omega_rad_per_s = kTwoPi * p.mechanical_frequency_hz;
  m.gamma_per_s = m.omega_rad_per_s / p.quality_factor;
  m.bath_nbar = bose_einstein_occupation(p.mechanical_frequency_hz, p.bath_temperature_k);
  m.initial_nbar = p.occupation_after_cooling.value_or(m.bath_nbar);
  m.interaction_s = interaction_duration_s(p);
  // beta: the displacement at which the probe samples the characteristic function at the
  // start of the interaction, Gamma(0) (= 2 alpha(tau) without damping); with it a single
  // measurement is exact. c_bath from the same integral.
  {
    const BranchDecoherence bd =
        branch_decoherence(interaction_path(p, 2000), m.interaction_s, m.gamma_per_s, m.bath_nbar);
    m.beta = bd.gamma0;
    m.contrast_bath = bd.decay;
  }
  m.contrast_t2 = std::exp(-m.interaction_s / p.qubit_t2_s);
  m.contrast_readout = 1.0 - p.readout_error_dark_read_bright - p.readout_error_bright_read_dark;
  m.contrast = m.contrast_bath * m.contrast_t2 * m.contrast_readout;
  m.noise.damping_rate_per_s = m.gamma_per_s;
  m.noise.bath_nbar = m.bath_nbar;
  m.noise.frequency_noise_sd_rad_per_s = m.omega_rad_per_s * p.frequency_stability_fractional;
  m.cycle_s = p.shot_cycle_time_s;
  m.available_s = p.measurement_time_available_h * 3600.0;
  m.destructive = p.destructive_readout;
  const int kmax = p.scheme == InteractionScheme::echo ? 3 : 1;
  for (int k = 1; k <= kmax; ++k) {
    DevicePoint q = p;
    q.echo_half_periods = k * p.echo_half_periods;
    MappedDevice::Preparation prep;
    prep.multiple = k;
    prep.interaction_s = interaction_duration_s(q);
    const BranchDecoherence bd = branch_decoherence(interaction_path(q, 2000), prep.interaction_s,
                                                    m.gamma_per_s, m.bath_nbar);
    prep.beta = bd.gamma0;
    prep.contrast = bd.decay * std::exp(-prep.interaction_s / p.qubit_t2_s) * m.contrast_readout;
    m.preparations.push_back(prep);
  }
  return m;
}

}  // namespace macroreal
