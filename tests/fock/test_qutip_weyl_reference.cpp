// The Fock engine against the QuTiP reference set of the Weyl engine
// (tests/reference/qutip_weyl_reference.py: truncated Fock space, Kraus operators from
// qutip.displace, exact Lindblad propagation, cutoff convergence < 1e-11 per case): every
// probability, correlator, last average, K_3 and NSIT difference of every case.
#include <filesystem>
#include <functional>
#include <fstream>
#include <string>
#include <vector>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "fock/fock_engine.hpp"
#include "phase_space/temporal_tests.hpp"
#include "support/compare.hpp"
#include "support/qutip_weyl_reference.hpp"

namespace {

using namespace macroreal;
using nlohmann::json;

using testing::sequence_of;
using testing::state_of;
using testing::steps_of_key;

bool has_frequency_noise(const json& c) {
  return c.at("noise").at("frequency_noise_sd_rad_per_s").get<double>() > 0.0;
}

// Compares every value of the cases selected by `take`; at least `min_cases` of them.
void check_reference_set(const std::function<bool(const json&)>& take, int min_cases) {
  const std::filesystem::path path = testing::qutip_weyl_reference_file().path;
  INFO("reference values: " << path.string());
  std::ifstream in(path);
  REQUIRE(in.good());
  const json doc = json::parse(in);
  REQUIRE(doc.at("format") == "macroreal-reference/1");
  const json& cases = doc.at("cases");
  REQUIRE(cases.size() >= 20);
  // QuTiP's values carry truncation changes < 1e-11; the Fock engine's own errors are ~1e-12.
  const double tol = 1e-9;
  double max_diff = 0.0;
  int compared = 0, taken = 0;
  for (const json& c : cases) {
    if (!take(c)) continue;
    ++taken;
    INFO("case " << c.at("name").get<std::string>());
    FockEngineOptions opt;
    opt.check_truncation = false;  // the automatic cutoff; the truncation check is tested elsewhere
    const FockEngine engine(state_of(c.at("state")), opt);
    auto compare = [&](double ours, double ref) {
      CHECK_CLOSE(ours, ref, tol, 0.0);
      max_diff = std::max(max_diff, std::abs(ours - ref));
      ++compared;
    };
    macroreal::testing::compare_reference_case(engine, c, compare);
  }
  WARN("max |Fock engine - QuTiP| = " << max_diff << " over " << compared << " values");
  CHECK(max_diff <= tol);
  CHECK(compared > 0);
  CHECK(taken >= min_cases);
}

}  // namespace

TEST_CASE("Fock engine: agrees with the QuTiP reference set (no frequency noise)", "[fock]") {
  check_reference_set([](const json& c) { return !has_frequency_noise(c); }, 15);
}

// The frequency-noise cases (quasi-static offset, 1500-4000 rad/s over up to 250 us): the
// offset is averaged by the Fock engine's nested trapezoidal rule to 1e-11 (fock_engine.hpp),
// 65-129 nodes per value. The two cases on the smallest cutoffs run by default; all of them,
// including the squeezed and thermal cases on 100-130 levels (minutes), in the long run.
TEST_CASE("Fock engine: agrees with the QuTiP reference set (frequency noise, small cutoffs)",
          "[fock]") {
  check_reference_set(
      [](const json& c) {
        const std::string name = c.at("name");
        return has_frequency_noise(c) &&
               (name == "fock1-frequency-noise" || name == "cat-phase-frequency-noise");
      },
      2);
}

TEST_CASE("Fock engine: agrees with the QuTiP reference set (every frequency-noise case)",
          "[fock][long]") {
  check_reference_set(has_frequency_noise, 5);
}
