// Every command the README shows in a ```sh block is run, in order, from a scratch copy of
// the repository's data folders (protocols/, example_runs/), with ./build/macroreal replaced
// by the program under test; each must exit 0, and every file it names as an output
// (-o, --output, --power-curve, --write-calibration, --figures, --report, > FILE) must exist
// afterwards. Convention (DEVELOPERS.md): ```sh blocks are executed by this test; the set-up
// commands that install and build (scripts/demo.sh, scripts/test.sh) sit in a ```bash block,
// which is not (the demo they run is tests/apps/test_demo_scenario.cpp).
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <catch2/catch.hpp>

#include "support/cli_run.hpp"

namespace fs = std::filesystem;
using macroreal::test_support::slurp;

namespace {

// The commands of the ```sh blocks, continuation lines joined, comment-only lines dropped.
std::vector<std::string> readme_commands(const std::string& readme) {
  std::vector<std::string> commands;
  std::istringstream in(readme);
  std::string line, pending;
  bool inside = false;
  while (std::getline(in, line)) {
    if (!inside) {
      inside = line == "```sh";
      continue;
    }
    if (line.rfind("```", 0) == 0) {
      inside = false;
      continue;
    }
    if (!line.empty() && line.back() == '\\') {
      pending += line.substr(0, line.size() - 1) + " ";
      continue;
    }
    pending += line;
    const auto first = pending.find_first_not_of(" \t");
    if (first != std::string::npos && pending[first] != '#') commands.push_back(pending);
    pending.clear();
  }
  return commands;
}

// Words of a command (no quoting in the README's commands, so spaces split them).
std::vector<std::string> words(const std::string& command) {
  std::vector<std::string> w;
  std::istringstream in(command.substr(0, command.find(" #")));
  for (std::string s; in >> s;) w.push_back(s);
  return w;
}

std::vector<std::string> named_outputs(const std::string& command) {
  static const std::vector<std::string> flags = {"-o", "--output", "--power-curve",
                                                 "--write-calibration", "--figures", "--report", ">"};
  const auto w = words(command);
  std::vector<std::string> out;
  for (std::size_t i = 0; i + 1 < w.size(); ++i)
    for (const auto& f : flags)
      if (w[i] == f && w[i + 1] != "-") out.push_back(w[i + 1]);
  return out;
}

std::string replace_all(std::string s, const std::string& from, const std::string& to) {
  for (std::size_t at = 0; (at = s.find(from, at)) != std::string::npos; at += to.size())
    s.replace(at, from.size(), to);
  return s;
}

}  // namespace

TEST_CASE("README: every command of its sh blocks runs and makes the outputs it names",
          "[apps][readme]") {
  const fs::path source(MACROREAL_SOURCE_DIR);
  const auto commands = readme_commands(slurp(source / "README.md"));
  REQUIRE(commands.size() >= 8);  // the walkthrough of the three jobs

  const fs::path root = macroreal::test_support::scratch_dir("readme_commands") / "repo";
  fs::remove_all(root);
  fs::create_directories(root);
  for (const char* folder : {"protocols", "example_runs"})
    fs::copy(source / folder, root / folder, fs::copy_options::recursive);

  for (const auto& c : commands) {
    const std::string line = replace_all(c, "./build/macroreal", std::string("'") + MACROREAL_EXE + "'");
    const fs::path script = root / "readme_command.sh", log = root / "readme_command.log";
    std::ofstream(script) << "set -euo pipefail\n" << line << "\n";
    const std::string run = "cd '" + root.string() + "' && bash '" + script.string() + "' >'" +
                            log.string() + "' 2>&1";
    INFO("README command: " << c);
    const int status = std::system(run.c_str());
    INFO("its output:\n" << slurp(log).substr(0, 4000));
    CHECK(status == 0);
    for (const auto& o : named_outputs(c)) {
      INFO("named output " << o);
      CHECK(fs::exists(root / o));
    }
  }
}
