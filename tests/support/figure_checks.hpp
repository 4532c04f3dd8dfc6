// Checks of written figure files for Catch2 tests, independent of PLplot's own account of
// what it drew: the SVG is parsed as XML by tests/support/svg_check.py (xml.etree) and the
// PNG decoded by tests/support/png_summary.py (both Python standard library only). When
// Python is missing the checks fall back to byte-level signatures and say so with WARN.
#pragma once

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <utility>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

namespace macroreal::test_support {

// JSON printed by one of the support scripts for `file` (and `args`, passed as they are), or
// null when it could not run.
inline nlohmann::json run_support_script(const std::string& script, const std::filesystem::path& file,
                                         const std::string& args = "") {
  const std::string cmd = std::string(MACROREAL_PYTHON) + " '" + MACROREAL_SOURCE_DIR +
                          "/tests/support/" + script + "' '" + file.string() + "' " + args + " 2>/dev/null";
  FILE* p = ::popen(cmd.c_str(), "r");
  if (!p) return nullptr;
  std::string out;
  char buf[512];
  while (std::fgets(buf, sizeof buf, p)) out += buf;
  if (::pclose(p) != 0 || out.empty()) return nullptr;
  return nlohmann::json::parse(out);
}

inline bool python_available() {
  return std::system((std::string(MACROREAL_PYTHON) + " -c 'import xml.etree.ElementTree, zlib' 2>/dev/null").c_str()) == 0;
}

// The SVG parses as XML, its root element is <svg>, and it draws something.
inline void check_svg_file(const std::filesystem::path& p) {
  INFO("SVG " << p.string());
  REQUIRE(std::filesystem::exists(p));
  if (!python_available()) {
    WARN("Python 3 not available: SVG parsed by signature only");
    std::ifstream in(p);
    std::ostringstream s;
    s << in.rdbuf();
    CHECK(s.str().find("<svg") != std::string::npos);
    CHECK(s.str().rfind("</svg>") != std::string::npos);
    return;
  }
  const auto j = run_support_script("svg_check.py", p);
  REQUIRE_FALSE(j.is_null());  // null: malformed XML
  CHECK(j["root"].get<std::string>() == "svg");
  CHECK(j["drawn"].get<int>() > 10);
}

// Width and height from the PNG's IHDR chunk (bytes 16-23, big-endian; PNG specification,
// ISO/IEC 15948 sec. 11.2.2), read directly: a quick size check without decoding.
inline std::pair<long, long> png_header_size(const std::filesystem::path& p) {
  std::ifstream in(p, std::ios::binary);
  unsigned char b[24] = {};
  in.read(reinterpret_cast<char*>(b), 24);
  if (in.gcount() != 24 || std::string(reinterpret_cast<char*>(b), 8) != std::string("\x89PNG\r\n\x1a\n", 8) ||
      std::string(reinterpret_cast<char*>(b + 12), 4) != "IHDR")
    return {-1, -1};
  const auto be = [&](int at) { return (long(b[at]) << 24) | (long(b[at + 1]) << 16) | (long(b[at + 2]) << 8) | long(b[at + 3]); };
  return {be(16), be(20)};
}

// The PNG has the expected size and is not blank: more than `min_fraction` of its pixels
// differ from the background and at least `min_colours` colours appear. The full decode is
// pure Python (about half a second per figure); with decode = false only the header size is
// checked, for tests that decode a few representative files of a larger set.
inline void check_png_file(const std::filesystem::path& p, int width, int height,
                           double min_fraction = 0.01, int min_colours = 3, bool decode = true) {
  INFO("PNG " << p.string());
  REQUIRE(std::filesystem::exists(p));
  const auto [w, h] = png_header_size(p);
  CHECK(w == width);
  CHECK(h == height);
  if (!decode) return;
  if (!python_available()) {
    WARN("Python 3 not available: PNG checked by signature only");
    std::ifstream in(p, std::ios::binary);
    char sig[8] = {};
    in.read(sig, 8);
    CHECK(std::string(sig, 8) == std::string("\x89PNG\r\n\x1a\n", 8));
    return;
  }
  const auto j = run_support_script("png_summary.py", p);
  REQUIRE_FALSE(j.is_null());
  CHECK(j["width"].get<int>() == width);
  CHECK(j["height"].get<int>() == height);
  CHECK(j["non_background_fraction"].get<double>() > min_fraction);
  CHECK(j["colours"].get<int>() >= min_colours);
}

// Both files of a figure written under `dir` with `stem` (see check_png_file for `decode`).
inline void check_figure_files(const std::filesystem::path& dir, const std::string& stem,
                               int width = 800, int height = 600, bool decode = true) {
  check_svg_file(dir / (stem + ".svg"));
  check_png_file(dir / (stem + ".png"), width, height, 0.01, 3, decode);
}

}  // namespace macroreal::test_support
