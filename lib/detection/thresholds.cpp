#include "detection/thresholds.hpp"

#include <cmath>

namespace macroreal {

long threshold_scan_limit(const CountModel& m) {
  return static_cast<long>(std::ceil(m.bright_rate + 12 * std::sqrt(m.bright_rate) + 12));
}

namespace {

template <class Score>
ThresholdChoice scan(const CountModel& m, Score score) {
  validate(m);
  ThresholdChoice best;
  best.errors = misassignment(m, 0);
  double best_score = score(best.errors);
  const long limit = threshold_scan_limit(m);
  for (long t = 1; t <= limit; ++t) {
    const Misassignment e = misassignment(m, t);
    const double s = score(e);
    if (s < best_score) {
      best_score = s;
      best = {t, e};
    }
  }
  return best;
}

}  // namespace

ThresholdChoice minimum_error_threshold(const CountModel& m) {
  return scan(m, [](const Misassignment& e) { return e.total(); });
}

ThresholdChoice balanced_threshold(const CountModel& m) {
  return scan(m, [](const Misassignment& e) { return std::abs(e.dark_read_bright - e.bright_read_dark); });
}

}  // namespace macroreal
