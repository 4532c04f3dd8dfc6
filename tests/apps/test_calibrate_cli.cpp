// `macroreal calibrate` end to end: the invented demo (example_runs/calibration_counts.csv)
// re-run against its committed output, the JSON minimum of DESIGN.md section 8, the written
// calibration file read back, same seed same bytes, and bad input -> exit 2 with the file,
// line and field.
#include <catch2/catch.hpp>

#include <fstream>

#include <nlohmann/json.hpp>

#include "detection/calibration_file.hpp"
#include "support/cli_run.hpp"

using macroreal::test_support::run_macroreal;
using macroreal::test_support::scratch_dir;
using macroreal::test_support::slurp;

TEST_CASE("calibrate: the demo output is reproduced byte for byte", "[apps]") {
  const auto r = run_macroreal("calibrate example_runs/calibration_counts.csv", "cal_demo");
  REQUIRE(r.code == 0);
  CHECK(r.out == slurp(std::string(MACROREAL_SOURCE_DIR) + "/example_runs/calibration_report.txt"));
  const auto d = run_macroreal("calibrate example_runs/calibration_counts_decay.csv --dark-lifetime 5e-3",
                               "cal_demo_decay");
  REQUIRE(d.code == 0);
  CHECK(d.out == slurp(std::string(MACROREAL_SOURCE_DIR) + "/example_runs/calibration_report_decay.txt"));
}

TEST_CASE("calibrate --json: the DESIGN.md minimum, a readable calibration file, same bytes per seed",
          "[apps]") {
  const auto dir = scratch_dir("cal_json");
  const std::string cal = (dir / "cal.json").string();
  const auto r = run_macroreal("calibrate example_runs/calibration_counts.csv --json --bootstrap 200 --seed 5 "
                               "--write-calibration '" + cal + "'", "cal_json");
  REQUIRE(r.code == 0);
  const auto j = nlohmann::json::parse(r.out);
  CHECK(j["rates"]["dark"]["estimate"].get<double>() > 0);
  CHECK(j["rates"]["bright"]["estimate"].get<double>() > j["rates"]["dark"]["estimate"].get<double>());
  CHECK(j["threshold"].get<long>() == 2);  // floor((9.5 - 0.12) / ln(9.5 / 0.12)) = 2 for the invented truth
  CHECK(j["errors"]["dark_read_bright"]["ci"].size() == 2);
  CHECK(j["errors"]["bright_read_dark"]["level"].get<double>() == 0.95);
  CHECK(j["rows"]["read"].get<long>() == 6000);
  // Both the written file and the --json output itself are valid calibration files.
  const macroreal::Calibration c = macroreal::read_calibration(cal);
  CHECK(c.threshold == 2);
  CHECK(c.shots == 6000);
  CHECK(c.window_s == 3e-4);
  CHECK(macroreal::parse_calibration_text(r.out, "stdout").bright_rate == c.bright_rate);
  const auto again = run_macroreal("calibrate example_runs/calibration_counts.csv --json --bootstrap 200 --seed 5",
                                   "cal_json2");
  CHECK(again.out == r.out);
  const auto other = run_macroreal("calibrate example_runs/calibration_counts.csv --json --bootstrap 200 --seed 6",
                                   "cal_json3");
  CHECK(other.out != r.out);
}

TEST_CASE("calibrate: bad data exit 2 with a message naming file, line and field", "[apps]") {
  const auto dir = scratch_dir("cal_bad");
  auto write = [&](const std::string& name, const std::string& text) {
    const auto p = dir / name;
    std::ofstream(p) << text;
    return p.string();
  };
  const auto neg = run_macroreal("calibrate '" + write("neg.csv", "label,count\ndark,0\nbright,-3\n") + "'", "cal_bad1");
  CHECK(neg.code == 2);
  CHECK(neg.out.empty());
  CHECK(neg.err.find("neg.csv: line 3, field count: `-3` is negative") != std::string::npos);
  const auto frac = run_macroreal("calibrate '" + write("frac.csv", "label,count\ndark,0.5\n") + "'", "cal_bad2");
  CHECK(frac.code == 2);
  CHECK(frac.err.find("line 2, field count: `0.5` is not a non-negative integer") != std::string::npos);
  const auto single = run_macroreal("calibrate '" + write("one.csv", "label,count\ndark,4\nbright,4\nunknown,4\n") + "'",
                                    "cal_bad3");
  CHECK(single.code == 2);
  CHECK(single.err.find("single-valued histogram") != std::string::npos);
  const auto dark_only = run_macroreal("calibrate '" + write("dark.csv", "label,count\ndark,0\ndark,1\ndark,0\n") + "'",
                                       "cal_bad4");
  CHECK(dark_only.code == 2);
  CHECK(dark_only.err.find("no bright evidence") != std::string::npos);
  const auto lifetime = run_macroreal("calibrate '" + write("nowin.csv", "label,count\ndark,0\ndark,1\nbright,8\nbright,9\n") +
                                      "' --dark-lifetime 0.01", "cal_bad5");
  CHECK(lifetime.code == 2);
  CHECK(lifetime.err.find("needs the detection window length") != std::string::npos);
}
