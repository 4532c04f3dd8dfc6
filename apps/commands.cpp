#include "apps/commands.hpp"

#include <algorithm>
#include <string>
#include <tuple>
#include <vector>

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
}

int run_selected(CLI::App&) { return selected() ? selected()() : 2; }

}  // namespace macroreal::apps
