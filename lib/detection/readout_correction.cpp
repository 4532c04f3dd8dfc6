#include "detection/readout_correction.hpp"

#include "core/error.hpp"
#include "phase_space/number_text.hpp"

namespace macroreal {

double corrected_dark_probability(double p_obs, double e1, double e2) {
  using detail::number_text;
  if (!(e1 >= 0 && e1 < 1)) throw DomainError("dark_read_bright = " + number_text(e1) + ", but must be in [0, 1)");
  if (!(e2 >= 0 && e2 < 1)) throw DomainError("bright_read_dark = " + number_text(e2) + ", but must be in [0, 1)");
  if (!(e1 + e2 < 1))
    throw DomainError("dark_read_bright + bright_read_dark = " + number_text(e1 + e2) +
                      ", but must be below 1 (otherwise the readout carries no information)");
  return (p_obs - e2) / (1 - e1 - e2);
}

}  // namespace macroreal
