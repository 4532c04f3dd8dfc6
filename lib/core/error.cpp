#include "core/error.hpp"

namespace macroreal {

void invariant_failed(const char* expr, const char* file, int line) {
  throw InvariantError(std::string("internal check failed: ") + expr + " at " + file + ":" +
                       std::to_string(line));
}

}  // namespace macroreal
