// Writing a Protocol back as a "macroreal-protocol/1" file (DESIGN.md section 8), so that built
// or optimised protocols can be saved and read again: read(write(p)) gives the same
// predictions. The state is written from `state_json` (kept as read, or set by the builders of
// protocol_builders.hpp); a protocol with a state but no state_json cannot be written
// (DomainError). Uncertain noise fields are written as {"mean", "sd"} or {"range"}. Generated
// sequences are not written (the reader regenerates them); listed ones are.
//
// Numbers: angles are written in degrees and displacements as beta_polar [modulus, angle_deg]
// when a short decimal reproduces the stored value exactly (e.g. 60 rather than
// 59.999999999999993), else beta [re, im]; every written number reads back to the same double.
// The layout is fixed (objects one field a line, short objects and arrays on one line), so the
// same protocol always gives the same bytes.
#pragma once

#include <string>

#include <nlohmann/json.hpp>

#include "protocol/protocol.hpp"

namespace macroreal {

// The document (keys in the written order).
nlohmann::ordered_json protocol_to_json(const Protocol& protocol);
// The text of the file, ending in a newline.
std::string write_protocol_text(const Protocol& protocol);
// Writes the file; throws InputError(path, "", ...) when it cannot be written.
void write_protocol(const Protocol& protocol, const std::string& path);

// The compact, fixed layout used for protocol files, for any JSON document: objects with one
// member a line unless the whole object fits in `width` characters on its line.
std::string layout_json(const nlohmann::ordered_json& doc, int width = 100);

}  // namespace macroreal
