#include "report/text_layout.hpp"

#include <algorithm>
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

}  // namespace macroreal::detail
