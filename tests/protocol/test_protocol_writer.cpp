// Protocol writer: read(write(p)) gives the same predictions for every file in protocols/
// (the reference is the reader and engine on the original file, DESIGN.md section 8), writing
// is a fixed point (write(read(write(p))) == write(p)), uncertain noise survives, numbers are
// written as short decimals when exact, and a state without a JSON description is refused.
#include <filesystem>
#include <fstream>
#include <iterator>
#include <string>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "core/error.hpp"
#include "protocol/prediction.hpp"
#include "protocol/protocol_reader.hpp"
#include "protocol/protocol_writer.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

std::string source(const std::string& rel) { return std::string(MACROREAL_SOURCE_DIR) + "/" + rel; }

// Every sequence, outcome string and test value of `b` equals that of `a` (the same doubles
// up to one rounding: the engines are deterministic and the written numbers are exact).
void require_same_predictions(const PredictionResult& a, const PredictionResult& b) {
  REQUIRE(a.sequences.size() == b.sequences.size());
  for (std::size_t i = 0; i < a.sequences.size(); ++i) {
    INFO("sequence " << a.sequences[i].name);
    CHECK(a.sequences[i].name == b.sequences[i].name);
    REQUIRE(a.sequences[i].outcomes.size() == b.sequences[i].outcomes.size());
    for (std::size_t k = 0; k < a.sequences[i].outcomes.size(); ++k) {
      CHECK(a.sequences[i].outcomes[k].outcomes == b.sequences[i].outcomes[k].outcomes);
      CHECK_CLOSE(a.sequences[i].outcomes[k].p, b.sequences[i].outcomes[k].p, 1e-14, 0.0);
    }
  }
  REQUIRE(a.tests.size() == b.tests.size());
  for (std::size_t i = 0; i < a.tests.size(); ++i) {
    if (a.tests[i].lg) {
      REQUIRE(b.tests[i].lg);
      CHECK_CLOSE(a.tests[i].lg->K, b.tests[i].lg->K, 1e-14, 0.0);
      CHECK(a.tests[i].lg->K_classical.has_value() == b.tests[i].lg->K_classical.has_value());
    } else {
      REQUIRE(b.tests[i].nsit);
      CHECK_CLOSE(a.tests[i].nsit->S, b.tests[i].nsit->S, 1e-14, 0.0);
      CHECK(a.tests[i].nsit->margin == b.tests[i].nsit->margin);
    }
  }
  CHECK(a.title == b.title);
  CHECK(a.state_description == b.state_description);
}

}  // namespace

TEST_CASE("protocol writer: every file in protocols/ round-trips with the same predictions",
          "[protocol][writer]") {
  int files = 0;
  for (const auto& entry : std::filesystem::directory_iterator(source("protocols"))) {
    if (entry.path().extension() != ".json") continue;
    ++files;
    const std::string path = entry.path().string();
    INFO(path);
    const Protocol original = read_protocol(path);
    const std::string text = write_protocol_text(original);
    ProtocolReadOptions ro;
    ro.base_dir = source("protocols");  // density_matrix files stay relative to protocols/
    const Protocol again = parse_protocol_text(text, "<written>", ro);
    require_same_predictions(predict(original), predict(again));
    CHECK(write_protocol_text(again) == text);  // a fixed point
    // Listed sequences are written, generated ones are not (the reader regenerates them).
    const auto doc = nlohmann::json::parse(text);
    std::size_t listed = 0;
    for (const auto& s : original.sequences) listed += s.generated ? 0 : 1;
    CHECK((doc.contains("sequences") ? doc["sequences"].size() : 0u) == listed);
  }
  CHECK(files >= 8);
}

