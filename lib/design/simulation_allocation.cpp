#include "design/simulation_allocation.hpp"

#include <cmath>
#include <fstream>
#include <limits>
#include <sstream>

#include "core/error.hpp"

namespace macroreal {

namespace {

std::string known_names(const Protocol& protocol) {
  std::string s;
  for (const auto& seq : protocol.sequences) s += (s.empty() ? "" : ", ") + seq.name;
  return s;
}

}  // namespace

ShotAllocation parse_shot_allocation(const nlohmann::json& doc, const std::string& file_label,
                                     const Protocol& protocol) {
  if (!doc.is_object()) throw InputError(file_label, "", "an allocation must be a JSON object");
  if (!doc.contains("format") || !doc["format"].is_string() || doc["format"] != kAllocationFormat)
    throw InputError(file_label, "format",
                     std::string("must be \"") + kAllocationFormat + "\"");
  if (!doc.contains("shots") || !doc["shots"].is_object())
    throw InputError(file_label, "shots",
                     "must be an object of sequence name -> number of shots");
  ShotAllocation out;
  for (const auto& [name, value] : doc["shots"].items()) {
    const std::string where = "shots." + name;
    if (!protocol.find_sequence(name))
      throw InputError(file_label, where,
                       "unknown sequence '" + name + "' (the protocol has: " +
                           known_names(protocol) + ")");
    // Integers only: 1200.0 is accepted as written by some tools, 1200.5 is not.
    double x = std::numeric_limits<double>::quiet_NaN();
    if (value.is_number_integer() || value.is_number_unsigned() || value.is_number_float())
      x = value.get<double>();
    if (!value.is_number() || !std::isfinite(x) || x != std::floor(x))
      throw InputError(file_label, where,
                       "= " + value.dump() + ", but must be a non-negative integer");
    if (x < 0)
      throw InputError(file_label, where,
                       "= " + value.dump() + ", but must be a non-negative integer");
    if (x >= 2147483648.0)
      throw InputError(file_label, where,
                       "= " + value.dump() + ", but must be below 2^31 shots per sequence");
    out.shots[name] = static_cast<long>(x);
  }
  return out;
}

ShotAllocation read_shot_allocation(const std::string& path, const Protocol& protocol) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path, "", "cannot open the allocation file");
  std::ostringstream text;
  text << in.rdbuf();
  nlohmann::json doc;
  try {
    doc = nlohmann::json::parse(text.str());
  } catch (const nlohmann::json::parse_error& e) {
    throw InputError(path, "", std::string("not valid JSON: ") + e.what());
  }
  return parse_shot_allocation(doc, path, protocol);
}

std::string shot_allocation_json_text(const ShotAllocation& allocation, const Protocol& protocol) {
  nlohmann::ordered_json shots = nlohmann::ordered_json::object();
  for (const auto& seq : protocol.sequences) {
    const auto it = allocation.shots.find(seq.name);
    if (it != allocation.shots.end()) shots[seq.name] = it->second;
  }
  nlohmann::ordered_json doc;
  doc["format"] = kAllocationFormat;
  doc["shots"] = shots;
  return doc.dump(2) + "\n";
}

}  // namespace macroreal
