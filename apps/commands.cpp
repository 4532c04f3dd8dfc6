#include "apps/commands.hpp"

#include <algorithm>
#include <fstream>
#include <iostream>
#include <iterator>
#include <sstream>
#include <string>
#include <tuple>
#include <vector>

#include "core/error.hpp"

namespace macroreal::apps {

namespace {
Action& selected() {
  static Action a;
  return a;
}

struct Entry {
  int rank;
  std::string name;
  RegisterFunction add;
};

// A function-local static, so registrations from other files' static initialisers never
// see an unconstructed vector.
std::vector<Entry>& registry() {
  static std::vector<Entry> entries;
  return entries;
}
}  // namespace

CommandRegistration::CommandRegistration(int rank, const char* name, RegisterFunction add) {
  registry().push_back({rank, name, add});
}

void set_action(Action a) { selected() = std::move(a); }

void register_all(CLI::App& app) {
  auto entries = registry();
  std::sort(entries.begin(), entries.end(), [](const Entry& a, const Entry& b) {
    return std::tie(a.rank, a.name) < std::tie(b.rank, b.name);
  });
  for (const auto& e : entries) e.add(app);
  // `macroreal <command> --version` answers like `macroreal --version`.
  for (CLI::App* sub : app.get_subcommands([](CLI::App*) { return true; }))
    sub->set_version_flag("--version", std::string("macroreal ") + MACROREAL_VERSION);
}

std::string read_input(const std::string& path) {
  if (path == "-")
    return std::string{std::istreambuf_iterator<char>(std::cin), std::istreambuf_iterator<char>()};
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path, "", "cannot open the file");
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

void write_output(const std::string& path, const std::string& text) {
  if (path == "-") {
    std::cout << text << std::flush;
    return;
  }
  std::ofstream out(path, std::ios::binary);
  if (!(out << text) || !out.flush()) throw InputError(path, "", "cannot write the output file");
}

std::string input_label(const std::string& path) { return path == "-" ? "<stdin>" : path; }

int run_selected(CLI::App&) { return selected() ? selected()() : kExitBadInput; }

}  // namespace macroreal::apps
