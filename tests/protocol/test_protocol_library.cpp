// The ready protocol library (issue 6): every file that protocol_library() builds is committed
// in protocols/ byte for byte (so the files cannot drift from their builders), reads back,
// predicts with probabilities summing to 1, says "invented" in its title, and is described in
// protocols/README.md. Regenerate the files with protocols/tools/regenerate.sh (this test with
// MACROREAL_WRITE_PROTOCOLS=<folder> writes them there first).
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <set>
#include <string>

#include <catch2/catch.hpp>

#include "protocol/prediction.hpp"
#include "protocol/protocol_library.hpp"
#include "protocol/protocol_reader.hpp"
#include "protocol/protocol_writer.hpp"

using namespace macroreal;

namespace {

std::string source(const std::string& rel) { return std::string(MACROREAL_SOURCE_DIR) + "/" + rel; }

// "`name`" as the README quotes a file name (built by appending: GCC 12 warns falsely
// (-Wrestrict) on a short literal + std::string).
std::string quoted(const std::string& name) {
  std::string q(1, '`');
  q += name;
  q += '`';
  return q;
}

std::string slurp(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

}  // namespace

TEST_CASE("protocol library: committed files equal what the builders write",
          "[protocol][library]") {
  const auto library = protocol_library();
  REQUIRE(library.size() >= 7);
  if (const char* out = std::getenv("MACROREAL_WRITE_PROTOCOLS")) {
    for (const auto& e : library)
      write_protocol(e.protocol, (std::filesystem::path(out) / e.file).string());
    WARN("wrote " << library.size() << " protocol files into " << out);
  }
  const std::string readme = slurp(source("protocols/README.md"));
  std::set<std::string> files;
  for (const auto& e : library) {
    INFO(e.file);
    CHECK(files.insert(e.file).second);  // unique names
    const std::string path = source("protocols/" + e.file);
    REQUIRE(std::filesystem::exists(path));
    CHECK(slurp(path) == write_protocol_text(e.protocol));
    CHECK(e.protocol.title.find("invented") != std::string::npos);
    CHECK(readme.find(quoted(e.file)) != std::string::npos);
    const auto pred = predict(read_protocol(path));
    CHECK(pred.max_sum_deviation < 1e-9);
    CHECK(pred.status == "ok");
  }
  // Every JSON file of protocols/ is described in the README, built or hand-written.
  for (const auto& entry : std::filesystem::directory_iterator(source("protocols")))
    if (entry.path().extension() == ".json")
      CHECK(readme.find(quoted(entry.path().filename().string())) != std::string::npos);
}
