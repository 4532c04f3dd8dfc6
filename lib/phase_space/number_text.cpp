#include "phase_space/number_text.hpp"

#include <sstream>

namespace macroreal::detail {

std::string number_text(double v) {
  std::ostringstream os;
  os.precision(12);
  os << v;
  return os.str();
}

}  // namespace macroreal::detail
