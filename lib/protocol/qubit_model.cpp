// Precessing spin-1/2 measured along z (qubit_model.hpp).
#include "protocol/qubit_model.hpp"

#include <cmath>
#include <string>

#include "core/error.hpp"
#include "core/types.hpp"

namespace macroreal {

namespace {

using Mat = Eigen::Matrix2cd;
using C = std::complex<double>;

// exp(-i H t) with H = (omega/2) sigma_x: cos(omega t/2) 1 - i sin(omega t/2) sigma_x.
Mat evolution(double omega, double t) {
  const double c = std::cos(0.5 * omega * t), s = std::sin(0.5 * omega * t);
  Mat u;
  u << C(c, 0.0), C(0.0, -s), C(0.0, -s), C(c, 0.0);
  return u;
}

// Projector on sigma_z = o (|up> = (1, 0) for o = +1).
Mat projector(int o) {
  Mat p = Mat::Zero();
  if (o == +1)
    p(0, 0) = 1.0;
  else
    p(1, 1) = 1.0;
  return p;
}

}  // namespace

PrecessingQubitModel::PrecessingQubitModel(double omega_rad_per_s, std::array<double, 3> bloch)
    : omega_(omega_rad_per_s) {
  if (!std::isfinite(omega_))
    throw DomainError("omega = " + std::to_string(omega_) + ", but must be finite");
  const double r2 = bloch[0] * bloch[0] + bloch[1] * bloch[1] + bloch[2] * bloch[2];
  if (!(r2 <= 1.0 + 1e-12))
    throw DomainError("Bloch vector length = " + std::to_string(std::sqrt(r2)) +
                      ", but must be <= 1");
  // rho = (1 + r . sigma) / 2.
  rho0_ << C(0.5 * (1.0 + bloch[2]), 0.0), C(0.5 * bloch[0], -0.5 * bloch[1]),
      C(0.5 * bloch[0], 0.5 * bloch[1]), C(0.5 * (1.0 - bloch[2]), 0.0);
}

double PrecessingQubitModel::probability_value(const MeasurementSequence& seq,
                                               const OutcomeString& o) const {
  if (o.size() > seq.steps.size())
    throw DomainError("outcome string has " + std::to_string(o.size()) +
                      " signs, but the sequence has " + std::to_string(seq.steps.size()) +
                      " steps");
  Mat rho = rho0_;
  double t_prev = 0.0;
  for (std::size_t k = 0; k < o.size(); ++k) {
    const double t = seq.steps[k].time_s;
    if (!(t >= t_prev))
      throw DomainError("time_s of step " + std::to_string(k + 1) + " = " + std::to_string(t) +
                        " is earlier than the one before, but times must not decrease");
    if (o[k] != 1 && o[k] != -1)
      throw DomainError("outcome " + std::to_string(o[k]) + ", but must be +1 or -1");
    const Mat u = evolution(omega_, t - t_prev);
    const Mat p = projector(o[k]);
    rho = p * (u * rho * u.adjoint()) * p;  // unnormalised Lueders update
    t_prev = t;
  }
  return rho.trace().real();
}

double PrecessingQubitModel::correlator_value(const MeasurementSequence& seq) const {
  const std::size_t n = seq.steps.size();
  if (n == 0 || n > 20)
    throw DomainError("a correlator needs 1 to 20 steps, got " + std::to_string(n));
  double c = 0.0;
  OutcomeString o(n);
  for (unsigned long mask = 0; mask < (1UL << n); ++mask) {
    int sign = 1;
    for (std::size_t k = 0; k < n; ++k) {
      o[k] = (mask >> k) & 1UL ? -1 : +1;
      sign *= o[k];
    }
    c += sign * probability_value(seq, o);
  }
  return c;
}

MeasurementSequence qubit_sequence(const std::vector<double>& times_s) {
  MeasurementSequence s;
  for (std::size_t k = 0; k < times_s.size(); ++k) {
    TimedMeasurement m;
    // Appended, not "t" + to_string(...): GCC 12 gives a false -Wrestrict on the latter.
    m.label = "t";
    m.label += std::to_string(k + 1);
    m.time_s = times_s[k];
    s.steps.push_back(m);
  }
  return s;
}

}  // namespace macroreal
