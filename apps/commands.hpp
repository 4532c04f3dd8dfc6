// Registration of the subcommands. Each subcommand lives in its own file
// (apps/<name>.cpp) and provides a `register_<name>(CLI::App&)` that adds its options and a
// callback storing the action to run; main() runs the selected action.
#pragma once

#include <functional>

#include <CLI/CLI.hpp>

namespace macroreal::apps {

// The action chosen by the parsed command line; returns the exit code.
using Action = std::function<int()>;
void set_action(Action a);

void register_predict(CLI::App& app);
void register_analyse(CLI::App& app);

void register_all(CLI::App& app);
int run_selected(CLI::App& app);

}  // namespace macroreal::apps
