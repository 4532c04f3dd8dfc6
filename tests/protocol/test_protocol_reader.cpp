// Protocol reader: every error path names the JSON path and the rule; defaults; generated
// sequences. The rules checked are those of DESIGN.md section 8 (the file format); the closed
// forms used to confirm that parameters reach the states are those of DESIGN.md section 2.
#include <cmath>
#include <string>
#include <tuple>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "core/error.hpp"
#include "core/types.hpp"
#include "protocol/protocol_reader.hpp"
#include "support/compare.hpp"

using namespace macroreal;
using nlohmann::json;

namespace {

json base_doc() {
  return json::parse(R"({
    "format": "macroreal-protocol/1",
    "title": "reader test, invented",
    "state": {"kind": "thermal", "nbar": 0.3},
    "measurements": {
      "A": {"beta": [2.0, 0.0], "time_s": 0.0},
      "B": {"beta_polar": [2.0, 60.0], "time_s": 1e-4},
      "C": {"beta_polar": [2.0, 120.0], "time_s": 2e-4}
    },
    "sequences": [
      {"name": "AB+", "steps": ["A", "B"], "dark_is": ["+", "+"]},
      {"name": "AB-", "steps": ["A", "B"], "dark_is": ["-", "+"]}
    ],
    "tests": [{"kind": "leggett-garg", "order": ["A", "B", "C"]}]
  })");
}

// Parses `doc` and requires an InputError at `where` whose message contains `rule`.
void require_error(const json& doc, const std::string& where, const std::string& rule) {
  try {
    parse_protocol(doc, "test.json");
    FAIL("no error for " << where);
  } catch (const InputError& e) {
    INFO("what(): " << e.what());
    CHECK(e.file() == "test.json");
    CHECK(e.where() == where);
    CHECK(e.message().find(rule) != std::string::npos);
    CHECK(std::string(e.what()).find(where) != std::string::npos);
  }
}

std::vector<std::string> names(const Protocol& p) {
  std::vector<std::string> n;
  for (const auto& s : p.sequences) n.push_back(s.name);
  return n;
}

}  // namespace

TEST_CASE("Protocol reader: defaults of DESIGN.md section 8", "[protocol]") {
  const Protocol p = parse_protocol(base_doc(), "test.json");
  CHECK(p.title == "reader test, invented");
  CHECK(p.readout == Readout::destructive);
  const auto& a = p.measurement("A").measurement;
  CHECK(a.split == Split::symmetric);
  CHECK(a.contrast == 1.0);
  CHECK(a.phase_rad == 0.0);
  CHECK(p.noise.heating_quanta_per_s == 0.0);
  CHECK(p.noise.damping_rate_per_s == 0.0);
  CHECK(p.noise.bath_nbar == 0.0);
  CHECK(p.noise.dephasing_rate_per_s == 0.0);
  CHECK(p.noise.frequency_noise_sd_rad_per_s == 0.0);
  CHECK(p.noise.force_noise_quanta_per_s == 0.0);
  CHECK(p.detection.dark_read_bright == 0.0);
  CHECK(p.detection.bright_read_dark == 0.0);
  CHECK_FALSE(p.detection.threshold.has_value());
  // beta_polar = [modulus, angle in degrees] (DESIGN.md section 8): 2 e^{i 60 deg} = 1 + i sqrt3.
  const cplx b = p.measurement("B").measurement.beta;
  CHECK_CLOSE(b.real(), 1.0, 1e-14, 0);
  CHECK_CLOSE(b.imag(), std::sqrt(3.0), 1e-14, 0);
  CHECK(p.measurement("C").time_s == 2e-4);
}

