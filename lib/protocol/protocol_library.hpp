// The ready protocol files of protocols/ as built protocols (issue 6): each entry is the file
// name and the Protocol a builder of protocol_builders.hpp makes; the committed file is
// write_protocol_text(entry.protocol), and tests/protocol/test_protocol_library.cpp checks that
// the committed bytes are identical, so the library cannot drift from its builders. Every
// setting is invented (a demonstration, not a real experiment); protocols/README.md says what
// each file is for and which classical explanation it can beat.
#pragma once

#include <string>
#include <vector>

#include "protocol/protocol.hpp"

namespace macroreal {

struct LibraryEntry {
  std::string file;     // name inside protocols/
  std::string purpose;  // one line: what the file is for
  Protocol protocol;
};

std::vector<LibraryEntry> protocol_library();

}  // namespace macroreal
