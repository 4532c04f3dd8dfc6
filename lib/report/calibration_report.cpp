#include "report/calibration_report.hpp"

#include <cmath>
#include <cstdio>
#include <vector>

#include "report/text_layout.hpp"

namespace macroreal {

namespace {

using nlohmann::ordered_json;
using detail::Table;
using detail::wrap;

std::string sig(double x, int digits = 4) {
  if (!std::isfinite(x)) return "n/a";
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*g", digits, x);
  return buf;
}

ordered_json number_or_null(double x) { return std::isfinite(x) ? ordered_json(x) : ordered_json(nullptr); }

ordered_json interval_json(const CalibrationEstimate& iv, double level) {
  return {{"estimate", iv.estimate}, {"ci", {iv.lo, iv.hi}}, {"level", level}};
}

std::vector<std::string> assumptions(const CalibrationResult& r) {
  std::vector<std::string> a = {
      "Counts in one detection window are Poisson for a state that does not change during the "
      "window (shot noise only; no detector dead time, no afterpulsing, no laser-intensity "
      "fluctuations between shots).",
      "Stationarity: the dark and bright rates are the same for every calibration shot and for "
      "the experiment the calibration is applied to.",
      "Labelled reference shots are prepared perfectly in their state; preparation errors show "
      "up as misassignment.",
  };
  if (r.dark_lifetime_s)
    a.push_back("Decay model: the dark state is pumped to bright after an exponentially distributed "
                "time with the declared mean " + sig(*r.dark_lifetime_s) +
                " s and fluoresces at the bright rate afterwards; the bright state does not decay. "
                "The lifetime is taken as given, not fitted, and the intervals do not include its uncertainty.");
  else
    a.push_back("No decay model: the dark state stays dark for the whole window (declare a dark "
                "lifetime with --dark-lifetime if it is pumped to bright).");
  a.push_back("The threshold minimises the sum of both errors (equal weight on dark and bright); "
              "intervals are percentile bootstrap intervals at that fixed threshold.");
  return a;
}

std::vector<std::string> not_established(const CalibrationResult&) {
  return {
      "That the count model is right: a good fit p-value only fails to reject it for this histogram.",
      "Error rates for a different window, laser power or day; the window table is a model "
      "extrapolation at fixed rates per second.",
      "Errors from state preparation versus detection: the two are not separated.",
      "The readout errors inside a sequence (back-action of a misread bright shot on the "
      "oscillator): not measured here. analyse --correct-readout models them with a declared "
      "continuation (by default later results are fair coin flips), which this calibration does not test.",
  };
}

}  // namespace

ordered_json calibration_result_json(const CalibrationResult& r) {
  ordered_json j;
  j["format"] = "macroreal-calibration/1";
  j["rates"] = {{"dark", interval_json(r.dark_rate, r.level)}, {"bright", interval_json(r.bright_rate, r.level)}};
  j["threshold"] = r.threshold;
  j["errors"] = {{"dark_read_bright", interval_json(r.dark_read_bright, r.level)},
                 {"bright_read_dark", interval_json(r.bright_read_dark, r.level)}};
  j["window_s"] = r.window_s;
  if (r.dark_lifetime_s)
    j["decay"] = {{"model", "dark-pumped-to-bright"}, {"dark_lifetime_s", *r.dark_lifetime_s}};
  else
    j["decay"] = nullptr;
  j["shots"] = r.rows;
  j["source_file"] = r.file;
  j["rows"] = {{"read", r.rows}, {"used", r.rows}, {"rejected", 0},
               {"dark", r.dark_shots}, {"bright", r.bright_shots}, {"unknown", r.unknown_shots}};
  j["fit"] = {{"method", r.fit.method}, {"log_likelihood", r.fit.log_likelihood},
              {"iterations", r.fit.iterations}, {"converged", r.fit.converged},
              {"free_parameters", r.fit.free_parameters},
              {"unknown_bright_fraction", r.unknown_shots > 0 ? interval_json(r.bright_fraction, r.level)
                                                              : ordered_json(nullptr)},
              {"pump_per_window", r.fit.model.pump_per_window}};
  j["goodness_of_fit"] = {{"method", "Pearson chi-square and G over bins pooled to expected >= 5"},
                          {"pearson", r.gof.pearson}, {"g", r.gof.g_statistic},
                          {"bins", r.gof.bins}, {"df", r.gof.df},
                          {"pearson_p_value", number_or_null(r.gof.pearson_p)},
                          {"g_p_value", number_or_null(r.gof.g_p)}};
  j["thresholds"] = {
      {"minimum_error", {{"threshold", r.minimum_error.threshold},
                         {"dark_read_bright", r.minimum_error.errors.dark_read_bright},
                         {"bright_read_dark", r.minimum_error.errors.bright_read_dark},
                         {"total", r.minimum_error.errors.total()}}},
      {"balanced", {{"threshold", r.balanced.threshold},
                    {"dark_read_bright", r.balanced.errors.dark_read_bright},
                    {"bright_read_dark", r.balanced.errors.bright_read_dark},
                    {"total", r.balanced.errors.total()}}}};
  j["bootstrap"] = {{"method", "percentile, each group resampled with its own size"},
                    {"replicates", r.bootstrap_replicates}, {"failures", r.bootstrap_failures},
                    {"seed", r.seed}};
  j["observed_misreads"] = {{"dark_above_threshold", r.dark_above}, {"dark_shots", r.dark_shots},
                            {"bright_at_or_below_threshold", r.bright_at_or_below},
                            {"bright_shots", r.bright_shots}};
  ordered_json table = ordered_json::array();
  for (const auto& w : r.window_table)
    table.push_back({{"factor", w.factor}, {"window_s", r.window_table_in_seconds ? ordered_json(w.window_s) : ordered_json(nullptr)},
                     {"dark_rate", w.model.dark_rate}, {"bright_rate", w.model.bright_rate},
                     {"threshold", w.best.threshold},
                     {"dark_read_bright", w.best.errors.dark_read_bright},
                     {"bright_read_dark", w.best.errors.bright_read_dark},
                     {"total", w.best.errors.total()}});
  j["window_table"] = table;
  j["assumptions"] = assumptions(r);
  j["not_established"] = not_established(r);
  return j;
}

std::string calibration_result_json_text(const CalibrationResult& r) {
  return calibration_result_json(r).dump(2) + "\n";
}

std::string calibration_result_text(const CalibrationResult& r) {
  const std::string lvl = sig(100 * r.level, 3) + " %";
  auto ci = [&](const CalibrationEstimate& iv) {  // built piecewise: GCC 12 gives a false -Wrestrict otherwise
    std::string s = "[";
    s += sig(iv.lo);
    s += ", ";
    s += sig(iv.hi);
    s += "]";
    return s;
  };
  std::string out = "macroreal calibrate\n";
  out += "  counts    " + r.file + "\n";
  out += "  rows      read " + std::to_string(r.rows) + ", used " + std::to_string(r.rows) +
         ", rejected 0 (dark " + std::to_string(r.dark_shots) + ", bright " + std::to_string(r.bright_shots) +
         ", unknown " + std::to_string(r.unknown_shots) + ")\n";
  out += "  window    " + (r.window_s > 0 ? sig(r.window_s) + " s" : std::string("not given")) + "\n";
  out += "  model     " + std::string(r.dark_lifetime_s ? "two Poisson rates, dark pumped to bright (lifetime " +
                                                            sig(*r.dark_lifetime_s) + " s, " +
                                                            sig(r.fit.model.pump_per_window) + " per window)"
                                                      : "two Poisson rates, no decay") + "\n";
  out += "  fit       " + r.fit.method + ", " + std::to_string(r.fit.iterations) + " iterations, " +
         (r.fit.converged ? "converged" : "NOT converged") + "\n";
  out += "  level     " + lvl + "   seed " + std::to_string(r.seed) + "   bootstrap B = " +
         std::to_string(r.bootstrap_replicates) + " (" + std::to_string(r.bootstrap_failures) + " failed)\n\n";

  out += "Rates (mean counts per window)\n";
  Table rates({false, true, true});
  rates.row({"", "estimate", lvl + " interval"});
  rates.row({"dark", sig(r.dark_rate.estimate), ci(r.dark_rate)});
  rates.row({"bright", sig(r.bright_rate.estimate), ci(r.bright_rate)});
  if (r.unknown_shots > 0) rates.row({"bright fraction of unknown shots", sig(r.bright_fraction.estimate), ci(r.bright_fraction)});
  out += rates.str() + "\n";

  out += "Goodness of fit (bins pooled to expected >= 5)\n";
  out += "  Pearson chi-square " + sig(r.gof.pearson) + ", G " + sig(r.gof.g_statistic) + ", " +
         std::to_string(r.gof.bins) + " bins, df " + std::to_string(r.gof.df) + ", p = " +
         sig(r.gof.pearson_p, 3) + " (Pearson), " + sig(r.gof.g_p, 3) + " (G)\n";
  if (std::isfinite(r.gof.pearson_p) && r.gof.pearson_p < 0.01)
    out += wrap("the count model does not describe these histograms (p < 0.01); the error rates "
                "below rest on it. Consider a decay model (--dark-lifetime) or check stationarity.",
                "  warning: ", "           ");
  out += "\n";

  out += "Thresholds (a count <= t reads dark)\n";
  Table th({false, true, true, true, true});
  th.row({"", "t", "dark read bright", "bright read dark", "total"});
  th.row({"minimum total error (used)", std::to_string(r.minimum_error.threshold),
          sig(r.minimum_error.errors.dark_read_bright), sig(r.minimum_error.errors.bright_read_dark),
          sig(r.minimum_error.errors.total())});
  th.row({"balanced errors", std::to_string(r.balanced.threshold), sig(r.balanced.errors.dark_read_bright),
          sig(r.balanced.errors.bright_read_dark), sig(r.balanced.errors.total())});
  out += th.str() + "\n";

  out += "Misassignment at t = " + std::to_string(r.threshold) + "\n";
  Table mis({false, true, true, true});
  mis.row({"", "model estimate", lvl + " interval", "observed in reference shots"});
  mis.row({"dark read bright", sig(r.dark_read_bright.estimate), ci(r.dark_read_bright),
           r.dark_shots > 0 ? std::to_string(r.dark_above) + " of " + std::to_string(r.dark_shots) : "no dark shots"});
  mis.row({"bright read dark", sig(r.bright_read_dark.estimate), ci(r.bright_read_dark),
           r.bright_shots > 0 ? std::to_string(r.bright_at_or_below) + " of " + std::to_string(r.bright_shots)
                              : "no bright shots"});
  out += mis.str() + "\n";

  out += "Error versus window length (same rates per second, best threshold at each window)\n";
  Table wt({true, true, true, true, true, true, true});
  wt.row({"window", r.window_table_in_seconds ? "seconds" : "", "dark rate", "bright rate", "t",
          "dark read bright", "bright read dark"});
  for (const auto& w : r.window_table)
    wt.row({"x " + sig(w.factor, 3), r.window_table_in_seconds ? sig(w.window_s, 3) : "", sig(w.model.dark_rate),
            sig(w.model.bright_rate), std::to_string(w.best.threshold), sig(w.best.errors.dark_read_bright, 3),
            sig(w.best.errors.bright_read_dark, 3)});
  out += wt.str() + "\n";

  out += "Assumptions\n";
  for (const auto& a : assumptions(r)) out += wrap(a, "  - ", "    ");
  out += "\nWhat this calibration does not establish\n";
  for (const auto& a : not_established(r)) out += wrap(a, "  - ", "    ");
  return out;
}

}  // namespace macroreal
