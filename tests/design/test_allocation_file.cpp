// The allocation file (macroreal-allocation/1): round trip and the reader's error messages.
#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "design/allocation_file.hpp"
#include "protocol/protocol_reader.hpp"

using namespace macroreal;

namespace {
const Protocol& protocol() {
  static const Protocol p =
      read_protocol(std::string(MACROREAL_SOURCE_DIR) + "/protocols/lg3_thermal.json");
  return p;
}
}  // namespace

TEST_CASE("allocation file: written text reads back to the same shots and extra fields",
          "[design]") {
  AllocationFile a;
  const std::string first = protocol().sequences.front().name;
  const std::string last = protocol().sequences.back().name;
  a.shots[first] = 1200;
  a.shots[last] = 7;
  a.extra["test"] = "lg";
  const std::string text = allocation_file_text(a, protocol());
  const AllocationFile b = parse_allocation_file(nlohmann::json::parse(text), "x.json", protocol());
  CHECK(b.shots == a.shots);
  CHECK(b.extra["test"] == "lg");
  CHECK(text.rfind("{\n  \"format\": \"macroreal-allocation/1\",\n  \"shots\": {", 0) == 0);
}

TEST_CASE("allocation file: errors name the file, the field and the rule", "[design]") {
  const std::string first = protocol().sequences.front().name;
  auto parse = [](const std::string& t) {
    return parse_allocation_file(nlohmann::json::parse(t), "alloc.json", protocol());
  };
  CHECK_THROWS_WITH(parse(R"({"format": "other", "shots": {}})"),
                    Catch::Contains("alloc.json: format"));
  CHECK_THROWS_WITH(parse(R"({"format": "macroreal-allocation/1"})"),
                    Catch::Contains("alloc.json: shots"));
  CHECK_THROWS_WITH(parse(R"({"format": "macroreal-allocation/1", "shots": {"ZZ": 3}})"),
                    Catch::Contains("shots.ZZ: unknown sequence 'ZZ'"));
  CHECK_THROWS_WITH(
      parse(R"({"format": "macroreal-allocation/1", "shots": {")" + first + R"(": 2.5}})"),
      Catch::Contains("shots." + first + ": = 2.5, but must be a non-negative integer"));
  CHECK_THROWS_WITH(
      parse(R"({"format": "macroreal-allocation/1", "shots": {")" + first + R"(": -1}})"),
      Catch::Contains("non-negative integer"));
  CHECK(parse(R"({"format": "macroreal-allocation/1", "shots": {")" + first + R"(": 12.0}})")
            .shots.at(first) == 12);
  CHECK_THROWS_AS(read_allocation_file("/nonexistent/alloc.json", protocol()), InputError);
}
