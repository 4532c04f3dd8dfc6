// Short decimal text of a number for error messages ("contrast = 1.2, but must be in [0, 1]").
#pragma once

#include <string>

namespace macroreal::detail {

std::string number_text(double v);  // up to 12 significant digits, no trailing zeros

}  // namespace macroreal::detail
