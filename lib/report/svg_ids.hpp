// Stable element ids in the SVG files cairo writes. cairo names some elements after process-wide
// counters (id="surface358", id="image362": every surface the process created before counts),
// so the same figure drawn after other figures would get other ids and other bytes. The pass
// here renames every id of the form <letters><digits> to <letters><k>, k = 1, 2, ... per prefix
// in order of definition, and rewrites the references to it (href="#...", url(#...)), so a
// figure's bytes depend only on the figure. Ids of other forms (cairo's per-document
// "glyph0-1") are already per document and are left as they are.
#pragma once

#include <string>

namespace macroreal::detail {

// The SVG text with its counter-named ids renumbered (see above); any other byte unchanged.
std::string renumber_svg_ids(const std::string& svg);

}  // namespace macroreal::detail
