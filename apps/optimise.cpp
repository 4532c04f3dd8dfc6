// `macroreal optimise PROTOCOL.json [--objective K|significance|shots|conclusive] ...`: choose
// displacements, directions, Ramsey phases and input states that maximise the chosen figure of
// merit under the protocol's noise model (lib/design/setting_optimiser.hpp), print the report
// (lib/report/optimisation_report.hpp) and write the optimised protocol file.
// Thin: parse the options, call the library, print. Everything is built before anything is
// written, so an error leaves stdout empty (main() prints the message, exit code 2).
#include <fstream>
#include <iostream>
#include <iterator>
#include <memory>
#include <sstream>

#include "apps/commands.hpp"
#include "core/error.hpp"
#include "design/setting_optimiser.hpp"
#include "protocol/protocol_reader.hpp"
#include "report/optimisation_figures.hpp"
#include "report/optimisation_report.hpp"

namespace macroreal::apps {

namespace {

struct OptimiseArgs {
  std::string protocol;
  std::string objective = "K";
  double budget_shots = 1e4;
  double alpha = 0.00135;
  double power = 0.8;
  double max_beta = 4.0;
  std::string free = "beta,angle,phase";
  std::string inputs = "protocol";
  std::string robust = "none";
  int test = 1;
  long max_evaluations = 20000;
  unsigned long long seed = 1;
  bool json = false;
  std::string output;
  std::string figures;  // folder for the figures; empty: none
};

std::vector<std::string> split_list(const std::string& s) {
  std::vector<std::string> out;
  std::stringstream ss(s);
  std::string item;
  while (std::getline(ss, item, ','))
    if (!item.empty()) out.push_back(item);
  return out;
}

void write_file(const std::string& path, const std::string& text) {
  std::ofstream out(path, std::ios::binary);
  if (!(out << text) || !out.flush()) throw InputError(path, "", "cannot write the output file");
}

int run_optimise(const OptimiseArgs& args) {
  std::string text, label = args.protocol;
  if (args.protocol == "-") {
    text.assign(std::istreambuf_iterator<char>(std::cin), std::istreambuf_iterator<char>());
    label = "<stdin>";
  } else {
    std::ifstream in(args.protocol, std::ios::binary);
    if (!in) throw InputError(args.protocol, "", "cannot open the protocol file");
    text.assign(std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>());
  }
  ProtocolReadOptions read;
  read.require_state = true;
  const Protocol protocol = args.protocol == "-" ? parse_protocol_text(text, label, read)
                                                 : read_protocol(args.protocol, read);
  const nlohmann::json original = nlohmann::json::parse(text);  // valid: parsed above

  if (args.test < 1 || static_cast<std::size_t>(args.test) > protocol.tests.size())
    throw DomainError("--test " + std::to_string(args.test) + ", but the protocol has " +
                      std::to_string(protocol.tests.size()) + " tests (numbered from 1)");
  OptimiseOptions o;
  o.objective.kind = parse_objective_kind(args.objective);
  o.objective.test_index = static_cast<std::size_t>(args.test - 1);
  o.objective.budget_shots = args.budget_shots;
  o.objective.alpha = args.alpha;
  o.objective.power = args.power;
  o.max_beta = args.max_beta;
  o.free = split_list(args.free);
  o.inputs = split_list(args.inputs);
  o.robust = parse_robust_mode(args.robust);
  o.search.max_evaluations = args.max_evaluations;
  o.search.seed = args.seed;
  const OptimisationResult r = optimise_settings(protocol, original, o);

  std::string report = args.json ? optimisation_json_text(r) : optimisation_text(r);
  if (!args.figures.empty()) {
    const auto paths = write_figures(optimisation_figures(r, o), args.figures);
    if (!args.json) report += "\n" + figures_written_line(args.figures, paths);
  }
  if (args.output == "-") {  // the protocol takes standard output, the report goes to stderr
    std::cerr << report << std::flush;
    write_output("-", optimised_protocol_text(r));
    return kExitOk;
  }
  if (!args.output.empty()) write_file(args.output, optimised_protocol_text(r));
  std::cout << report;
  if (!args.output.empty() && !args.json)
    std::cout << "\nOptimised protocol written to " << args.output
              << " (run: macroreal predict " << args.output << ")\n";
  std::cout << std::flush;
  return 0;
}

}  // namespace

void register_optimise(CLI::App& app) {
  auto args = std::make_shared<OptimiseArgs>();
  auto* cmd = app.add_subcommand(
      "optimise",
      "Choose displacements, directions, Ramsey phases and input states that maximise the "
      "expected violation (or its significance) under the protocol's noise model");
  cmd->add_option("protocol", args->protocol, "protocol file (macroreal-protocol/1); - reads stdin")
      ->required();
  cmd->add_option("--objective", args->objective,
                  "K: the expected K (|S| for NSIT); significance: expected one-sided z at "
                  "--budget-shots with the optimal shot allocation; shots: fewest shots for "
                  "--alpha and --power; conclusive: margin of K over the best classical "
                  "explanation (default K)")
      ->check(CLI::IsMember({"K", "significance", "shots", "conclusive"}));
  cmd->add_option("--budget-shots", args->budget_shots, "total shots for significance (default 10000)");
  cmd->add_option("--alpha", args->alpha, "one-sided level for shots (default 0.00135, z = 3)");
  cmd->add_option("--power", args->power, "target power for shots (default 0.8)");
  cmd->add_option("--max-beta", args->max_beta, "largest |beta| of any measurement (default 4)");
  cmd->add_option("--free", args->free,
                  "free settings, comma-separated: beta, angle, phase (every measurement) or "
                  "A.beta, B.phase, ... (default beta,angle,phase)");
  cmd->add_option("--inputs", args->inputs,
                  "allowed input states: protocol (the file's state) and/or cat (vacuum "
                  "post-selected by a symmetric modular measurement of free |beta_0|) (default protocol)");
  cmd->add_option("--robust", args->robust,
                  "none, mean or worst over the noise uncertainty given in the file (default none)")
      ->check(CLI::IsMember({"none", "mean", "worst"}));
  cmd->add_option("--test", args->test, "which test of the file, numbered from 1 (default 1)");
  cmd->add_option("--max-evaluations", args->max_evaluations, "objective evaluations (default 20000)");
  cmd->add_option("--seed", args->seed, "seed of the random starts (default 1)");
  cmd->add_flag("--json", args->json, "write one JSON object (figures, settings, tolerance, protocol)");
  cmd->add_option("-o,--output", args->output,
                  "write the optimised protocol file to FILE (- : standard output, the report then "
                  "goes to stderr)")
      ->type_name("FILE|-");
  cmd->add_option("--figures", args->figures,
                  "write SVG and PNG figures into DIR (created if missing): K (or S) of the test "
                  "against |beta| through the optimised setting, with the optimum, the classical "
                  "bound and the search limit, and the Wigner function of the chosen input")
      ->type_name("DIR");
  cmd->footer(
      "Examples:\n"
      "  macroreal optimise protocols/lg3_thermal.json --objective significance --budget-shots 20000 -o best.json\n"
      "  macroreal optimise protocols/lg3_thermal.json --figures figs\n"
      "  macroreal optimise protocols/lg3_prepared_cat_conclusive.json --objective conclusive --inputs protocol,cat\n"
      "  macroreal optimise noisy.json --robust worst --max-beta 3 --free B.angle,C.angle,phase\n"
      "Exit codes: 0 success, 2 bad input (the message names the file, field or option).");
  cmd->callback([args] { set_action([args] { return run_optimise(*args); }); });
}

namespace {
const CommandRegistration optimise_registration{10, "optimise", register_optimise};
}  // namespace

}  // namespace macroreal::apps
