// Typed errors shared by every module. The library never prints or exits: bad input throws
// one of these, and the program's main() prints what() and returns 2.
#pragma once

#include <stdexcept>
#include <string>

namespace macroreal {

// A parameter outside its domain ("contrast = 1.2, but must be in [0, 1]").
class DomainError : public std::invalid_argument {
 public:
  using std::invalid_argument::invalid_argument;
};

// Bad content in an input file. Carries the file and, where known, the line, the column or
// JSON path (e.g. "measurements.B.beta"), so the user can find the offending field.
class InputError : public std::runtime_error {
 public:
  InputError(std::string file, std::string where, std::string message)
      : std::runtime_error(compose(file, where, message)),
        file_(std::move(file)), where_(std::move(where)), message_(std::move(message)) {}
  const std::string& file() const { return file_; }
  const std::string& where() const { return where_; }
  const std::string& message() const { return message_; }

 private:
  static std::string compose(const std::string& f, const std::string& w, const std::string& m) {
    std::string s = f.empty() ? std::string("input") : f;
    if (!w.empty()) s += ": " + w;
    return s + ": " + m;
  }
  std::string file_, where_, message_;
};

// A computation that cannot reach the accuracy the caller asked for, or that this engine
// cannot do at all (the message names the engine or option that can).
class UnsupportedError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

// Broken internal invariant: a bug, never the user's fault.
class InvariantError : public std::logic_error {
 public:
  using std::logic_error::logic_error;
};

[[noreturn]] void invariant_failed(const char* expr, const char* file, int line);

}  // namespace macroreal

// Always-on check for things that must never happen (also in Release builds).
#define MACROREAL_CHECK(expr) \
  ((expr) ? static_cast<void>(0) : ::macroreal::invariant_failed(#expr, __FILE__, __LINE__))
