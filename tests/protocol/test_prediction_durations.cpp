// predict() with finite-duration measurements (duration_s, issue 4): the classical reference
// models and the closed-form NSIT decomposition treat measurements as instantaneous, so their
// values must be reported as unavailable, with a reason naming duration_s, instead of the
// numbers of the instantaneous experiment. Behaviour checks on the shipped thermal protocol.
#include <fstream>
#include <string>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "protocol/prediction.hpp"
#include "protocol/protocol_reader.hpp"
#include "report/prediction_report.hpp"

using namespace macroreal;
using nlohmann::json;

namespace {

json thermal_protocol() {
  std::ifstream in(std::string(MACROREAL_SOURCE_DIR) + "/protocols/lg3_thermal.json");
  REQUIRE(in);
  return json::parse(in);
}

}  // namespace

TEST_CASE("predict: classical values are unavailable for finite-duration measurements",
          "[protocol]") {
  json doc = thermal_protocol();
  const PredictionResult instant = predict(parse_protocol(doc, "instant.json"));
  doc["measurements"]["B"]["duration_s"] = 20e-6;
  const PredictionResult timed = predict(parse_protocol(doc, "timed.json"));
  REQUIRE(instant.tests.size() == 2);
  REQUIRE(timed.tests.size() == 2);
  const auto& lg0 = *instant.tests[0].lg;
  const auto& lg = *timed.tests[0].lg;
  const auto& ns = *timed.tests[1].nsit;
  // Without durations the classical values exist (the shipped file's own checks are in
  // test_prediction.cpp).
  REQUIRE(lg0.K_classical.has_value());
  REQUIRE(instant.tests[1].nsit->decomposition.has_value());
  // With B lasting 20 us: no classical K, no classical correlators, no classical S, and no
  // decomposition; each says why, naming the field and the measurement.
  CHECK_FALSE(lg.K_classical.has_value());
  CHECK_FALSE(lg.K_classical_kicked.has_value());
  for (const auto& pc : lg.correlators) {
    CHECK_FALSE(pc.classical.has_value());
    CHECK_FALSE(pc.classical_kicked.has_value());
  }
  CHECK_THAT(lg.classical_unavailable, Catch::Matchers::Contains("duration_s") &&
                                           Catch::Matchers::Contains("'B'"));
  CHECK(lg.versus_kicked == ClassicalVerdict::unavailable);
  CHECK_FALSE(lg.explained_by_classical_model);
  CHECK_FALSE(ns.S_classical.has_value());
  CHECK_FALSE(ns.S_classical_kicked.has_value());
  CHECK_THAT(ns.classical_unavailable, Catch::Matchers::Contains("duration_s"));
  CHECK_FALSE(ns.decomposition.has_value());
  CHECK_THAT(ns.decomposition_unavailable, Catch::Matchers::Contains("duration_s"));
  // The quantum K is still predicted and differs from the instantaneous one (heating acts
  // during B's interaction and B ends later).
  CHECK(lg.K != lg0.K);
  // The shipped file predicts K > 1 (test_prediction.cpp); the verdict then says why no
  // classical comparison is made.
  REQUIRE(lg.violation);
  CHECK_THAT(lg.verdict, Catch::Matchers::Contains("duration_s"));
  bool caution = false;
  for (const auto& c : timed.cautions) caution = caution || c.find("duration_s") != std::string::npos;
  CHECK(caution);
  // The JSON report carries null values and the reason (DESIGN.md section 8).
  const auto j = prediction_json(timed);
  bool seen = false;
  for (const auto& t : j.at("tests")) {
    if (t.at("kind") != "leggett-garg") continue;
    seen = true;
    CHECK(t.at("K_classical").is_null());
    CHECK(t.at("K_classical_kicked").is_null());
    CHECK(t.at("classical_unavailable").get<std::string>().find("duration_s") != std::string::npos);
  }
  CHECK(seen);
}
