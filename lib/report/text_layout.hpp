// Plain-text layout shared by the readable reports and figure labels of every command:
// fixed-width tables (column widths from the content), word wrapping with hanging indents and
// the number formats. Deterministic: the same content gives the same bytes.
#pragma once

#include <string>
#include <vector>

namespace macroreal::detail {

// A fixed-width table: column widths from the content, two spaces between columns,
// trailing spaces removed.
class Table {
 public:
  explicit Table(std::vector<bool> right_aligned) : right_(std::move(right_aligned)) {}
  void row(std::vector<std::string> cells) { rows_.push_back(std::move(cells)); }
  std::string str(const std::string& indent = "  ") const;

 private:
  std::vector<bool> right_;
  std::vector<std::vector<std::string>> rows_;
};

// Word wrap at `width` columns; the first line starts with `first`, the others with `rest`.
std::string wrap(const std::string& text, const std::string& first, const std::string& rest,
                 std::size_t width = 96);

// `x` with `digits` decimals, printf-style ("%.*f").
std::string fixed_decimals(double x, int digits);

// A reported estimate: "n/a" when not finite, and no "-0.0000" (a sign the rounding made
// meaningless would read as a direction).
std::string estimate_text(double x, int digits = 4);

// A p-value: four decimals, scientific below 1e-4 so small values keep their magnitude.
std::string p_value_text(double p);

}  // namespace macroreal::detail
