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
#include <map>
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
// pid, different test files in one process differ in tag), removed when the process ends.
inline std::filesystem::path scratch_dir(const std::string& tag) {
  struct Owned {
    std::filesystem::path path;
    ~Owned() {
      std::error_code ec;
      std::filesystem::remove_all(path, ec);
    }
  };
  static std::map<std::string, Owned> dirs;
  auto& owned = dirs[tag];
  if (owned.path.empty())
    owned.path = std::filesystem::temp_directory_path() /
                 ("macroreal_" + tag + "_" + std::to_string(::getpid()));
  std::filesystem::create_directories(owned.path);
  return owned.path;
}

// `args` is appended to the command line as written (the caller quotes); `stdin_file`, when
// given, is redirected to the program's standard input; the program runs in `cwd` (default:
// the source directory, so relative paths such as protocols/... work).
inline CliRun run_macroreal(const std::string& args, const std::string& tag,
                            const std::string& stdin_file = "",
                            const std::filesystem::path& cwd = {}) {
  const auto d = scratch_dir(tag);
  const auto out = d / "stdout.txt", err = d / "stderr.txt";
  const std::string dir = cwd.empty() ? std::string(MACROREAL_SOURCE_DIR) : cwd.string();
  std::string cmd = "cd '" + dir + "' && '" + MACROREAL_EXE + "' " + args + " >'" +
                    out.string() + "' 2>'" + err.string() + "'";
  if (!stdin_file.empty()) cmd += " <'" + stdin_file + "'";
  const int status = std::system(cmd.c_str());
  CliRun r;
  r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  r.out = slurp(out);
  r.err = slurp(err);
  return r;
}

}  // namespace macroreal::test_support
