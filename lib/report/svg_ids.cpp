// Renumbering of cairo's counter-named SVG ids (svg_ids.hpp).
#include "report/svg_ids.hpp"

#include <cctype>
#include <map>
#include <iterator>
#include <string_view>

namespace macroreal::detail {

namespace {

bool is_name_char(char c) {
  return std::isalnum(static_cast<unsigned char>(c)) || c == '-' || c == '_' || c == '.' || c == ':';
}

// "surface358" -> "surface"; empty when the name is not <letters><digits>.
std::string counter_prefix(std::string_view name) {
  std::size_t k = 0;
  while (k < name.size() && std::isalpha(static_cast<unsigned char>(name[k]))) ++k;
  if (k == 0 || k == name.size()) return {};
  for (std::size_t d = k; d < name.size(); ++d)
    if (!std::isdigit(static_cast<unsigned char>(name[d]))) return {};
  return std::string(name.substr(0, k));
}

// The places where an id is defined or referred to; the name follows the marker.
constexpr std::string_view kMarkers[] = {"id=\"", "href=\"#", "url(#"};

}  // namespace

std::string renumber_svg_ids(const std::string& svg) {
  // First pass: the new name of every counter-named id, in order of definition.
  std::map<std::string, std::string, std::less<>> renamed;
  std::map<std::string, int> next;
  for (std::size_t at = svg.find(kMarkers[0]); at != std::string::npos;
       at = svg.find(kMarkers[0], at + 1)) {
    // ' id="' only: attributes such as 'glyph-id="' are not element ids.
    if (at > 0 && is_name_char(svg[at - 1])) continue;
    const std::size_t from = at + kMarkers[0].size();
    std::size_t to = from;
    while (to < svg.size() && is_name_char(svg[to])) ++to;
    const std::string name = svg.substr(from, to - from);
    const std::string prefix = counter_prefix(name);
    if (prefix.empty() || renamed.count(name)) continue;
    renamed.emplace(name, prefix + std::to_string(++next[prefix]));
  }
  if (renamed.empty()) return svg;
  // Second pass: rewrite definitions and references in one sweep (the next hit of each
  // marker is kept, so the text is scanned once per marker).
  std::string out;
  out.reserve(svg.size());
  std::size_t copied = 0, at = 0;
  std::size_t next_hit[std::size(kMarkers)];
  for (std::size_t m = 0; m < std::size(kMarkers); ++m) next_hit[m] = svg.find(kMarkers[m]);
  for (;;) {
    std::size_t m = 0;
    for (std::size_t k = 1; k < std::size(kMarkers); ++k)
      if (next_hit[k] < next_hit[m]) m = k;
    const std::size_t hit = next_hit[m];
    if (hit == std::string::npos) break;
    const std::size_t from = hit + kMarkers[m].size();
    std::size_t to = from;
    while (to < svg.size() && is_name_char(svg[to])) ++to;
    const bool attribute_id = m == 0 && hit > 0 && is_name_char(svg[hit - 1]);
    const auto found = renamed.find(std::string_view(svg).substr(from, to - from));
    if (!attribute_id && found != renamed.end()) {
      out.append(svg, copied, from - copied);
      out += found->second;
      copied = to;
    }
    at = to;
    for (std::size_t k = 0; k < std::size(kMarkers); ++k)
      if (next_hit[k] != std::string::npos && next_hit[k] < at) next_hit[k] = svg.find(kMarkers[k], at);
  }
  out.append(svg, copied, std::string::npos);
  return out;
}

}  // namespace macroreal::detail
