// `macroreal predict PROTOCOL.json [--json] [-o FILE|-]`: model predictions for a protocol
// file (lib/protocol/prediction.hpp), printed as a text report or JSON (lib/report).
// Thin: parse the options, call the library, print. The whole output is built before anything
// is written, so an error leaves stdout empty (main() prints the message, exit code 2).
#include <fstream>
#include <iostream>
#include <iterator>
#include <memory>

#include "apps/commands.hpp"
#include "core/error.hpp"
#include "protocol/prediction.hpp"
#include "protocol/protocol_reader.hpp"
#include "report/prediction_figures.hpp"
#include "report/prediction_report.hpp"

namespace macroreal::apps {

namespace {

struct PredictArgs {
  std::string protocol;
  bool json = false;
  std::string output = "-";
  std::string engine = "auto";
  double truncation_tolerance = 0.0;
  std::string figures;  // folder for the figures; empty: none
};

int run_predict(const PredictArgs& args) {
  ProtocolReadOptions read;
  read.generate_needed_sequences = true;
  read.require_state = true;
  Protocol proto;
  if (args.protocol == "-") {
    const std::string text{std::istreambuf_iterator<char>(std::cin),
                           std::istreambuf_iterator<char>()};
    proto = parse_protocol_text(text, "<stdin>", read);
  } else {
    proto = read_protocol(args.protocol, read);
  }
  PredictOptions options;
  options.engine_kind = parse_engine_kind(args.engine);
  options.fock.truncation_tolerance = args.truncation_tolerance;
  const PredictionResult result = predict(proto, options);
  std::string text = args.json ? prediction_json_text(result) : prediction_text(result);
  if (!args.figures.empty()) {
    PredictionFigureOptions figures;
    figures.scan.predict = options;
    const auto paths = write_figures(prediction_figures(proto, figures), args.figures);
    if (!args.json) text += "\n" + figures_written_line(args.figures, paths);
  }
  if (args.output == "-") {
    std::cout << text << std::flush;
  } else {
    std::ofstream out(args.output, std::ios::binary);
    if (!(out << text) || !out.flush())
      throw InputError(args.output, "", "cannot write the output file");
  }
  return 0;
}

}  // namespace

void register_predict(CLI::App& app) {
  auto args = std::make_shared<PredictArgs>();
  auto* cmd = app.add_subcommand(
      "predict",
      "Model predictions for a protocol file: the probability of every outcome string of every "
      "sequence, and for each test K (or S) next to the classical reference models");
  cmd->add_option("protocol", args->protocol, "protocol file (macroreal-protocol/1); - reads stdin")
      ->required();
  cmd->add_flag("--json", args->json, "write one JSON object (probabilities, tests, engine, cautions) instead of the text report");
  cmd->add_option("-o,--output", args->output, "write to FILE instead of standard output (- : stdout)")
      ->type_name("FILE|-");
  cmd->add_option("--truncation-tolerance", args->truncation_tolerance,
                  "Fock engine: refuse (exit 2) when a result changes by more than this when the "
                  "cutoff grows by 25 % (default 0: report the change, never refuse)")
      ->check(CLI::NonNegativeNumber);
  cmd->add_option("--engine", args->engine,
                  "engine for the quantum probabilities: auto (default: weyl where it applies, "
                  "fock otherwise; the output says which ran and why), weyl (exact displacement "
                  "sums) or fock (truncated density matrix)")
      ->check(CLI::IsMember({"weyl", "fock", "auto"}));
  cmd->add_option("--figures", args->figures,
                  "write SVG and PNG figures into DIR (created if missing): K or S of every test "
                  "against |beta| with the classical bound, the optimum and the protocol's setting; "
                  "S against the direction of the first measurement for NSIT tests; the Wigner "
                  "function of the input state and of the states a prepared input was made from")
      ->type_name("DIR");
  cmd->footer(
      "Examples:\n"
      "  macroreal predict protocols/lg3_thermal.json\n"
      "  macroreal predict protocols/lg3_prepared_cat_conclusive.json --json -o cat.json\n"
      "  cat my_protocol.json | macroreal predict -\n"
      "  macroreal predict protocols/lg3_tomography_fock1.json   (Fock engine, chosen automatically)\n"
      "  macroreal predict noisy.json --engine weyl\n"
      "  macroreal predict protocols/lg3_prepared_cat_conclusive.json --figures figs\n"
      "Exit codes: 0 success, 2 bad input (the message names the file and the JSON path).");
  cmd->callback([args] { set_action([args] { return run_predict(*args); }); });
}

namespace {
const CommandRegistration predict_registration{20, "predict", register_predict};
}  // namespace

}  // namespace macroreal::apps
