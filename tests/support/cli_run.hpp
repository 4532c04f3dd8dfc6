// Running the real `macroreal` executable from a Catch2 test: the command line is executed
// through the shell in the source directory (so relative paths like protocols/... work),
// with stdout and stderr captured into separate files. Only for programs linked in
// tests/apps (MACROREAL_EXE is defined there).
#pragma once

#include <sys/wait.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

namespace macroreal::test_support {

struct CliRun {
  int code = -1;
  std::string out, err;
};

inline std::string slurp(const std::filesystem::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

// A scratch directory private to this test process and `tag` (parallel ctest runs differ in
// pid, different tests in one process differ in tag).
inline std::filesystem::path scratch_dir(const std::string& tag) {
  const auto d = std::filesystem::temp_directory_path() /
                 ("macroreal_" + tag + "_" + std::to_string(::getpid()));
  std::filesystem::create_directories(d);
  return d;
}

// `args` is appended to the command line as written (the caller quotes); `stdin_file`, when
// given, is redirected to the program's standard input.
inline CliRun run_macroreal(const std::string& args, const std::string& tag,
                            const std::string& stdin_file = "") {
  const auto d = scratch_dir(tag);
  const auto out = d / "stdout.txt", err = d / "stderr.txt";
  std::string cmd = std::string("cd '") + MACROREAL_SOURCE_DIR + "' && '" + MACROREAL_EXE +
                    "' " + args + " >'" + out.string() + "' 2>'" + err.string() + "'";
  if (!stdin_file.empty()) cmd += " <'" + stdin_file + "'";
  const int status = std::system(cmd.c_str());
  CliRun r;
  r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  r.out = slurp(out);
  r.err = slurp(err);
  return r;
}

}  // namespace macroreal::test_support
