// Byte-reproducible SVG files (lib/report/svg_ids.hpp): cairo's counter-named ids are
// renumbered per file, so the same figure gives the same bytes whatever the process drew
// before. Checked on a hand-written fragment (expected text written by hand from the rule in
// svg_ids.hpp) and on real figures drawn twice in one process with other figures in between.
#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <iterator>
#include <regex>
#include <set>
#include <unistd.h>

#include "protocol/protocol_reader.hpp"
#include "report/command_figures.hpp"
#include "report/prediction_figures.hpp"
#include "report/svg_ids.hpp"

using namespace macroreal;
namespace fs = std::filesystem;

namespace {

std::string slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

}  // namespace

TEST_CASE("SVG ids: counter-named ids and their references are renumbered per prefix",
          "[report][figure]") {
  // Definitions in order: surface358 -> surface1, image362 -> image1, image365 -> image2,
  // clip7 -> clip1; a reference before its definition is rewritten too; glyph0-1 (not
  // <letters><digits>) and the attribute glyph-id="9" stay.
  const std::string in =
      "<svg><defs><symbol id=\"glyph0-1\"/><clipPath id=\"clip7\"/></defs>"
      "<g id=\"surface358\"><use xlink:href=\"#image365\"/><image id=\"image362\"/>"
      "<image id=\"image365\" glyph-id=\"9\"/><path clip-path=\"url(#clip7)\"/>"
      "<use xlink:href=\"#glyph0-1\"/><use xlink:href=\"#image362\"/></g></svg>";
  const std::string expected =
      "<svg><defs><symbol id=\"glyph0-1\"/><clipPath id=\"clip1\"/></defs>"
      "<g id=\"surface1\"><use xlink:href=\"#image2\"/><image id=\"image1\"/>"
      "<image id=\"image2\" glyph-id=\"9\"/><path clip-path=\"url(#clip1)\"/>"
      "<use xlink:href=\"#glyph0-1\"/><use xlink:href=\"#image1\"/></g></svg>";
  CHECK(detail::renumber_svg_ids(in) == expected);
  CHECK(detail::renumber_svg_ids(expected) == expected);  // already numbered: unchanged
  CHECK(detail::renumber_svg_ids("<svg/>") == "<svg/>");
}

TEST_CASE("SVG ids: the same figure drawn twice in one process, other figures between, has the same bytes",
          "[report][figure]") {
  const fs::path dir = fs::temp_directory_path() / ("macroreal_svg_ids_" + std::to_string(::getpid()));
  fs::remove_all(dir);
  const Protocol p = read_protocol(std::string(MACROREAL_SOURCE_DIR) + "/protocols/lg3_prepared_cat_conclusive.json");
  PredictionFigureOptions o;
  o.scan.points = 7;
  o.wigner.spacing = 0.25;
  std::vector<NamedFigure> figs;
  for (auto& f : prediction_figures(p, o))
    if (f.stem == "K_vs_beta_LG_ABC" || f.stem == "wigner_input") figs.push_back(std::move(f));
  REQUIRE(figs.size() == 2);
  // First the curve and the map, then the same two again after a different figure (every
  // cairo surface and image drawn in between moves cairo's counters on).
  write_figures(figs, (dir / "first").string());
  write_figures({{"other", figs[1].figure}, {"other_curve", figs[0].figure}}, (dir / "between").string());
  write_figures(figs, (dir / "second").string());
  for (const auto& f : figs)
    for (const std::string ext : {".svg", ".png"}) {
      INFO(f.stem << ext);
      const std::string a = slurp(dir / "first" / (f.stem + ext)), b = slurp(dir / "second" / (f.stem + ext));
      REQUIRE(a.size() > 1000);
      CHECK(a == b);
    }
  // The map's SVG holds a surface and images, numbered from 1 in each file.
  const std::string map = slurp(dir / "second" / "wigner_input.svg");
  const std::regex id("id=\"(surface|image)([0-9]+)\"");
  std::set<std::string> ids;
  for (auto m = std::sregex_iterator(map.begin(), map.end(), id); m != std::sregex_iterator(); ++m)
    ids.insert(m->str(1) + m->str(2));
  CHECK(ids.count("surface1") == 1);
  CHECK(ids.count("image1") == 1);
  for (const auto& s : ids) CHECK((s == "surface1" || s.rfind("image", 0) == 0));
  fs::remove_all(dir);
}