TEST_CASE("Protocol reader: explicit fields are read", "[protocol]") {
  json d = base_doc();
  d["readout"] = "nondestructive";
  d["measurements"]["A"]["split"] = "one-sided";
  d["measurements"]["A"]["contrast"] = 0.9;
  d["measurements"]["A"]["phase_deg"] = 90.0;
  d["noise"] = {{"heating_quanta_per_s", 20.0}, {"force_noise_quanta_per_s", 3.0},
                {"frequency_noise_sd_rad_per_s", 5.0}};
  d["detection"] = {{"dark_read_bright", 1e-3}, {"bright_read_dark", 2e-3}, {"threshold", 1.5}};
  const Protocol p = parse_protocol(d, "test.json");
  CHECK(p.readout == Readout::nondestructive);
  const auto& a = p.measurement("A").measurement;
  CHECK(a.split == Split::one_sided);
  CHECK(a.contrast == 0.9);
  CHECK_CLOSE(a.phase_rad, kPi / 2, 1e-15, 0);
  CHECK(p.noise.heating_quanta_per_s == 20.0);
  CHECK(p.noise.force_noise_quanta_per_s == 3.0);
  CHECK(p.noise.frequency_noise_sd_rad_per_s == 5.0);
  CHECK(p.detection.bright_read_dark == 2e-3);
  REQUIRE(p.detection.threshold.has_value());
  CHECK(*p.detection.threshold == 1.5);
  // The sequence's measurements carry the noise and times.
  const auto seq = p.sequence_of({"A", "C"});
  REQUIRE(seq.steps.size() == 2);
  CHECK(seq.steps[1].time_s == 2e-4);
  CHECK(seq.noise.heating_quanta_per_s == 20.0);
}

TEST_CASE("Protocol reader: generated sequences are named <steps><signs>", "[protocol]") {
  SECTION("destructive: NSIT A->B needs B, AB+, AB-") {
    json d = base_doc();
    d.erase("sequences");
    d["tests"] = json::parse(R"([{"kind": "nsit", "from": "A", "to": "B"}])");
    const Protocol p = parse_protocol(d, "test.json");
    CHECK(names(p) == std::vector<std::string>{"B", "AB+", "AB-"});
    for (const auto& s : p.sequences) CHECK(s.generated);
    CHECK(p.find_sequence("AB-")->dark_is == std::vector<int>{-1, +1});
  }
  SECTION("destructive: listed configurations are not generated again") {
    const Protocol p = parse_protocol(base_doc(), "test.json");
    CHECK(names(p) == std::vector<std::string>{"AB+", "AB-", "AC+", "AC-", "BC+", "BC-"});
    CHECK_FALSE(p.sequences[0].generated);
    CHECK(p.sequences[2].generated);
  }
  SECTION("destructive: three steps give four dark patterns") {
    CHECK(generated_sequence_name({"A", "B", "C"}, {-1, +1, +1}, Readout::destructive) == "ABC-+");
  }
  SECTION("nondestructive: one sequence per step set, all dark +") {
    json d = base_doc();
    d["readout"] = "nondestructive";
    d["sequences"] = json::array();
    const Protocol p = parse_protocol(d, "test.json");
    CHECK(names(p) == std::vector<std::string>{"AB", "AC", "BC"});
    CHECK(p.sequences[0].dark_is == std::vector<int>{+1, +1});
  }
  SECTION("generation can be switched off") {
    ProtocolReadOptions o;
    o.generate_needed_sequences = false;
    CHECK(parse_protocol(base_doc(), "test.json", o).sequences.size() == 2);
  }
  SECTION("a listed name that a generated sequence needs is an error") {
    json d = base_doc();
    d["sequences"][1] = json::parse(R"({"name": "AC+", "steps": ["B"], "dark_is": ["+"]})");
    require_error(d, "sequences[1].name", "reserved for the generated sequence");
  }
  SECTION("step sets of the tests") {
    json d = base_doc();
    d["tests"].push_back(json::parse(R"({"kind": "nsit", "from": "B", "to": "C"})"));
    const auto sets = parse_protocol(d, "test.json").step_sets_needed();
    using V = std::vector<std::string>;
    CHECK(sets == std::vector<V>{V{"A", "B"}, V{"A", "C"}, V{"B", "C"}, V{"C"}});
  }
}

