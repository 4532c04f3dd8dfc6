// Sub-sequences and the closed-form NSIT decomposition (temporal_tests.hpp).
#include "phase_space/temporal_tests.hpp"

#include <cmath>
#include <sstream>

#include "core/error.hpp"

namespace macroreal {

MeasurementSequence subsequence(const MeasurementSequence& all, const std::vector<int>& steps) {
  MeasurementSequence r;
  r.noise = all.noise;
  r.steps.reserve(steps.size());
  int last = -1;
  for (int i : steps) {
    if (i < 0 || i >= static_cast<int>(all.steps.size()) || i <= last)
      throw DomainError("sub-sequence step index " + std::to_string(i) +
                        ", but indices must increase and lie in [0, " +
                        std::to_string(all.steps.size()) + ")");
    r.steps.push_back(all.steps[i]);
    last = i;
  }
  return r;
}

SignallingDecomposition nsit_decomposition(const State& state, const MeasurementSequence& all,
                                           int a, int b) {
  if (all.noise.has_rotations())
    throw UnsupportedError(
        "NSIT decomposition: not available with dephasing or frequency noise (rotations)");
  const auto two = subsequence(all, {a, b});  // checks a < b and the range
  two.validate();
  for (const auto& step : two.steps)
    if (step.duration_s > 0.0) {
      std::ostringstream os;
      os.precision(6);
      os << "NSIT decomposition: measurement '" << step.label << "' has duration_s = "
         << step.duration_s << " s; the closed form assumes instantaneous measurements and "
         << "does not model noise during a finite interaction";
      throw UnsupportedError(os.str());
    }
  const auto& ma = two.steps[0].measurement;
  const auto& mb = two.steps[1].measurement;
  const auto to_a = GaussianChannel::over(all.noise, two.steps[0].time_s);
  const auto a_to_b = GaussianChannel::over(all.noise, two.steps[1].time_s - two.steps[0].time_s);
  const cplx g = mb.beta * a_to_b.shrink;                       // gamma' at t_A
  const double s = std::exp(-a_to_b.diffusion * std::norm(mb.beta));
  // chi_A(g') = exp(-D_0 |g'|^2) chi(g' shrink_0).
  const cplx chi_a = std::exp(-to_a.diffusion * std::norm(g)) * state.characteristic(g * to_a.shrink);
  SignallingDecomposition r;
  r.overlap = s * chi_a;
  r.geometric_phase_rad = ma.beta.imag() * g.real() - ma.beta.real() * g.imag();  // Im(beta_A g*)
  const double th = r.geometric_phase_rad;
  if (ma.split == Split::symmetric) {
    r.kick_phase_rad = 0.0;
    r.f = std::cos(th);
  } else {
    r.kick_phase_rad = -th;
    r.f = std::polar(std::cos(th), -th);
  }
  r.S = 0.5 * mb.contrast * (std::polar(1.0, mb.phase_rad) * r.overlap * (1.0 - r.f)).real();
  return r;
}

}  // namespace macroreal
