// Registration of the subcommands. Each subcommand lives in its own file (apps/<name>.cpp)
// and registers itself with a file-scope `CommandRegistration` whose function adds the
// subcommand's options and a callback storing the action to run; main() runs the selected
// action. Self-registration keeps a new command to one new file: nothing here changes.
#pragma once

#include <functional>
#include <string>

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

// Command-line conventions shared by every command: "-" names standard input (read_input)
// or standard output (write_output); a file that cannot be read or written is an InputError
// naming it (exit code 2).
std::string read_input(const std::string& path);
void write_output(const std::string& path, const std::string& text);
// The label a report prints for an input: "<stdin>" for "-", else the path.
std::string input_label(const std::string& path);

// Exit codes of every command (main() maps the typed errors to kExitBadInput).
inline constexpr int kExitOk = 0;
inline constexpr int kExitCheckFailed = 1;  // a check the user asked for (e.g. --check) failed
inline constexpr int kExitBadInput = 2;
inline constexpr int kExitInternal = 3;

}  // namespace macroreal::apps
