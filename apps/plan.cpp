// `macroreal plan PROTOCOL.json --alpha A --power P [--test lg|nsit|equivalence] ...`: shots per
// sequence, totals and lab hours for the chosen test (lib/design/campaign_plan.hpp), optionally
// checked by simulating campaigns (lib/design/plan_verification.hpp). Thin: parse, call the
// library, print. Progress of --verify goes to stderr when it is a terminal and not --quiet.
#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <fstream>
#include <iostream>
#include <memory>
#include <optional>
#include <sstream>

#include "apps/commands.hpp"
#include "core/error.hpp"
#include "design/allocation_file.hpp"
#include "design/campaign_plan.hpp"
#include "design/plan_verification.hpp"
#include "protocol/protocol_reader.hpp"
#include "report/plan_figures.hpp"
#include "report/plan_report.hpp"

namespace macroreal::apps {

namespace {

struct PlanArgs {
  std::string protocol;
  double alpha = 0.05;
  double power = 0.8;
  std::string test = "lg";
  std::optional<double> margin;
  std::string test_label;
  std::string cycle_time;  // "OVERHEAD[,PER_STEP]"
  bool no_waits = false;
  long verify = 0;
  std::uint64_t seed = 20261202;
  int threads = 0;
  bool quiet = false;
  std::string power_curve;
  std::string allocation_out;
  bool json = false;
  std::string figures;  // folder for the figures; empty: none
};

void write_file(const std::string& path, const std::string& text) {
  std::ofstream out(path, std::ios::binary);
  if (!(out << text) || !out.flush()) throw InputError(path, "", "cannot write the output file");
}

CycleTimeModel parse_cycle(const std::string& text, bool no_waits) {
  CycleTimeModel m;
  m.include_step_times = !no_waits;
  if (text.empty()) return m;
  std::istringstream in(text);
  std::string a, b;
  std::getline(in, a, ',');
  std::getline(in, b);
  try {
    std::size_t used = 0;
    m.overhead_s = std::stod(a, &used);
    if (used != a.size()) throw std::invalid_argument(a);
    if (!b.empty()) {
      m.per_step_s = std::stod(b, &used);
      if (used != b.size()) throw std::invalid_argument(b);
    }
  } catch (const std::logic_error&) {
    throw DomainError("--cycle-time-s = '" + text + "', but must be OVERHEAD or OVERHEAD,PER_STEP in seconds");
  }
  m.validate();
  return m;
}

int run_plan(const PlanArgs& args) {
  ProtocolReadOptions read;
  read.generate_needed_sequences = true;
  read.require_state = true;
  const Protocol protocol = args.protocol == "-"
                                ? parse_protocol_text(read_input("-"), input_label("-"), read)
                                : read_protocol(args.protocol, read);
  PlanOptions options;
  options.alpha = args.alpha;
  options.power = args.power;
  options.test = parse_plan_test(args.test);
  options.margin = args.margin;
  options.test_label = args.test_label;
  options.cycle = parse_cycle(args.cycle_time, args.no_waits);
  const CampaignPlan plan = plan_campaign(protocol, options);

  std::optional<PlanVerification> verification;
  if (args.verify > 0 && plan.feasible) {
    VerifyOptions v;
    v.campaigns = args.verify;
    v.seed = args.seed;
    v.threads = args.threads;
    const bool show = !args.quiet && isatty(STDERR_FILENO);
    const auto t0 = std::chrono::steady_clock::now();
    bool shown = false;
    if (show)
      v.progress = [&](long done, long total) {
        const double s = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
        if (s < 1.0 && done < total) return;  // only runs longer than a second show progress
        std::fprintf(stderr, "\rverify: %ld / %ld campaigns (%.1f s)", done, total, s);
        std::fflush(stderr);
        shown = true;
      };
    verification = verify_plan(plan, v);
    if (shown) std::fprintf(stderr, "\n");
  }
  std::string text = args.json ? plan_json_text(plan, verification) : plan_text(plan, verification);
  if (!args.figures.empty() && plan.feasible) {
    const auto paths = write_figures(plan_figures(plan, verification), args.figures);
    if (!args.json) text += "\n" + figures_written_line(args.figures, paths);
  }
  if (!args.power_curve.empty() && plan.feasible) write_file(args.power_curve, power_curve_csv(plan));
  if (!args.allocation_out.empty() && plan.feasible)
    write_output(args.allocation_out, allocation_file_text(plan_allocation(plan), protocol));
  // With -o - the allocation file takes standard output and the report goes to stderr.
  (args.allocation_out == "-" ? std::cerr : std::cout) << text << std::flush;
  return plan.feasible ? 0 : 1;
}

}  // namespace

void register_plan(CLI::App& app) {
  auto args = std::make_shared<PlanArgs>();
  auto* cmd = app.add_subcommand(
      "plan",
      "Shots per sequence, total shots and lab hours for a test to reach level alpha with the "
      "given power under the protocol's model (least lab time), with an optional Monte Carlo check");
  cmd->add_option("protocol", args->protocol, "protocol file with a model (macroreal-protocol/1); - reads stdin")->required();
  cmd->add_option("--alpha", args->alpha, "level of the test (default 0.05)");
  cmd->add_option("--power", args->power, "target power (default 0.8)");
  cmd->add_option("--test", args->test,
                  "lg: one-sided test of K <= n - 2 (default); nsit: two-sided test of S = 0; "
                  "equivalence: TOST of |S| < margin")
      ->check(CLI::IsMember({"lg", "nsit", "equivalence"}));
  cmd->add_option("--margin", args->margin, "equivalence margin for |S| (default: the test's \"margin\")");
  cmd->add_option("--which", args->test_label,
                  "which protocol test, by label (e.g. \"LG ABC\", \"NSIT A->B\"); default the first of its kind");
  cmd->add_option("--cycle-time-s", args->cycle_time,
                  "lab seconds per shot: OVERHEAD[,PER_STEP] (default 5e-3,1e-3): a fixed overhead "
                  "plus a time per step that is run, plus the protocol's own waits (time_s)")
      ->type_name("OVERHEAD[,PER_STEP]");
  cmd->add_flag("--no-waits", args->no_waits, "leave the protocol's time_s waits out of the cycle time");
  cmd->add_option("--verify", args->verify, "simulate M campaigns at the planned shots and measure the power")
      ->type_name("M");
  cmd->add_option("--seed", args->seed, "seed of --verify (default 20261202)");
  cmd->add_option("--threads", args->threads, "threads for --verify (default: all; the result does not depend on it)");
  cmd->add_flag("--quiet", args->quiet, "no progress on stderr");
  cmd->add_option("--power-curve", args->power_curve, "write power against total shots as CSV")
      ->type_name("FILE.csv");
  cmd->add_option("-o,--output", args->allocation_out,
                  "write the allocation file (macroreal-allocation/1) for simulate --allocation "
                  "(- : standard output, the report then goes to stderr)")
      ->type_name("FILE.json|-");
  cmd->add_flag("--json", args->json, "print one JSON object instead of the text report");
  cmd->add_option("--figures", args->figures,
                  "write SVG and PNG figures into DIR (created if missing): power against total "
                  "shots with the planned shots and the requested power (not for an infeasible plan)")
      ->type_name("DIR");
  cmd->footer(
      "Examples:\n"
      "  macroreal plan protocols/lg3_prepared_cat_conclusive.json --alpha 0.01 --power 0.9 -o shots.json\n"
      "  macroreal plan protocols/lg3_thermal.json --verify 2000 --seed 7 --power-curve curve.csv\n"
      "  macroreal plan protocols/lg3_thermal.json --figures figs\n"
      "  macroreal plan protocols/lg3_thermal.json --test equivalence --margin 0.05 --json\n"
      "  macroreal plan protocols/nsit_prepared_cat.json --test nsit --alpha 0.01\n"
      "  macroreal plan p.json --cycle-time-s 0.02,0.001 --no-waits\n"
      "Exit codes: 0 plan made, 1 no number of shots reaches the power (the report says why),\n"
      "2 bad input.");
  cmd->callback([args] { set_action([args] { return run_plan(*args); }); });
}

namespace {
const CommandRegistration plan_registration{30, "plan", register_plan};
}  // namespace

}  // namespace macroreal::apps
