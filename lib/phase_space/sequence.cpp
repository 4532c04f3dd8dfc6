// Measurement sequences and outcome strings (sequence.hpp).
#include "phase_space/sequence.hpp"

#include <cmath>

#include "core/error.hpp"
#include "phase_space/number_text.hpp"

namespace macroreal {

namespace {

std::string step_name(const TimedMeasurement& s, std::size_t i) {
  return s.label.empty() ? "step " + std::to_string(i + 1) : "step " + s.label;
}

}  // namespace

void MeasurementSequence::validate() const {
  noise.validate();
  for (std::size_t i = 0; i < steps.size(); ++i) {
    const auto& s = steps[i];
    try {
      s.measurement.validate();
    } catch (const DomainError& e) {
      throw DomainError(step_name(s, i) + ": " + e.what());
    }
    if (!(std::isfinite(s.time_s) && s.time_s >= 0.0))
      throw DomainError(step_name(s, i) + ": time_s = " + detail::number_text(s.time_s) +
                        ", but must be finite and >= 0");
    if (!(std::isfinite(s.duration_s) && s.duration_s >= 0.0))
      throw DomainError(step_name(s, i) + ": duration_s = " +
                        detail::number_text(s.duration_s) + ", but must be finite and >= 0");
    // Relative slack of 1e-12 for end times written as sums of decimal numbers.
    if (i > 0 && steps[i - 1].duration_s > 0.0 &&
        s.time_s < steps[i - 1].end_s() - 1e-12 * steps[i - 1].end_s())
      throw DomainError(step_name(s, i) + ": time_s = " + detail::number_text(s.time_s) +
                        " is before the interaction of " + step_name(steps[i - 1], i - 1) +
                        " (time_s " + detail::number_text(steps[i - 1].time_s) +
                        ", duration_s " + detail::number_text(steps[i - 1].duration_s) +
                        ") has ended");
    if (i > 0 && s.time_s < steps[i - 1].time_s)
      throw DomainError(step_name(s, i) + ": time_s = " + detail::number_text(s.time_s) +
                        " is earlier than " + step_name(steps[i - 1], i - 1) + " at " +
                        detail::number_text(steps[i - 1].time_s) +
                        ", but times must not decrease along a sequence");
  }
}

bool MeasurementSequence::has_durations() const {
  for (const auto& s : steps)
    if (s.duration_s > 0.0) return true;
  return false;
}

std::string to_string(const OutcomeString& o) {
  std::string s;
  s.reserve(o.size());
  for (int v : o) {
    if (v != 1 && v != -1)
      throw DomainError("outcome = " + std::to_string(v) + ", but must be +1 or -1");
    s.push_back(v > 0 ? '+' : '-');
  }
  return s;
}

OutcomeString parse_outcomes(const std::string& s) {
  OutcomeString o;
  o.reserve(s.size());
  for (char ch : s) {
    if (ch == '+') o.push_back(1);
    else if (ch == '-') o.push_back(-1);
    else
      throw DomainError("outcomes = \"" + s + "\", but must contain only '+' and '-'");
  }
  return o;
}

}  // namespace macroreal
