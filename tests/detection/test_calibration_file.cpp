// The calibration file (lib/detection/calibration_file.hpp): write/read round trip, the
// DESIGN.md section 8 minimum form (bare numbers), and failure paths naming the field.
#include <catch2/catch.hpp>

#include <filesystem>

#include "core/error.hpp"
#include "detection/calibration_file.hpp"

using namespace macroreal;

namespace {

Calibration example() {
  Calibration c;
  c.dark_rate = 0.125;
  c.bright_rate = 9.5;
  c.threshold = 2;
  c.dark_read_bright = 1e-3;
  c.bright_read_dark = 2.5e-3;
  c.dark_read_bright_ci = std::make_pair(5e-4, 1.75e-3);
  c.bright_read_dark_ci = std::make_pair(1.5e-3, 4e-3);
  c.window_s = 3e-4;
  c.dark_lifetime_s = 0.05;
  c.shots = 20000;
  c.source_file = "counts.csv";
  return c;
}

std::string message_of(const std::string& text) {
  try {
    parse_calibration_text(text, "cal.json");
  } catch (const InputError& e) {
    return e.what();
  }
  return "(no error)";
}

}  // namespace

TEST_CASE("calibration file: write and read back give the same values", "[detection]") {
  const Calibration c = example();
  const Calibration r = parse_calibration_text(calibration_json(c), "x.json");
  CHECK(r.dark_rate == c.dark_rate);
  CHECK(r.bright_rate == c.bright_rate);
  CHECK(r.threshold == c.threshold);
  CHECK(r.dark_read_bright == c.dark_read_bright);
  CHECK(r.bright_read_dark == c.bright_read_dark);
  REQUIRE(r.dark_read_bright_ci);
  CHECK(r.dark_read_bright_ci->second == 1.75e-3);
  REQUIRE(r.bright_read_dark_ci);
  CHECK(r.bright_read_dark_ci->first == 1.5e-3);
  CHECK(r.window_s == 3e-4);
  REQUIRE(r.dark_lifetime_s);
  CHECK(*r.dark_lifetime_s == 0.05);
  CHECK(r.shots == 20000);
  CHECK(r.source_file == "counts.csv");
  CHECK(calibration_json(r) == calibration_json(c));  // same value, same bytes

  const auto path = std::filesystem::temp_directory_path() / "macroreal_h3_cal_roundtrip.json";
  write_calibration(c, path.string());
  CHECK(read_calibration(path.string()).bright_rate == 9.5);
  std::filesystem::remove(path);
}

TEST_CASE("calibration file: the DESIGN.md minimum with bare numbers is accepted", "[detection]") {
  const Calibration r = parse_calibration_text(
      R"({"format": "macroreal-calibration/1", "rates": {"dark": 0.1, "bright": 8},
          "threshold": 1, "errors": {"dark_read_bright": 0.004, "bright_read_dark": 0.003},
          "goodness_of_fit": {"p_value": 0.4}})",
      "min.json");
  CHECK(r.dark_rate == 0.1);
  CHECK(r.bright_read_dark == 0.003);
  CHECK(!r.dark_read_bright_ci);
  CHECK(!r.dark_lifetime_s);
  CHECK(r.window_s == 0);
}

TEST_CASE("calibration file: bad fields are InputErrors naming file and field", "[detection]") {
  const std::string head = R"({"format": "macroreal-calibration/1", )";
  CHECK(message_of(R"({"rates": {}})").find("cal.json: format: missing") != std::string::npos);
  CHECK(message_of(head + R"("rates": {"dark": 0.1}})").find("rates.bright: missing") != std::string::npos);
  CHECK(message_of(head + R"("rates": {"dark": 5, "bright": 1}, "threshold": 1})")
            .find("rates.bright: = 1, but must be above rates.dark = 5") != std::string::npos);
  CHECK(message_of(head + R"("rates": {"dark": 0.1, "bright": 8}, "threshold": -1})")
            .find("threshold: = -1, but must be >= 0") != std::string::npos);
  CHECK(message_of(head + R"("rates": {"dark": 0.1, "bright": 8}, "threshold": 1,
        "errors": {"dark_read_bright": 1.5, "bright_read_dark": 0.1}})")
            .find("errors.dark_read_bright: = 1.5, but must be in [0, 1]") != std::string::npos);
  CHECK(message_of(head + R"("rates": {"dark": 0.1, "bright": 8}, "threshold": 1,
        "errors": {"dark_read_bright": 0.01, "bright_read_dark": {"estimate": 0.2, "ci": [0.3, 0.4]}}})")
            .find("errors.bright_read_dark.ci: lower bound 0.3 above the estimate 0.2") != std::string::npos);
  CHECK(message_of(head + R"("rates": {"dark": 0.1, "bright": 8}, "threshold": 1,
        "errors": {"dark_read_bright": 0.01, "bright_read_dark": 0.01},
        "decay": {"model": "dark-pumped-to-bright", "dark_lifetime_s": 0.1}})")
            .find("window_s: needed") != std::string::npos);
  CHECK(message_of("{not json").find("cal.json: not valid JSON") != std::string::npos);
  CHECK_THROWS_AS(read_calibration("/nonexistent/cal.json"), InputError);
}