TEST_CASE("Protocol reader: error paths name the field and the rule", "[protocol]") {
  json d = base_doc();
  SECTION("format") {
    d["format"] = "macroreal-protocol/2";
    require_error(d, "format", "but must be \"macroreal-protocol/1\"");
    d.erase("format");
    require_error(d, "format", "required field 'format' is missing");
  }
  SECTION("unknown fields") {
    d["colour"] = "blue";
    require_error(d, "colour", "unknown field 'colour'");
    d = base_doc();
    d["measurements"]["A"]["bta"] = 1.0;
    require_error(d, "measurements.A.bta", "unknown field 'bta'");
    d = base_doc();
    d["noise"] = {{"heating", 1.0}};
    require_error(d, "noise.heating", "unknown field");
    d = base_doc();
    d["state"]["n"] = 1;
    require_error(d, "state.n", "unknown field 'n'");
  }
  SECTION("wrong types") {
    d["measurements"]["A"]["contrast"] = "high";
    require_error(d, "measurements.A.contrast", "contrast must be a number, got string");
    d = base_doc();
    d["measurements"]["B"]["beta_polar"] = json::array({2.0});
    require_error(d, "measurements.B.beta_polar", "pair [modulus, angle_deg]");
    d = base_doc();
    d["measurements"]["A"]["beta"] = json::array({2.0, "x"});
    require_error(d, "measurements.A.beta[1]", "must be a number");
    d = base_doc();
    d["sequences"] = json::object();
    require_error(d, "sequences", "must be an array");
    d = base_doc();
    d["title"] = 3;
    require_error(d, "title", "title must be a string, got number");
  }
  SECTION("beta and beta_polar: exactly one") {
    d["measurements"]["B"]["beta"] = json::array({1.0, 0.0});
    require_error(d, "measurements.B.beta", "both beta and beta_polar are given");
    d = base_doc();
    d["measurements"]["B"].erase("beta_polar");
    require_error(d, "measurements.B.beta", "neither beta nor beta_polar is given");
  }
  SECTION("ranges") {
    d["measurements"]["A"]["contrast"] = 1.2;
    require_error(d, "measurements.A.contrast", "contrast = 1.2, but must be in [0, 1]");
    d = base_doc();
    d["state"]["nbar"] = -0.5;
    require_error(d, "state.nbar", "nbar = -0.5, but must be >= 0");
    d = base_doc();
    d["noise"] = {{"heating_quanta_per_s", -1.0}};
    require_error(d, "noise.heating_quanta_per_s", "heating_quanta_per_s = -1, but must be >= 0");
    d = base_doc();
    d["detection"] = {{"dark_read_bright", 1.5}};
    require_error(d, "detection.dark_read_bright", "but must be in [0, 1]");
    d = base_doc();
    d["measurements"]["A"]["time_s"] = -1.0;
    require_error(d, "measurements.A.time_s", "but must be >= 0");
    d = base_doc();
    d["measurements"]["A"]["split"] = "sideways";
    require_error(d, "measurements.A.split", "must be \"symmetric\" or \"one-sided\"");
    d = base_doc();
    d["readout"] = "sometimes";
    require_error(d, "readout", "must be \"destructive\" or \"nondestructive\"");
  }
  SECTION("sequences") {
    d["sequences"][1]["steps"] = json::array({"B", "A"});
    require_error(d, "sequences[1].steps[1]", "times must not decrease along a sequence");
    d = base_doc();
    d["sequences"][0]["steps"] = json::array({"A", "Z"});
    require_error(d, "sequences[0].steps[1]", "measurement 'Z' is not defined");
    d = base_doc();
    d["sequences"][0]["dark_is"] = json::array({"+"});
    require_error(d, "sequences[0].dark_is", "dark_is has 1 entries, but steps has 2");
    d = base_doc();
    d["sequences"][1]["dark_is"] = json::array({"dark", "+"});
    require_error(d, "sequences[1].dark_is[0]", "but must be \"+\" or \"-\"");
    d = base_doc();
    d["sequences"][1]["name"] = "AB+";
    require_error(d, "sequences[1].name", "must be unique");
  }
  SECTION("tests") {
    d["tests"][0]["order"] = json::array({"A", "B", "Z"});
    require_error(d, "tests[0].order[2]", "measurement 'Z' is not defined");
    d = base_doc();
    d["tests"][0]["order"] = json::array({"A", "B"});
    require_error(d, "tests[0].order", "needs at least 3");
    d = base_doc();
    d["tests"][0]["order"] = json::array({"A", "C", "B"});
    require_error(d, "tests[0].order[2]", "times must not decrease");
    d = base_doc();
    d["tests"] = json::parse(R"([{"kind": "nsit", "from": "Z", "to": "B"}])");
    require_error(d, "tests[0].from", "measurement 'Z' is not defined");
    d["tests"] = json::parse(R"([{"kind": "nsit", "from": "B", "to": "A"}])");
    require_error(d, "tests[0].to", "must not come before 'from'");
    d["tests"] = json::parse(R"([{"kind": "nsit", "from": "A", "to": "B", "margin": -0.1}])");
    require_error(d, "tests[0].margin", "margin = -0.1, but must be >= 0");
    d["tests"] = json::parse(R"([{"kind": "bell"}])");
    require_error(d, "tests[0].kind", "must be \"leggett-garg\" or \"nsit\"");
  }
  SECTION("measurement names") {
    d["measurements"]["A+"] = {{"beta", {1.0, 0.0}}};
    require_error(d, "measurements.A+", "letters, digits and '_'");
  }
}

