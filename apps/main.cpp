// The `macroreal` program: dispatches to one subcommand per file (apps/<command>.cpp).
// main() is the only place that turns a typed error into a message and an exit code.
#include <iostream>

#include <CLI/CLI.hpp>

#include "apps/commands.hpp"
#include "core/error.hpp"

int main(int argc, char** argv) {
  CLI::App app{"macroreal: Leggett-Garg and NSIT tests of mechanical oscillators"};
  app.set_version_flag("--version", std::string("macroreal ") + MACROREAL_VERSION);
  app.require_subcommand(1);
  macroreal::apps::register_all(app);
  try {
    app.parse(argc, argv);
    return macroreal::apps::run_selected(app);
  } catch (const CLI::ParseError& e) {
    const int code = app.exit(e);
    return code == 0 ? 0 : 2;
  } catch (const macroreal::InputError& e) {
    std::cerr << "macroreal: " << e.what() << "\n";
    return 2;
  } catch (const macroreal::DomainError& e) {
    std::cerr << "macroreal: " << e.what() << "\n";
    return 2;
  } catch (const macroreal::UnsupportedError& e) {
    std::cerr << "macroreal: " << e.what() << "\n";
    return 2;
  } catch (const std::exception& e) {
    std::cerr << "macroreal: internal error: " << e.what() << "\n";
    return 3;
  }
}
