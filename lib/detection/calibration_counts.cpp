#include "detection/calibration_counts.hpp"

#include <charconv>
#include <cmath>
#include <fstream>
#include <iterator>
#include <sstream>

#include "core/error.hpp"
#include "phase_space/number_text.hpp"

namespace macroreal {

namespace {

std::string trim(std::string s) {
  const auto b = s.find_first_not_of(" \t\r");
  if (b == std::string::npos) return "";
  const auto e = s.find_last_not_of(" \t\r");
  return s.substr(b, e - b + 1);
}

std::vector<std::string> split(const std::string& line) {
  std::vector<std::string> out;
  std::string cell;
  std::istringstream in(line);
  while (std::getline(in, cell, ',')) out.push_back(trim(cell));
  if (!line.empty() && line.back() == ',') out.push_back("");
  return out;
}

// Histograms stay short for realistic counts; a huge count is almost surely a unit error.
constexpr long kMaxCount = 1000000;

}  // namespace

long histogram_shots(const std::vector<long>& h) {
  long s = 0;
  for (long v : h) s += v;
  return s;
}

double histogram_sum(const std::vector<long>& h) {
  double s = 0;
  for (std::size_t n = 0; n < h.size(); ++n) s += static_cast<double>(n) * static_cast<double>(h[n]);
  return s;
}

long CountHistograms::total(const std::vector<long>& h) const { return histogram_shots(h); }

CountHistograms parse_calibration_counts(const std::string& text, const std::string& file_label) {
  CountHistograms out;
  out.file = file_label;
  std::istringstream in(text);
  std::string line;
  long line_no = 0;
  int label_col = -1, count_col = -1, window_col = -1;
  bool have_header = false;
  long window_line = 0;
  auto fail = [&](const std::string& where, const std::string& message) {
    throw InputError(file_label, where, message);
  };
  while (std::getline(in, line)) {
    ++line_no;
    const std::string t = trim(line);
    if (t.empty() || t[0] == '#') continue;
    const auto cells = split(t);
    if (!have_header) {
      for (std::size_t i = 0; i < cells.size(); ++i) {
        if (cells[i] == "label") label_col = static_cast<int>(i);
        else if (cells[i] == "count") count_col = static_cast<int>(i);
        else if (cells[i] == "window_s") window_col = static_cast<int>(i);
      }
      const std::string where = "line " + std::to_string(line_no);
      if (label_col < 0) fail(where, "header has no `label` column (expected label,count[,window_s])");
      if (count_col < 0) fail(where, "header has no `count` column (expected label,count[,window_s])");
      have_header = true;
      continue;
    }
    const std::string where = "line " + std::to_string(line_no);
    auto cell = [&](int col) -> std::string {
      return col < static_cast<int>(cells.size()) ? cells[static_cast<std::size_t>(col)] : "";
    };
    const std::string label = cell(label_col);
    std::vector<long>* h = nullptr;
    if (label == "dark") h = &out.dark;
    else if (label == "bright") h = &out.bright;
    else if (label == "unknown") h = &out.unknown;
    else fail(where + ", field label", "`" + label + "` is not one of dark, bright, unknown");

    const std::string c = cell(count_col);
    if (c.empty()) fail(where + ", field count", "empty (a photon count is required)");
    if (c[0] == '-') fail(where + ", field count", "`" + c + "` is negative; photon counts are >= 0");
    long n = 0;
    const auto [ptr, ec] = std::from_chars(c.data(), c.data() + c.size(), n);
    if (ec != std::errc() || ptr != c.data() + c.size())
      fail(where + ", field count", "`" + c + "` is not a non-negative integer photon count");
    if (n > kMaxCount)
      fail(where + ", field count", "`" + c + "` exceeds " + std::to_string(kMaxCount) + " counts per window");
    if (static_cast<long>(h->size()) <= n) h->resize(static_cast<std::size_t>(n) + 1, 0);
    ++(*h)[static_cast<std::size_t>(n)];

    if (window_col >= 0) {
      const std::string w = cell(window_col);
      if (!w.empty()) {
        double v = 0;
        try {
          std::size_t used = 0;
          v = std::stod(w, &used);
          if (used != w.size()) throw std::invalid_argument(w);
        } catch (const std::exception&) {
          fail(where + ", field window_s", "`" + w + "` is not a number");
        }
        if (!(v > 0) || !std::isfinite(v))
          fail(where + ", field window_s", "`" + w + "` must be a positive duration in seconds");
        if (out.window_s == 0) {
          out.window_s = v;
          window_line = line_no;
        } else if (v != out.window_s) {
          fail(where + ", field window_s",
               "`" + w + "` differs from " + detail::number_text(out.window_s) + " on line " +
                   std::to_string(window_line) + "; calibrate one window length at a time");
        }
      }
    }
    ++out.rows;
  }
  if (!have_header) fail("", "no header line (expected label,count[,window_s])");
  if (out.rows == 0) fail("", "no data rows after the header");
  return out;
}

CountHistograms read_calibration_counts(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path, "", "cannot open the calibration counts file");
  const std::string text{std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
  return parse_calibration_counts(text, path);
}

}  // namespace macroreal
