// `macroreal reach DEVICE.json [--test lg|nsit] [--sigma 5] [--power 0.8] [--json]`: can a
// device reach a conclusive Leggett-Garg or NSIT test, in how many hours, and what limits it
// (lib/device/feasibility.hpp); `--map P1,P2` writes a grid of time-to-conclusive (CSV) over two
// parameters given as ranges; `--shard k/N` computes one part of it and `--merge PART...`
// joins the parts into the same bytes as one run (lib/report/reach_report.hpp); `--figures DIR`
// with --map draws the map (lib/report/reach_figures.hpp).
// Thin: parse, call the library, print; the whole output is built before it is written.
#include <fstream>
#include <iostream>
#include <memory>
#include <sstream>

#include "apps/commands.hpp"
#include "core/error.hpp"
#include "device/device_spec.hpp"
#include "device/feasibility.hpp"
#include "device/reach_map.hpp"
#include "report/command_figures.hpp"
#include "report/reach_figures.hpp"
#include "report/reach_report.hpp"

namespace macroreal::apps {

namespace {

struct ReachArgs {
  std::string device;
  std::string test = "lg";
  double sigma = 5.0;
  double power = 0.8;
  bool json = false;
  std::string map;
  std::string shard;
  std::vector<std::string> merge;
  std::string output = "-";
  int threads = 0;
  std::string figures;
  bool check = false;
};

std::string slurp(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path, "", "cannot open the file");
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

void emit(const std::string& text, const std::string& output) {
  if (output == "-") {
    std::cout << text << std::flush;
    return;
  }
  std::ofstream out(output, std::ios::binary);
  if (!(out << text) || !out.flush()) throw InputError(output, "", "cannot write the output file");
}

int run_reach(const ReachArgs& a) {
  if (!a.merge.empty()) {
    if (!a.figures.empty())
      throw InputError("", "--figures", "draws a whole --map run, not with --merge");
    std::vector<std::string> texts;
    for (const auto& p : a.merge) texts.push_back(slurp(p));
    emit(merge_map_parts(texts, a.merge), a.output);
    return 0;
  }
  if (a.device.empty()) throw InputError("", "DEVICE", "a device file is required (or --merge)");
  const DeviceSpec spec =
      a.device == "-" ? parse_device_text(read_input("-"), input_label("-")) : read_device(a.device);
  ReachOptions opt;
  opt.test = parse_reach_test(a.test);
  opt.sigma = a.sigma;
  opt.power = a.power;
  opt.validate();
  if (!a.map.empty()) {
    if (a.check) throw InputError("", "--check", "judges one device point, not a --map");
    const auto comma = a.map.find(',');
    if (comma == std::string::npos)
      throw InputError("", "--map", "give two parameters as P1,P2");
    MapOptions mo;
    mo.reach = opt;
    mo.threads = a.threads;
    if (!a.shard.empty()) {
      const auto slash = a.shard.find('/');
      if (slash == std::string::npos) throw InputError("", "--shard", "give k/N, e.g. 3/10");
      try {
        mo.shard = std::stoi(a.shard.substr(0, slash));
        mo.shards = std::stoi(a.shard.substr(slash + 1));
      } catch (const std::exception&) {
        throw InputError("", "--shard", "\"" + a.shard + "\" is not k/N");
      }
    }
    if (!a.figures.empty() && !a.shard.empty())
      throw InputError("", "--figures", "draws the whole map: not with --shard");
    const ReachMap map = reach_map(spec, a.map.substr(0, comma), a.map.substr(comma + 1), mo);
    emit(a.shard.empty() ? map_csv_text(map, opt) : map_part_text(map, opt, mo.shard, mo.shards),
         a.output);
    if (!a.figures.empty()) {  // on stderr: stdout (or -o) holds the CSV alone
      if (reach_map_has_conclusive_point(map))
        std::cerr << figures_written_line(a.figures, write_reach_figures(map, opt, a.figures));
      else
        std::cerr << "No figure written: no point of the map reaches a conclusive test (the CSV "
                     "says so point by point).\n";
    }
    return 0;
  }
  if (!a.shard.empty()) throw InputError("", "--shard", "only with --map");
  if (!a.figures.empty()) throw InputError("", "--figures", "only with --map");
  const ReachResult r = reach(spec.base, opt);
  emit(a.json ? reach_json_text(r, spec) : reach_text(r, spec), a.output);
  if (a.check && !r.conclusive) {
    std::cerr << "reach --check: no conclusive test within the available time\n";
    return kExitCheckFailed;
  }
  return kExitOk;
}

}  // namespace

void register_reach(CLI::App& app) {
  auto args = std::make_shared<ReachArgs>();
  auto* cmd = app.add_subcommand(
      "reach",
      "Feasibility of a mechanical-sensor experiment: from the device's physical parameters, the "
      "best K (or |S|), the lab hours to a conclusive test, the limiting factor and whether a "
      "classical model explains the result");
  cmd->add_option("device", args->device, "device file (macroreal-device/1); - reads stdin");
  cmd->add_option("--test", args->test, "lg (Leggett-Garg K_3, default) or nsit (A -> B)")
      ->check(CLI::IsMember({"lg", "nsit"}));
  cmd->add_option("--sigma", args->sigma, "required significance in standard errors (default 5)");
  cmd->add_option("--power", args->power, "required power (default 0.8)");
  cmd->add_flag("--json", args->json, "write one JSON object instead of the text report");
  cmd->add_option("--map", args->map,
                  "grid of hours to a conclusive test over two parameters given as ranges in the "
                  "device file (CSV with the feasibility boundary)")
      ->type_name("P1,P2");
  cmd->add_option("--shard", args->shard, "with --map: compute part k of N (a part file)")
      ->type_name("k/N");
  cmd->add_option("--merge", args->merge, "join map part files into the final CSV")
      ->type_name("PART...");
  cmd->add_option("--threads", args->threads, "OpenMP threads for --map (default: all)");
  cmd->add_option("--figures", args->figures,
                  "with --map: write DIR/reach_map.svg and .png (hours on a log colour scale, "
                  "the feasibility boundary drawn)")
      ->type_name("DIR");
  cmd->add_flag("--check", args->check,
                "exit with code 1 when no conclusive test fits in the device's available hours");
  cmd->add_option("-o,--output", args->output, "write to FILE instead of standard output")
      ->type_name("FILE|-");
  cmd->footer(
      "Examples:\n"
      "  macroreal reach example_runs/devices/membrane_transmon.json\n"
      "  macroreal reach example_runs/devices/trapped_ion_mode.json --test nsit --json\n"
      "  macroreal reach example_runs/devices/trapped_ion_map.json "
      "--map occupation_after_cooling,coupling_g_over_2pi_hz -o map.csv --figures figs\n"
      "  macroreal reach dev.json --map quality_factor,qubit_t2_s --shard 2/8 -o part2.csv\n"
      "  macroreal reach --merge part1.csv part2.csv ... -o map.csv\n"
      "  macroreal reach dev.json --check || echo \"not conclusive in the time available\"\n"
      "Exit codes: 0 success, 1 with --check: no conclusive test within the available time,\n"
      "2 bad input (the message names the file and the field).");
  cmd->callback([args] { set_action([args] { return run_reach(*args); }); });
}

namespace {
const CommandRegistration reach_registration{70, "reach", register_reach};
}  // namespace

}  // namespace macroreal::apps
