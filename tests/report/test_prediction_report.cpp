// Prediction report writers: JSON keys and nulls of DESIGN.md section 8, fixed-width text
// columns, verdicts and cautions (DESIGN.md section 7).
#include <sstream>
#include <string>
#include <vector>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "protocol/prediction.hpp"
#include "protocol/protocol_reader.hpp"
#include "report/prediction_report.hpp"

using namespace macroreal;

namespace {

PredictionResult shipped(const char* name) {
  return predict(read_protocol(std::string(MACROREAL_SOURCE_DIR) + "/protocols/" + name));
}

std::vector<std::string> lines(const std::string& s) {
  std::vector<std::string> v;
  std::istringstream in(s);
  for (std::string l; std::getline(in, l);) v.push_back(l);
  return v;
}

}  // namespace

TEST_CASE("Prediction report: JSON carries the section 8 keys and round-trips numbers",
          "[report]") {
  const PredictionResult r = shipped("lg3_thermal.json");
  const auto j = nlohmann::json::parse(prediction_json_text(r));
  // Six destructive two-step configurations with 3 strings each, and "B" with 2.
  REQUIRE(j["probabilities"].size() == 20);
  // JSON numbers are written with enough digits to read back the same double.
  CHECK(j["probabilities"][0]["p"].get<double>() == r.sequences[0].outcomes[0].p);
  CHECK(j["tests"][0]["K"].get<double>() == r.tests[0].lg->K);
  CHECK(j["tests"][0]["correlators"].size() == 3);
  CHECK(j["tests"][0]["versus_classical"]["kicked"] == "reproduces");
  CHECK(j["tests"][0]["family"].size() == 4);
  CHECK(j["tests"][1]["S"].is_number());
  CHECK(j["cautions"].size() >= 3);
}

TEST_CASE("Prediction report: text columns are aligned and verdicts printed", "[report]") {
  const std::string text = prediction_text(shipped("lg3_prepared_cat_conclusive.json"));
  const auto ls = lines(text);
  // In the probability table every row that has a p ends in the same column.
  std::size_t start = 0;
  while (start < ls.size() && ls[start].rfind("  sequence", 0) != 0) ++start;
  REQUIRE(start < ls.size());
  const std::size_t width = ls[start].size();
  int rows = 0;
  for (std::size_t k = start + 1; k < ls.size() && !ls[k].empty(); ++k, ++rows)
    CHECK(ls[k].size() == width);
  CHECK(rows > 10);
  CHECK(text.find("n/a") != std::string::npos);  // classical values absent for the cat
  CHECK(text.find("verdict: K = ") != std::string::npos);
  CHECK(text.find("Wigner") != std::string::npos);
  for (const auto& l : ls) CHECK(l.size() <= 100);  // wrapped for a terminal
}
