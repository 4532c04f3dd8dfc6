// `macroreal predict`: placeholder until its issue lands (replaced by the real subcommand).
#include "apps/commands.hpp"

namespace macroreal::apps {

void register_predict(CLI::App& app) {
  auto* cmd = app.add_subcommand("predict", "not available yet");
  cmd->callback([] { set_action([] { return 2; }); });
}

}  // namespace macroreal::apps
