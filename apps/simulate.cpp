// `macroreal simulate PROTOCOL.json (--shots N | --allocation FILE) --seed S -o RUNS.csv|-`:
// a per-shot outcome table drawn from the protocol's model (lib/design/campaign_simulation.hpp),
// streamed to a file or standard output (lib/design/simulated_table_writer.hpp).
// Thin: parse the options, pick the detection model's source, call the library, print a summary.
#include <charconv>
#include <cstdio>
#include <fstream>
#include <iostream>
#include <iterator>
#include <memory>

#include <nlohmann/json.hpp>

#include "apps/commands.hpp"
#include "core/error.hpp"
#include "design/campaign_simulation.hpp"
#include "design/simulated_table_writer.hpp"
#include "design/allocation_file.hpp"
#include "protocol/protocol_reader.hpp"
#include "detection/calibration_file.hpp"

namespace macroreal::apps {

namespace {

struct SimulateArgs {
  std::string protocol;
  long shots = -1;
  bool shots_given = false;
  std::string allocation;
  std::uint64_t seed = 0;
  std::string output;
  std::string calibration;
  bool counts = false;
  double dark_rate = -1, bright_rate = -1, threshold = -1;
  double dark_read_bright = -1, bright_read_dark = -1;
  double cycle_time_s = 1e-3, step_time_s = 0.0;
  std::string drift;
  int drift_blocks = 20;
  std::string engine = "auto";
  bool json = false;
};

std::string shell_word(const std::string& s) {
  if (!s.empty() && s.find_first_of(" \t'\"\\$`*?;&|<>()") == std::string::npos) return s;
  std::string q = "'";
  for (char c : s) q += (c == '\'') ? std::string("'\\''") : std::string(1, c);
  return q + "'";
}

// Shortest text that reads back as the same double (0.1 stays "0.1").
std::string number_text(double x) {
  char buf[64];
  const auto r = std::to_chars(buf, buf + sizeof buf, x);
  return std::string(buf, r.ptr);
}

// The command as the user would retype it, in a fixed order and without -o (where the table
// goes does not change its bytes).
std::string canonical_command(const SimulateArgs& a) {
  std::string c = "macroreal simulate " + shell_word(a.protocol);
  if (a.shots_given) c += " --shots " + std::to_string(a.shots);
  if (!a.allocation.empty()) c += " --allocation " + shell_word(a.allocation);
  c += " --seed " + std::to_string(a.seed);
  if (!a.calibration.empty()) c += " --calibration " + shell_word(a.calibration);
  if (a.counts) c += " --counts";
  if (a.dark_rate >= 0) c += " --dark-rate " + number_text(a.dark_rate);
  if (a.bright_rate >= 0) c += " --bright-rate " + number_text(a.bright_rate);
  if (a.threshold >= 0) c += " --threshold " + number_text(a.threshold);
  if (a.dark_read_bright >= 0) c += " --dark-read-bright " + number_text(a.dark_read_bright);
  if (a.bright_read_dark >= 0) c += " --bright-read-dark " + number_text(a.bright_read_dark);
  c += " --cycle-time-s " + number_text(a.cycle_time_s);
  if (a.step_time_s != 0.0) c += " --step-time-s " + number_text(a.step_time_s);
  if (!a.drift.empty()) c += " --drift " + shell_word(a.drift) +
                             " --drift-blocks " + std::to_string(a.drift_blocks);
  if (a.engine != "auto") c += " --engine " + a.engine;
  return c;
}

NoiseDrift parse_drift(const std::string& s) {
  const auto c1 = s.find(':');
  const auto c2 = c1 == std::string::npos ? c1 : s.find(':', c1 + 1);
  if (c2 == std::string::npos || s.find(':', c2 + 1) != std::string::npos)
    throw DomainError("--drift " + s + ": expected FIELD:START:END, e.g. heating_quanta_per_s:20:40");
  NoiseDrift d;
  d.field = s.substr(0, c1);
  try {
    std::size_t used1 = 0, used2 = 0;
    const std::string a = s.substr(c1 + 1, c2 - c1 - 1), b = s.substr(c2 + 1);
    d.start = std::stod(a, &used1);
    d.end = std::stod(b, &used2);
    if (used1 != a.size() || used2 != b.size()) throw std::invalid_argument("trailing text");
  } catch (const std::exception&) {
    throw DomainError("--drift " + s + ": START and END must be numbers");
  }
  return d;
}

std::string read_all(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path, "", "cannot open the protocol file");
  return std::string{std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

int run_simulate(const SimulateArgs& args) {
  ProtocolReadOptions read;
  read.generate_needed_sequences = true;
  read.require_state = true;
  const bool from_stdin = args.protocol == "-";
  const std::string text = from_stdin ? std::string{std::istreambuf_iterator<char>(std::cin),
                                                    std::istreambuf_iterator<char>()}
                                      : read_all(args.protocol);
  if (!from_stdin) {
    const auto slash = args.protocol.find_last_of('/');
    read.base_dir = slash == std::string::npos ? "." : args.protocol.substr(0, slash);
  }
  const Protocol proto = parse_protocol_text(text, from_stdin ? "<stdin>" : args.protocol, read);

  if (!args.shots_given && args.allocation.empty())
    throw DomainError("simulate: give --shots N (per sequence) or --allocation FILE");
  if (args.json && args.output == "-")
    throw DomainError("simulate: --json prints a summary on stdout, so the table needs -o FILE");
  SimulationOptions options;
  options.seed = args.seed;
  if (args.shots_given) {
    if (args.shots < 0)
      throw DomainError("--shots = " + std::to_string(args.shots) + ", but must be >= 0");
    options.shots_per_sequence = args.shots;
  }
  if (!args.allocation.empty()) {
    for (const auto& [name, n] : read_allocation_file(args.allocation, proto).shots) {
      if (n >= (1LL << 31))
        throw InputError(args.allocation, "shots." + name,
                         "= " + std::to_string(n) + ", but simulate takes below 2^31 shots per sequence");
      options.allocation[name] = static_cast<long>(n);
    }
    options.allocation_only = !args.shots_given;
  }
  options.cycle_time_s = args.cycle_time_s;
  options.step_time_s = args.step_time_s;
  options.predict.engine_kind = parse_engine_kind(args.engine);
  if (!args.drift.empty()) {
    options.drift = parse_drift(args.drift);
    options.drift_blocks = args.drift_blocks;
  }

  // Detection model: a calibration file, then explicit options, then the protocol.
  std::string source = "the protocol's detection block";
  options.errors = {proto.detection.dark_read_bright, proto.detection.bright_read_dark};
  std::optional<PhotonCountModel> counts;
  if (!args.calibration.empty()) {
    const Calibration cal = read_calibration(args.calibration);
    options.errors = {cal.dark_read_bright, cal.bright_read_dark};
    counts = PhotonCountModel{cal.dark_rate, cal.bright_rate, cal.threshold};
    source = "calibration " + args.calibration;
    if (cal.dark_lifetime_s)
      source += " (its dark-state decay model is not simulated: counts are pure Poisson)";
  }
  if (args.dark_read_bright >= 0 || args.bright_read_dark >= 0) {
    if (args.dark_read_bright >= 0) options.errors.dark_read_bright = args.dark_read_bright;
    if (args.bright_read_dark >= 0) options.errors.bright_read_dark = args.bright_read_dark;
    source = "the command-line error rates" +
             (source == "the protocol's detection block" ? std::string() : ", over " + source);
  }
  if (args.counts) {
    PhotonCountModel m = counts.value_or(PhotonCountModel{-1, -1, -1});
    if (args.dark_rate >= 0) m.dark_rate = args.dark_rate;
    if (args.bright_rate >= 0) m.bright_rate = args.bright_rate;
    if (args.threshold >= 0) m.threshold = args.threshold;
    else if (!counts && proto.detection.threshold) m.threshold = *proto.detection.threshold;
    if (m.dark_rate < 0 || m.bright_rate < 0 || m.threshold < 0)
      throw DomainError("simulate --counts: needs the mean counts per window and a threshold: "
                        "--calibration FILE, or --dark-rate, --bright-rate and --threshold "
                        "(or the protocol's detection.threshold)");
    if (args.dark_rate >= 0 || args.bright_rate >= 0 || args.threshold >= 0 || !counts)
      source = counts ? source + ", with command-line count options" : "the command-line count options";
    options.counts = m;
  } else if (args.dark_rate >= 0 || args.bright_rate >= 0 || args.threshold >= 0) {
    throw DomainError("simulate: --dark-rate, --bright-rate and --threshold need --counts");
  }

  const SimulationPlan plan = plan_simulation(proto, options);
  SimulatedTableContext context;
  context.command = canonical_command(args);
  context.protocol_label = from_stdin ? "<stdin>" : args.protocol;
  context.protocol_checksum = fnv1a64(text);
  context.detection_source = source;
  const auto comments = simulated_table_comments(plan, context);

  std::FILE* out = stdout;
  const std::string label = args.output == "-" ? "<stdout>" : args.output;
  if (args.output != "-") {
    out = std::fopen(args.output.c_str(), "wb");
    if (!out) throw InputError(args.output, "", "cannot open the output file for writing");
  }
  SimulationSummary summary;
  try {
    SimulatedTableWriter writer(out, label, plan, comments);
    summary = simulate_campaign(plan, writer);
  } catch (...) {
    if (out != stdout) std::fclose(out);
    throw;
  }
  if (out != stdout && std::fclose(out) != 0)
    throw InputError(args.output, "", "cannot write the outcome table");

  if (args.json) {
    nlohmann::ordered_json j;
    j["output"] = args.output;
    j["rows"] = summary.rows;
    nlohmann::ordered_json per = nlohmann::ordered_json::object();
    for (std::size_t s = 0; s < plan.sequences.size(); ++s)
      per[plan.sequences[s].name] = summary.rows_per_sequence[s];
    j["rows_per_sequence"] = per;
    j["seed"] = plan.seed;
    j["campaign_s"] = static_cast<double>(plan.total_ns) * 1e-9;
    j["errors"] = {{"dark_read_bright", plan.errors.dark_read_bright},
                   {"bright_read_dark", plan.errors.bright_read_dark}};
    j["engine"] = plan.engine;
    j["assumptions"] = simulation_assumptions(plan);
    std::cout << j.dump(2) << "\n";
  } else if (args.output != "-") {
    std::cerr << "simulate: " << summary.rows << " rows written to " << args.output << " ("
              << static_cast<double>(plan.total_ns) * 1e-9 << " s of campaign time)\n";
  }
  return 0;
}

}  // namespace

void register_simulate(CLI::App& app) {
  auto args = std::make_shared<SimulateArgs>();
  auto* cmd = app.add_subcommand(
      "simulate",
      "Draw a per-shot outcome table from the protocol's model (invented data for demos and "
      "for checking a design by simulation)");
  cmd->add_option("protocol", args->protocol, "protocol file (macroreal-protocol/1); - reads stdin")
      ->required();
  cmd->add_option_function<long>(
         "--shots", [args](long n) { args->shots = n; args->shots_given = true; },
         "shots per sequence (every listed and generated sequence); with --allocation, for "
         "the sequences the file does not name")
      ->type_name("N");
  cmd->add_option("--allocation", args->allocation,
                  "shots per sequence from a JSON file {\"format\": \"macroreal-allocation/1\", "
                  "\"shots\": {\"AB+\": 1200, ...}} (as `macroreal plan` writes it)")
      ->type_name("FILE");
  cmd->add_option("--seed", args->seed, "seed; the same seed gives the same bytes")->required();
  cmd->add_option("-o,--output", args->output, "the outcome table (CSV); - : standard output")
      ->type_name("FILE|-")
      ->required();
  cmd->add_option("--calibration", args->calibration,
                  "detector calibration (macroreal-calibration/1): its error rates, and with "
                  "--counts its mean counts and threshold")
      ->type_name("FILE");
  cmd->add_flag("--counts", args->counts,
                "record photon counts (Poisson with the dark/bright means) instead of dark/bright");
  cmd->add_option("--dark-rate", args->dark_rate, "with --counts: mean photon count of a dark window");
  cmd->add_option("--bright-rate", args->bright_rate, "with --counts: mean photon count of a bright window");
  cmd->add_option("--threshold", args->threshold, "with --counts: a count <= threshold reads dark");
  cmd->add_option("--dark-read-bright", args->dark_read_bright,
                  "P(read bright | dark), replacing the protocol's / calibration's value");
  cmd->add_option("--bright-read-dark", args->bright_read_dark,
                  "P(read dark | bright), replacing the protocol's / calibration's value");
  cmd->add_option("--cycle-time-s", args->cycle_time_s,
                  "time per shot in seconds, before the per-step time (default 0.001)");
  cmd->add_option("--step-time-s", args->step_time_s,
                  "extra time per step of a sequence in seconds (default 0): longer sequences "
                  "cost more");
  cmd->add_option("--drift", args->drift,
                  "linear drift of one noise parameter over the campaign, FIELD:START:END "
                  "(e.g. heating_quanta_per_s:20:40)")
      ->type_name("FIELD:START:END");
  cmd->add_option("--drift-blocks", args->drift_blocks,
                  "equal time blocks of the piecewise-constant drift (default 20)");
  cmd->add_option("--engine", args->engine, "engine for the model probabilities: auto, weyl or fock")
      ->check(CLI::IsMember({"weyl", "fock", "auto"}));
  cmd->add_flag("--json", args->json, "print a JSON summary (rows, rates, assumptions) on stdout");
  cmd->footer(
      "Model: each shot's results are drawn from the model's outcome probabilities; detection\n"
      "errors from the protocol's \"detection\" block, a --calibration file or the options.\n"
      "Destructive readout: a shot goes on only while the detector reads dark; a dark misread\n"
      "as bright ends it; a bright misread as dark goes on with a ruined oscillator state, and\n"
      "ASSUMPTION: every later result of that shot is a fair coin flip (then detection errors).\n"
      "Sequences are interleaved evenly; a shot lasts cycle + steps x step time. A drift is\n"
      "piecewise constant in --drift-blocks blocks (the model re-evaluated in each). The table's\n"
      "# lines record the command, seed, protocol checksum and these assumptions.\n"
      "Examples:\n"
      "  macroreal simulate protocols/lg3_thermal.json --shots 2000 --seed 11 -o runs.csv\n"
      "  macroreal simulate protocols/lg3_thermal.json --allocation alloc.json --seed 3 \\\n"
      "      --cycle-time-s 0.002 --step-time-s 0.0005 --drift heating_quanta_per_s:20:40 -o runs.csv\n"
      "  macroreal simulate protocols/lg3_thermal.json --shots 500 --seed 1 --counts \\\n"
      "      --dark-rate 0.2 --bright-rate 12 --threshold 2 -o - | head\n"
      "Exit codes: 0 success, 2 bad input (the message names the file and the field).");
  cmd->callback([args] { set_action([args] { return run_simulate(*args); }); });
}

namespace {
const CommandRegistration simulate_registration{40, "simulate", register_simulate};
}  // namespace

}  // namespace macroreal::apps
