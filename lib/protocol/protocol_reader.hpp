// Reading and validating protocol files. Every error is an InputError naming the file and the
// JSON path of the offending field (e.g. "measurements.B.beta") and the rule it breaks;
// unknown fields are errors too, so a typo never passes silently.
#pragma once

#include <string>

#include <nlohmann/json.hpp>

#include "protocol/protocol.hpp"

namespace macroreal {

struct ProtocolReadOptions {
  // Add the sequences that the tests need but the file does not list (plan, simulate,
  // predict); analyse keeps only what the file lists plus what the data names.
  bool generate_needed_sequences = true;
  // A file with no "state" is accepted (for analysis); predictions then refuse.
  bool require_state = false;
  // Folder against which relative file names in the protocol (density_matrix states) are
  // resolved. read_protocol: empty = the protocol file's own folder; parse_protocol and
  // parse_protocol_text: empty = the current directory.
  std::string base_dir;
};

Protocol read_protocol(const std::string& path, const ProtocolReadOptions& options = {});
// The text of a protocol file (e.g. read from standard input by the program); `file_label`
// names it in messages ("<stdin>"). JSON syntax errors give the line and column.
Protocol parse_protocol_text(const std::string& text, const std::string& file_label,
                             const ProtocolReadOptions& options = {});
Protocol parse_protocol(const nlohmann::json& doc, const std::string& file_label,
                        const ProtocolReadOptions& options = {});
// A state object (the "state" field or a "prepared.from"), used also for nested states.
// A "density_matrix" state reads its file (JSON or CSV by extension, fock/density_matrix_state.hpp)
// relative to `base_dir` (empty: the current directory); a bad matrix is an InputError at
// "<path>.file" carrying the matrix file's own message (e.g. the smallest eigenvalue).
StatePtr parse_state(const nlohmann::json& j, const std::string& file_label,
                     const std::string& path, const std::string& base_dir = "");

}  // namespace macroreal
