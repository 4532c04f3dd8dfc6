// Reading calibration counts (DESIGN.md section 8): CSV with header `label,count` (and an
// optional `window_s`), one row per shot; `label` is dark, bright (reference shots prepared in
// that state) or unknown (a mixture of both); `#` lines are comments, extra columns are ignored.
// The result is three histograms. Bad rows are InputErrors naming the file, line and field;
// nothing is skipped silently (a calibration is small, so one bad row stops the read).
#pragma once

#include <string>
#include <vector>

namespace macroreal {

struct CountHistograms {
  // histogram[n] = number of shots with n counts (trailing zeros trimmed; may be empty).
  std::vector<long> dark, bright, unknown;
  long rows = 0;           // data rows read (= shots)
  double window_s = 0;     // from the window_s column (0: absent)
  std::string file;        // for messages

  long total(const std::vector<long>& h) const;
};

CountHistograms read_calibration_counts(const std::string& path);
CountHistograms parse_calibration_counts(const std::string& text, const std::string& file_label);

// Sum and count of a histogram.
long histogram_shots(const std::vector<long>& h);
double histogram_sum(const std::vector<long>& h);

}  // namespace macroreal
