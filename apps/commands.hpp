// Registration of the subcommands. Each subcommand lives in its own file (apps/<name>.cpp)
// and registers itself with a file-scope `CommandRegistration` whose function adds the
// subcommand's options and a callback storing the action to run; main() runs the selected
// action. Self-registration keeps a new command to one new file: nothing here changes.
#pragma once

#include <functional>

#include <CLI/CLI.hpp>

namespace macroreal::apps {

// The action chosen by the parsed command line; returns the exit code.
using Action = std::function<int()>;
void set_action(Action a);

using RegisterFunction = void (*)(CLI::App&);

// `rank` orders the commands in --help (the order of the user's jobs: design, analyse,
// check feasibility); ties are broken by name.
struct CommandRegistration {
  CommandRegistration(int rank, const char* name, RegisterFunction add);
};

void register_all(CLI::App& app);
int run_selected(CLI::App& app);

}  // namespace macroreal::apps
