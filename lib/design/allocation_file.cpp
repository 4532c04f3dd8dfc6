#include "design/allocation_file.hpp"

#include <cmath>
#include <fstream>
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

AllocationFile parse_allocation_file(const nlohmann::json& doc, const std::string& file,
                                     const Protocol& protocol) {
  if (!doc.is_object()) throw InputError(file, "", "an allocation file must be a JSON object");
  if (!doc.contains("format") || !doc["format"].is_string() ||
      doc["format"].get<std::string>() != kAllocationFileFormat)
    throw InputError(file, "format", std::string("must be \"") + kAllocationFileFormat + "\"");
  if (!doc.contains("shots") || !doc["shots"].is_object())
    throw InputError(file, "shots", "must be an object of sequence name -> number of shots");
  AllocationFile out;
  for (const auto& [name, value] : doc["shots"].items()) {
    const std::string where = "shots." + name;
    if (!protocol.find_sequence(name))
      throw InputError(file, where, "unknown sequence '" + name + "' (the protocol has: " +
                                        known_names(protocol) + ")");
    // 1200.0 is accepted (some tools write integers as floats), 1200.5 is not.
    const double x = value.is_number() ? value.get<double>() : std::nan("");
    if (!std::isfinite(x) || x != std::floor(x) || x < 0.0 || x > 9.0e15)
      throw InputError(file, where, "= " + value.dump() +
                                        ", but must be a non-negative integer (at most 9e15)");
    out.shots[name] = static_cast<long long>(x);
  }
  for (const auto& [key, value] : doc.items())
    if (key != "format" && key != "shots") out.extra[key] = value;
  return out;
}

AllocationFile read_allocation_file(const std::string& path, const Protocol& protocol) {
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
  return parse_allocation_file(doc, path, protocol);
}

std::string allocation_file_text(const AllocationFile& allocation, const Protocol& protocol) {
  for (const auto& [name, n] : allocation.shots) {
    if (!protocol.find_sequence(name))
      throw DomainError("allocation file: '" + name + "' is not a sequence of the protocol");
    if (n < 0) throw DomainError("allocation file: shots of '" + name + "' = " +
                                 std::to_string(n) + ", but must be >= 0");
  }
  nlohmann::ordered_json shots = nlohmann::ordered_json::object();
  for (const auto& seq : protocol.sequences) {
    const auto it = allocation.shots.find(seq.name);
    if (it != allocation.shots.end()) shots[seq.name] = it->second;
  }
  nlohmann::ordered_json doc;
  doc["format"] = kAllocationFileFormat;
  doc["shots"] = shots;
  for (const auto& [key, value] : allocation.extra.items())
    if (key != "format" && key != "shots") doc[key] = value;
  return doc.dump(2) + "\n";
}

}  // namespace macroreal
