#include "report/text_layout.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>

namespace macroreal::detail {

std::string Table::str(const std::string& indent) const {
  std::vector<std::size_t> w(right_.size(), 0);
  for (const auto& r : rows_)
    for (std::size_t c = 0; c < r.size() && c < w.size(); ++c) w[c] = std::max(w[c], r[c].size());
  std::string out;
  for (const auto& r : rows_) {
    std::string line = indent;
    for (std::size_t c = 0; c < w.size(); ++c) {
      const std::string cell = c < r.size() ? r[c] : "";
      const std::string pad(w[c] - cell.size(), ' ');
      line += right_[c] ? pad + cell : cell + pad;
      if (c + 1 < w.size()) line += "  ";
    }
    while (!line.empty() && line.back() == ' ') line.pop_back();
    out += line + "\n";
  }
  return out;
}

std::string wrap(const std::string& text, const std::string& first, const std::string& rest,
                 std::size_t width) {
  std::istringstream in(text);
  std::string word, line = first, out;
  bool empty = true;
  while (in >> word) {
    if (!empty && line.size() + 1 + word.size() > width) {
      out += line + "\n";
      line = rest;
      empty = true;
    }
    line += (empty ? "" : " ") + word;
    empty = false;
  }
  return out + line + "\n";
}

std::string fixed_decimals(double x, int digits) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", digits, x);
  return buf;
}

std::string estimate_text(double x, int digits) {
  if (!std::isfinite(x)) return "n/a";
  std::string s = fixed_decimals(x, digits);
  if (s.find_first_not_of("-0.") == std::string::npos && s[0] == '-') s.erase(0, 1);
  return s;
}

std::string p_value_text(double p) {
  if (!std::isfinite(p)) return "n/a";
  char buf[64];
  if (p < 1e-4) std::snprintf(buf, sizeof buf, "%.2e", p);
  else std::snprintf(buf, sizeof buf, "%.4f", p);
  return buf;
}

}  // namespace macroreal::detail