TEST_CASE("protocol writer: uncertain noise, clean numbers, refusals", "[protocol][writer]") {
  const auto doc = nlohmann::json::parse(R"({
    "format": "macroreal-protocol/1",
    "title": "writer test, invented",
    "state": {"kind": "squeezed", "r": 0.4, "theta_deg": 30.0},
    "measurements": {
      "A": {"beta_polar": [2.0, 60.0], "phase_deg": 270.0, "split": "one-sided", "time_s": 0.0},
      "B": {"beta": [1.5, -0.25], "contrast": 0.9, "time_s": 1e-4},
      "C": {"beta_polar": [1.0, 180.0], "phase_deg": 12.5, "time_s": 3e-4}
    },
    "noise": {"heating_quanta_per_s": {"mean": 30.0, "sd": 5.0},
              "bath_nbar": {"range": [0.5, 1.5]}, "damping_rate_per_s": 2.0},
    "detection": {"dark_read_bright": 0.01, "bright_read_dark": 0.02, "threshold": 3},
    "tests": [{"kind": "leggett-garg", "order": ["A", "B", "C"]},
              {"kind": "nsit", "from": "A", "to": "C", "margin": 0.02}]
  })");
  const Protocol p = parse_protocol(doc, "w.json");
  const auto out = protocol_to_json(p);
  // Short decimals where they are exact (the reader's polar and degree arithmetic).
  CHECK(out["measurements"]["A"]["beta_polar"] == nlohmann::ordered_json::array({2.0, 60.0}));
  CHECK(out["measurements"]["A"]["phase_deg"] == 270.0);
  CHECK(out["measurements"]["A"]["split"] == "one-sided");
  CHECK(out["measurements"]["B"]["beta"] == nlohmann::ordered_json::array({1.5, -0.25}));
  CHECK(out["measurements"]["B"]["contrast"] == 0.9);
  CHECK(out["measurements"]["C"]["phase_deg"] == 12.5);
  CHECK(out["noise"]["heating_quanta_per_s"]["mean"] == 30.0);
  CHECK(out["noise"]["heating_quanta_per_s"]["sd"] == 5.0);
  CHECK(out["noise"]["bath_nbar"]["range"] == nlohmann::ordered_json::array({0.5, 1.5}));
  CHECK(out["noise"]["damping_rate_per_s"] == 2.0);
  CHECK(out["detection"]["threshold"] == 3.0);
  CHECK(out.begin().key() == "format");
  Protocol with_duration = p;
  with_duration.measurements.at("B").duration_s = 2e-6;
  CHECK(protocol_to_json(with_duration)["measurements"]["B"]["duration_s"] == 2e-6);
  CHECK_FALSE(out["measurements"]["A"].contains("duration_s"));

  const Protocol q = parse_protocol_text(write_protocol_text(p), "<written>");
  REQUIRE(q.uncertain_noise.size() == 2);
  CHECK(q.uncertain_noise[0].field == "heating_quanta_per_s");
  CHECK(q.uncertain_noise[0].sd == 5.0);
  CHECK(q.uncertain_noise[1].is_range());
  CHECK(q.noise.bath_nbar == 1.0);
  CHECK(q.measurement("B").measurement.beta == p.measurement("B").measurement.beta);
  CHECK(q.measurement("C").measurement.beta == p.measurement("C").measurement.beta);
  CHECK(q.measurement("A").measurement.phase_rad == p.measurement("A").measurement.phase_rad);
  require_same_predictions(predict(p), predict(q));

  Protocol no_json = p;
  no_json.state_json = nullptr;
  CHECK_THROWS_AS(write_protocol_text(no_json), DomainError);

  const auto dir = std::filesystem::temp_directory_path() / "macroreal_writer_test";
  std::filesystem::create_directories(dir);
  write_protocol(p, (dir / "w.json").string());
  std::ifstream in(dir / "w.json", std::ios::binary);
  const std::string back{std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
  CHECK(back == write_protocol_text(p));
  std::filesystem::remove_all(dir);
  CHECK_THROWS_AS(write_protocol(p, "/nonexistent-dir/x/w.json"), InputError);
}
