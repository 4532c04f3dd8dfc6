// `macroreal calibrate COUNTS.csv [--json] [--seed S] [--bootstrap B] [--level L]
//  [--dark-lifetime S] [--window-s S] [--window-table LIST] [--write-calibration FILE] [-o FILE|-]`:
// photon-count calibration of a fluorescence readout (lib/detection/calibration.hpp), printed
// as a text report or JSON (lib/report/calibration_report.hpp), and optionally the calibration
// file that analyse and simulate read. Thin: parse, call the library, print. The output is
// built before anything is written, so an error leaves stdout empty (exit code 2).
#include <fstream>
#include <iostream>
#include <memory>

#include "apps/commands.hpp"
#include "core/error.hpp"
#include "detection/calibration.hpp"
#include "detection/calibration_counts.hpp"
#include "detection/calibration_file.hpp"
#include "report/calibration_figures.hpp"
#include "report/calibration_report.hpp"

namespace macroreal::apps {

namespace {

struct CalibrateArgs {
  std::string counts;
  bool json = false;
  std::string output = "-";
  std::string calibration_out;
  std::uint64_t seed = 1;
  int bootstrap = 1000;
  double level = 0.95;
  double dark_lifetime_s = 0;
  double window_s = 0;
  std::vector<double> window_table;
  std::string figures;  // folder for the figures; empty: none
};

int run_calibrate(const CalibrateArgs& a) {
  const CountHistograms h = a.counts == "-" ? parse_calibration_counts(read_input("-"), input_label("-"))
                                            : read_calibration_counts(a.counts);
  CalibrationOptions o;
  o.seed = a.seed;
  o.bootstrap_replicates = a.bootstrap;
  o.level = a.level;
  if (a.dark_lifetime_s > 0) o.dark_lifetime_s = a.dark_lifetime_s;
  o.window_s = a.window_s;
  o.table_windows = a.window_table;
  const CalibrationResult r = calibrate_counts(h, o);
  std::string text = a.json ? calibration_result_json_text(r) : calibration_result_text(r);
  if (!a.figures.empty()) {
    const auto paths = write_figures(calibration_figures(h, r), a.figures);
    if (!a.json) text += "\n" + figures_written_line(a.figures, paths);
  }
  if (!a.calibration_out.empty()) write_calibration(to_calibration(r), a.calibration_out);
  if (a.output == "-") {
    std::cout << text << std::flush;
  } else {
    std::ofstream out(a.output, std::ios::binary);
    if (!(out << text) || !out.flush()) throw InputError(a.output, "", "cannot write the output file");
  }
  return 0;
}

}  // namespace

void register_calibrate(CLI::App& app) {
  auto args = std::make_shared<CalibrateArgs>();
  auto* cmd = app.add_subcommand(
      "calibrate",
      "Photon-count calibration of a fluorescence readout: dark and bright rates (two-Poisson "
      "mixture fit over labelled and unlabelled shots), goodness of fit, the threshold, the two "
      "misassignment probabilities with bootstrap intervals, and error versus window length");
  cmd->add_option("counts", args->counts, "calibration counts CSV: label,count[,window_s], label dark|bright|unknown; - reads stdin")
      ->required();
  cmd->add_flag("--json", args->json, "write one JSON object (a valid calibration file plus fit diagnostics)");
  cmd->add_option("-o,--output", args->output, "write the report to FILE instead of standard output (- : stdout)")
      ->type_name("FILE|-");
  cmd->add_option("--write-calibration", args->calibration_out,
                  "also write the calibration file (macroreal-calibration/1) for analyse and simulate")
      ->type_name("FILE");
  cmd->add_option("--seed", args->seed, "seed of the bootstrap (default 1; same seed, same bytes)");
  cmd->add_option("--bootstrap", args->bootstrap, "bootstrap replicates (default 1000, at least 100)")
      ->check(CLI::Range(100, 1000000));
  cmd->add_option("--level", args->level, "confidence level of the intervals (default 0.95)")
      ->check(CLI::Range(0.5, 0.9999));
  cmd->add_option("--dark-lifetime", args->dark_lifetime_s,
                  "seconds: the dark state is pumped to bright with this mean lifetime during the "
                  "window (decay model; needs the window length)")
      ->check(CLI::PositiveNumber);
  cmd->add_option("--window-s", args->window_s, "detection window in seconds (overrides the file's window_s)")
      ->check(CLI::PositiveNumber);
  cmd->add_option("--window-table", args->window_table,
                  "window lengths for the trade-off table: seconds when the window is known, else "
                  "multiples of it (default 0.25,0.5,1,2,4 times the window)")
      ->delimiter(',')
      ->type_name("LIST");
  cmd->add_option("--figures", args->figures,
                  "write SVG and PNG figures into DIR (created if missing): the count histogram with "
                  "the fitted mixture, its two components and the thresholds")
      ->type_name("DIR");
  cmd->footer(
      "Examples:\n"
      "  macroreal calibrate example_runs/calibration_counts.csv\n"
      "  macroreal calibrate example_runs/calibration_counts.csv --figures figs\n"
      "  macroreal calibrate example_runs/calibration_counts.csv --json --write-calibration cal.json\n"
      "  macroreal calibrate counts.csv --dark-lifetime 0.02 --window-table 1e-4,2e-4,4e-4\n"
      "Exit codes: 0 success, 2 bad input (the message names the file, line and field, or why the "
      "data cannot identify two rates).");
  cmd->callback([args] { set_action([args] { return run_calibrate(*args); }); });
}

namespace {
const CommandRegistration calibrate_registration{60, "calibrate", register_calibrate};
}  // namespace

}  // namespace macroreal::apps
