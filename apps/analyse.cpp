// `macroreal analyse RUNS --protocol P.json [--json] [--level L] [--seed S] [--bootstrap B]
// [--on-bad-row error|skip] [--threshold T] [--margin M] [--counts] [--calibration FILE]
// [--correct-readout [--misread-continuation fair|dark=P]] [-o FILE|-]`: estimates,
// intervals and tests of a finished campaign (lib/stats/analysis.hpp), printed as a text
// report or JSON (lib/report/analysis_report.hpp). RUNS is an outcome table (CSV) or a counts
// JSON, told apart by --counts, the extension or the content; "-" reads standard input.
// Thin: parse the options, call the library, print. The whole output is built before anything
// is written, so an error leaves stdout empty (main() prints the message, exit code 2).
#include <fstream>
#include <iostream>
#include <iterator>
#include <memory>
#include <optional>

#include "apps/commands.hpp"
#include "core/error.hpp"
#include "detection/calibration_file.hpp"
#include "detection/count_threshold_choice.hpp"
#include "detection/readout_corrected_analysis.hpp"
#include "phase_space/number_text.hpp"
#include "protocol/protocol_reader.hpp"
#include "report/analysis_figures.hpp"
#include "report/analysis_report.hpp"
#include "report/analysis_report_directory.hpp"
#include "stats/analysis.hpp"
#include "stats/analysis_check.hpp"
#include "stats/runs_input.hpp"