TEST_CASE("Protocol reader: states of every kind", "[protocol]") {
  const auto state_of = [](const char* text) {
    return parse_state(json::parse(text), "test.json", "state");
  };
  SECTION("thermal and coherent reach their closed forms") {
    // DESIGN.md section 2: thermal chi = exp(-(nbar + 1/2)|b|^2); coherent
    // chi = exp(-|b|^2/2 + b a* - b* a) (Glauber, Phys. Rev. 131, 2766 (1963)).
    const cplx b(0.7, -0.4);
    CHECK_CLOSE(state_of(R"({"kind": "thermal", "nbar": 0.3})")->characteristic(b).real(),
                std::exp(-(0.3 + 0.5) * std::norm(b)), 1e-14, 0);
    const cplx a(1.0, 0.5);
    const cplx expect = std::exp(-std::norm(b) / 2 + b * std::conj(a) - std::conj(b) * a);
    const cplx got = state_of(R"({"kind": "coherent", "alpha": [1.0, 0.5]})")->characteristic(b);
    CHECK_CLOSE(got.real(), expect.real(), 1e-14, 0);
    CHECK_CLOSE(got.imag(), expect.imag(), 1e-14, 0);
  }
  SECTION("cat alpha as number or pair, squeezed, fock, superposition, mixture, prepared") {
    CHECK(state_of(R"({"kind": "cat", "alpha": 2.0, "relative_phase_deg": 180})"));
    CHECK(state_of(R"({"kind": "cat", "alpha": [2.0, 1.0]})"));
    CHECK(state_of(R"({"kind": "squeezed", "r": 0.5, "theta_deg": 30, "nbar": 0.1,
                        "alpha": [1, 0]})"));
    CHECK_FALSE(state_of(R"({"kind": "fock", "n": 1})")->wigner_nonnegative());
    CHECK(state_of(R"({"kind": "superposition", "components": [
             {"amplitude": [1, 0], "coherent": [1, 0]}, {"amplitude": 1, "fock": 2}]})"));
    CHECK(state_of(R"({"kind": "mixture", "components": [
             {"weight": 1, "state": {"kind": "thermal", "nbar": 0}},
             {"weight": 3, "state": {"kind": "coherent", "alpha": [1, 0]}}]})"));
    const auto prepared = state_of(R"({"kind": "prepared", "from": {"kind": "fock", "n": 0},
        "steps": [{"beta": [3, 0]}, {"beta_polar": [1, 90], "split": "one-sided"}],
        "outcomes": "+-"})");
    CHECK(std::abs(prepared->characteristic(0.0) - 1.0) < 1e-12);  // chi(0) = Tr rho = 1
  }
  SECTION("error paths inside states") {
    const auto expect = [](const char* text, const std::string& where, const std::string& rule) {
      try {
        parse_state(json::parse(text), "test.json", "state");
        FAIL("no error for " << where);
      } catch (const InputError& e) {
        INFO(e.what());
        CHECK(e.where() == where);
        CHECK(e.message().find(rule) != std::string::npos);
      }
    };
    expect(R"({"kind": "plasma"})", "state.kind", "must be one of thermal");
    expect(R"({"nbar": 1})", "state.kind", "required field 'kind' is missing");
    expect(R"({"kind": "fock", "n": 1.5})", "state.n", "n must be an integer");
    expect(R"({"kind": "fock", "n": -1})", "state.n", "n = -1, but must be in [0, 2000]");
    expect(R"({"kind": "squeezed", "r": -1})", "state.r", "r = -1, but must be >= 0");
    expect(R"({"kind": "cat", "alpha": "big"})", "state.alpha", "a number or a pair");
    expect(R"({"kind": "superposition", "components": [{"amplitude": 1, "coherent": [1, 0],
             "fock": 1}]})", "state.components[0].coherent", "both coherent and fock");
    expect(R"({"kind": "superposition", "components": []})", "state.components", "is empty");
    expect(R"({"kind": "mixture", "components": [{"weight": 1, "state": {"kind": "thermal",
             "nbar": 0}}, {"weight": -2, "state": {"kind": "thermal", "nbar": 0}}]})",
           "state.components[1].weight", "weight = -2, but must be >= 0");
    expect(R"({"kind": "prepared", "from": {"kind": "thermal", "nbar": -1},
             "steps": [{"beta": [1, 0]}], "outcomes": "+"})", "state.from.nbar", ">= 0");
    expect(R"({"kind": "prepared", "from": {"kind": "thermal", "nbar": 0},
             "steps": [{"beta": [1, 0], "contrast": 2}], "outcomes": "+"})",
           "state.steps[0].contrast", "contrast = 2, but must be in [0, 1]");
    expect(R"({"kind": "prepared", "from": {"kind": "thermal", "nbar": 0},
             "steps": [{"beta": [1, 0], "time_s": 0}], "outcomes": "+"})",
           "state.steps[0].time_s", "unknown field 'time_s'");
    expect(R"({"kind": "prepared", "from": {"kind": "thermal", "nbar": 0},
             "steps": [{"beta": [1, 0]}], "outcomes": "+-"})", "state.outcomes",
           "has 2 signs, but steps has 1");
    expect(R"({"kind": "prepared", "from": {"kind": "thermal", "nbar": 0},
             "steps": [{"beta": [1, 0]}], "outcomes": "x"})", "state.outcomes",
           "must be '+' or '-'");
  }
  SECTION("density_matrix reads its file relative to base_dir") {
    const std::string dir = std::string(MACROREAL_SOURCE_DIR) + "/protocols";
    const StatePtr s = parse_state(
        json::parse(R"({"kind": "density_matrix", "file": "fock1_tomography.csv"})"),
        "test.json", "state", dir);
    // chi(0) = Tr rho = 1 (common practice, no source); the invented file's rho_00 = 0.05,
    // rho_11 = 0.92, rho_22 = 0.03, rho_01 = 0.02. For real beta the coherence term
    // c (beta - conj beta) vanishes and chi = e^{-b^2/2} sum_n p_n L_n(b^2) with
    // L_1(x) = 1 - x, L_2(x) = 1 - 2x + x^2/2 (Abramowitz & Stegun 22.2.13).
    CHECK_CLOSE(s->characteristic(cplx(0.0, 0.0)).real(), 1.0, 1e-14, 0);
    const double x = 0.49;
    const double expected =
        std::exp(-x / 2) * (0.05 + 0.92 * (1 - x) + 0.03 * (1 - 2 * x + x * x / 2));
    CHECK_CLOSE(s->characteristic(cplx(0.7, 0.0)).real(), expected, 1e-13, 0);
    try {
      parse_state(json::parse(R"({"kind": "density_matrix", "file": "missing.csv"})"),
                  "test.json", "state", dir);
      FAIL("no error");
    } catch (const InputError& e) {
      CHECK(e.file() == "test.json");
      CHECK(e.where() == "state.file");
      CHECK(std::string(e.what()).find("missing.csv") != std::string::npos);
    }
    for (const auto& [text, where, rule] :
         {std::tuple<const char*, const char*, const char*>{
              R"({"kind": "density_matrix", "file": ""})", "state.file", "file is empty"},
          {R"({"kind": "density_matrix", "file": "a.csv", "extra": 1})", "state.extra",
           "unknown field"}}) {
      try {
        parse_state(json::parse(text), "test.json", "state", dir);
        FAIL("no error for " << where);
      } catch (const InputError& e) {
        INFO(e.what());
        CHECK(e.where() == where);
        CHECK(e.message().find(rule) != std::string::npos);
      }
    }
  }
}

TEST_CASE("Protocol reader: text input, syntax errors and missing files", "[protocol]") {
  const Protocol p = parse_protocol_text(base_doc().dump(), "<stdin>");
  CHECK(p.file == "<stdin>");
  try {
    parse_protocol_text("{\n  \"format\": \"macroreal-protocol/1\",\n  \"title\": }\n", "bad.json");
    FAIL("no error");
  } catch (const InputError& e) {
    CHECK(e.file() == "bad.json");
    CHECK(e.where() == "line 3, column 12");
    CHECK(e.message().find("not valid JSON") != std::string::npos);
  }
  CHECK_THROWS_AS(read_protocol("/nonexistent/protocol.json"), InputError);
  ProtocolReadOptions o;
  o.require_state = true;
  json d = base_doc();
  d.erase("state");
  CHECK_THROWS_AS(parse_protocol(d, "x.json", o), InputError);
  CHECK_FALSE(parse_protocol(d, "x.json").state);
}
