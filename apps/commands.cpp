#include "apps/commands.hpp"

namespace macroreal::apps {

namespace {
Action& selected() {
  static Action a;
  return a;
}
}  // namespace

void set_action(Action a) { selected() = std::move(a); }

void register_all(CLI::App& app) {
  register_predict(app);
  register_analyse(app);
}

int run_selected(CLI::App&) { return selected() ? selected()() : 2; }

}  // namespace macroreal::apps