namespace macroreal::apps {

namespace {

struct AnalyseArgs {
  std::string runs;
  std::string protocol;
  bool json = false;
  double level = 0.95;
  std::uint64_t seed = kDefaultAnalysisSeed;
  long bootstrap = 10000;
  std::string on_bad_row = "error";
  std::optional<double> threshold;
  std::optional<double> margin;
  bool counts = false;
  std::string calibration;           // --calibration FILE
  bool correct_readout = false;      // --correct-readout
  std::string misread_continuation;  // --misread-continuation (empty: not given)
  std::string output = "-";
  std::string figures_dir;           // --figures DIR (empty: none)
  std::string report_dir;            // --report DIR (empty: none)
  std::vector<std::string> check;  // tests whose verdict sets the exit code
};

// The command line as the shell passed it (argv joined by spaces; an argument with spaces or
// shell specials is single-quoted so the line can be run again). Read from /proc/self/cmdline
// so that main() needs no change; "" where that file does not exist.
std::string command_line_as_run() {
  std::ifstream in("/proc/self/cmdline", std::ios::binary);
  const std::string raw{std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
  std::string line, arg;
  auto flush = [&] {
    const bool plain = !arg.empty() && arg.find_first_not_of(
        "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-_./=:,+@%") == std::string::npos;
    std::string quoted = plain ? arg : "'";
    if (!plain) {
      for (char c : arg) quoted += c == '\'' ? std::string("'\\''") : std::string(1, c);
      quoted += '\'';
    }
    line += (line.empty() ? "" : " ") + quoted;
    arg.clear();
  };
  for (char c : raw) {
    if (c == '\0') flush();
    else arg += c;
  }
  if (!arg.empty()) flush();
  return line;
}

int run_analyse(const AnalyseArgs& args) {
  ProtocolReadOptions read;
  read.generate_needed_sequences = true;  // the data may name the generated sequences
  read.require_state = false;
  if (args.protocol == "-" && args.runs == "-")
    throw InputError("", "--protocol", "the runs already read standard input; give the protocol as a file");
  const Protocol proto = args.protocol == "-"
                             ? parse_protocol_text(read_input("-"), input_label("-"), read)
                             : read_protocol(args.protocol, read);

  std::optional<Calibration> calibration;
  if (!args.calibration.empty()) calibration = read_calibration(args.calibration);
  if (!args.misread_continuation.empty() && !args.correct_readout)
    throw DomainError("--misread-continuation " + args.misread_continuation +
                      " needs --correct-readout (it only describes how the correction models a misread bright)");
  const MisreadContinuation continuation =
      parse_misread_continuation(args.misread_continuation.empty() ? "fair" : args.misread_continuation);
  if (args.correct_readout && calibration && args.threshold && *args.threshold != calibration->threshold)
    throw DomainError("--correct-readout with --threshold " + detail::number_text(*args.threshold) +
                      ": the error rates of " + args.calibration + " hold at its threshold " +
                      detail::number_text(calibration->threshold) +
                      " only; leave --threshold out or calibrate at the threshold you want");
  const CountThresholdChoice threshold =
      choose_count_threshold(args.threshold, calibration ? &*calibration : nullptr, args.calibration, proto);

  OutcomeTableOptions table;
  table.bad_rows = parse_bad_row_policy(args.on_bad_row);
  table.threshold = threshold.threshold;
  RunsInput runs;
  if (args.runs == "-") {
    const std::string text{std::istreambuf_iterator<char>(std::cin), std::istreambuf_iterator<char>()};
    runs = parse_runs_text(text, "<stdin>", proto, table, args.counts);
  } else {
    runs = read_runs_file(args.runs, proto, table, args.counts);
  }

  const long photon_results = runs.read.photon_count_results;
  if (calibration && photon_results == 0 && !args.correct_readout)
    throw DomainError("--calibration " + args.calibration + " is not used: the runs have no photon counts (their "
                      "results are dark/bright), so there is nothing to threshold; add --correct-readout to "
                      "correct with its error rates, or leave --calibration out");

  AnalysisOptions options;
  options.level = args.level;
  options.seed = args.seed;
  options.replicates = args.bootstrap;
  options.margin = args.margin;
  options.drift = runs.drift;
  options.keep_replicates = !args.figures_dir.empty() || !args.report_dir.empty();
  AnalysisResult result = analyse_campaign(proto, runs.read.counts, options);
  result.runs_file = args.runs == "-" ? "<stdin>" : args.runs;
  result.threshold_note = threshold_note(threshold, photon_results);
  if (args.correct_readout) {
    ReadoutCorrectionOptions ro;
    ro.rates = calibration ? rates_from_calibration(*calibration, args.calibration) : rates_from_protocol(proto);
    ro.continuation = continuation;
    ro.level = args.level;
    ro.seed = args.seed;
    ro.replicates = args.bootstrap;
    if (photon_results == 0)
      ro.extra_assumptions.push_back(
          "The runs hold dark/bright results, not counts: they are assumed to have been decided with the "
          "threshold the error rates belong to" +
          (calibration ? " (" + detail::number_text(calibration->threshold) + " for " + args.calibration + ")"
                       : std::string()) + ".");
    attach_readout_correction(result, readout_corrected_analysis(proto, runs.read.counts, ro));
  }
  // Files first: an error leaves stdout empty.
  if (!args.figures_dir.empty() || !args.report_dir.empty()) {
    const AnalysisFigures figures = analysis_figures(proto, runs.read.counts, result);
    if (!args.figures_dir.empty()) write_analysis_figures(figures, args.figures_dir);
    if (!args.report_dir.empty()) {
      ReportProvenance provenance;
      provenance.command_line = command_line_as_run();
      provenance.version = MACROREAL_VERSION;
      provenance.inputs.push_back({"runs", args.runs});
      provenance.inputs.push_back({"protocol", args.protocol});
      if (!args.calibration.empty()) provenance.inputs.push_back({"calibration", args.calibration});
      write_analysis_report(result, figures, provenance, args.report_dir);
    }
  }
  const std::string text = args.json ? analysis_json_text(result) : analysis_text(result);
  if (args.output == "-") {
    std::cout << text << std::flush;
  } else {
    std::ofstream out(args.output, std::ios::binary);
    if (!(out << text) || !out.flush()) throw InputError(args.output, "", "cannot write the output file");
  }
  if (!args.check.empty()) {
    const AnalysisCheck check = check_analysis(result, args.check);
    std::cerr << "analyse --check: " << check.summary << "\n";
    if (!check.passed) return kExitCheckFailed;
  }
  return kExitOk;
}

}  // namespace

void register_analyse(CLI::App& app) {
  auto args = std::make_shared<AnalyseArgs>();
  auto* cmd = app.add_subcommand(
      "analyse",
      "Analyse recorded runs: every estimate with its confidence intervals, the LG and NSIT tests "
      "with several methods, multiplicity adjustments, the NSIT bound on invasiveness, the "
      "comparison with the protocol's model, and the assumptions the conclusions rest on");
  cmd->add_option("runs", args->runs,
                  "outcome table (CSV, one row per shot) or counts JSON (macroreal-counts/1); - reads stdin")
      ->required();
  cmd->add_option("--protocol", args->protocol, "protocol file (macroreal-protocol/1); - reads stdin")->required();
  cmd->add_flag("--json", args->json, "write JSON (DESIGN.md section 8) instead of the text report");
  cmd->add_option("--level", args->level, "two-sided confidence level of the intervals (default 0.95)")
      ->check(CLI::Range(0.5, 0.999999));
  cmd->add_option("--seed", args->seed, "seed of every resampling step (default 20261202)");
  cmd->add_option("--bootstrap", args->bootstrap,
                  "bootstrap replicates B for intervals and resampling tests (default 10000)")
      ->check(CLI::Range(100L, 10000000L));
  cmd->add_option("--on-bad-row", args->on_bad_row,
                  "error: stop at the first bad row (default); skip: leave it out and count the reason")
      ->check(CLI::IsMember({"error", "skip"}));
  cmd->add_option("--threshold", args->threshold,
                  "photon-count threshold (count <= T reads dark); overrides the protocol's");
  cmd->add_option("--margin", args->margin,
                  "NSIT equivalence margin for TOST, for tests without their own \"margin\"");
  cmd->add_flag("--counts", args->counts, "RUNS is a counts JSON whatever its name or content");
  cmd->add_option("--calibration", args->calibration,
                  "calibration file (macroreal-calibration/1, from calibrate): its threshold reads photon "
                  "counts (--threshold overrides) and --correct-readout uses its error rates and intervals")
      ->type_name("FILE");
  cmd->add_flag("--correct-readout", args->correct_readout,
                "also report misassignment-corrected estimates, K and S (rates from --calibration, else "
                "the protocol's detection model), with intervals that include the rates' uncertainty");
  cmd->add_option("--misread-continuation", args->misread_continuation,
                  "with --correct-readout, destructive readout: later results of a shot whose bright "
                  "result was misread as dark are fair coin flips (fair, the default, as simulate "
                  "assumes) or dark with probability P (dark=P)")
      ->type_name("fair|dark=P");
  cmd->add_option("--check", args->check,
                  "exit with code 1 unless the named tests reject their null hypothesis at alpha = "
                  "1 - level (primary p-value after Holm's adjustment over all tests; summary on "
                  "stderr): lg, nsit, all or a test label such as \"NSIT A->B\"; repeatable")
      ->type_name("lg|nsit|all|LABEL")
      ->allow_extra_args(false);  // one value per --check, so a positional after it stays one
  cmd->add_option("-o,--output", args->output, "write to FILE instead of standard output (- : stdout)")
      ->type_name("FILE|-");
  cmd->add_option("--figures", args->figures_dir,
                  "also draw the figures (SVG and PNG) into DIR: K and S with their intervals over the "
                  "model, the histogram of S over a scan against the model's, the bootstrap distributions")
      ->type_name("DIR");
  cmd->add_option("--report", args->report_dir,
                  "also write DIR/report.md (command, seed, input checksums, rows, estimates, tests, "
                  "cautions, figures), DIR/results.tex (LaTeX table) and DIR/figures/")
      ->type_name("DIR");
  cmd->footer(
      "Examples:\n"
      "  macroreal analyse example_runs/lg3_thermal_runs.csv --protocol protocols/lg3_thermal.json\n"
      "  macroreal analyse counts.json --protocol p.json --json --seed 7 --bootstrap 20000\n"
      "  macroreal analyse runs.csv --protocol p.json --report report_dir --figures figs\n"
      "  macroreal analyse counts.csv --protocol p.json --calibration cal.json --correct-readout\n"
      "  zcat runs.csv.gz | macroreal analyse - --protocol p.json --on-bad-row skip\n"
      "  macroreal analyse runs.csv --protocol p.json --level 0.99 --check lg && echo \"LG violated\"\n"
      "Exit codes: 0 success, 1 with --check: a test does not reach the level, 2 bad input (the\n"
      "message names the file, the line and column or the JSON path, and the field).");
  cmd->callback([args] { set_action([args] { return run_analyse(*args); }); });
}

namespace {
const CommandRegistration analyse_registration{50, "analyse", register_analyse};
}  // namespace

}  // namespace macroreal::apps
