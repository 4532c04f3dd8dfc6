// Device file, physics mapping and feasibility (lib/device).
#include <catch2/catch.hpp>

#include <cmath>
#include <fstream>
#include <sstream>

#include <nlohmann/json.hpp>

#include "core/error.hpp"
#include "device/device_mapping.hpp"
#include "device/device_spec.hpp"
#include "device/feasibility.hpp"
#include "device/physical_constants.hpp"
#include "device/reach_map.hpp"
#include "fock/fock_engine.hpp"
#include "phase_space/prepared_state.hpp"
#include "phase_space/temporal_tests.hpp"
#include "report/reach_report.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

constexpr double kPiValue = 3.14159265358979323846;

std::string slurp(const std::string& p) {
  std::ifstream in(p);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

nlohmann::json base_json() {
  return nlohmann::json::parse(
      slurp(std::string(MACROREAL_SOURCE_DIR) + "/example_runs/devices/membrane_transmon.json"));
}

std::string error_of(const nlohmann::json& j) {
  try {
    parse_device(j, "dev.json");
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

// A device point in units with f = 1 Hz (only ratios matter for the mapping).
DevicePoint unit_point(double g_over_w, double q, double nth, double n0, InteractionScheme s,
                       double amount) {
  DevicePoint p;
  p.mechanical_frequency_hz = 1.0;
  p.quality_factor = q;
  // T from n_th: n = 1/(exp(h f / k T) - 1)  =>  T = h f / (k ln(1 + 1/n)).
  p.bath_temperature_k =
      nth > 0 ? codata2018::kPlanck / (codata2018::kBoltzmann * std::log1p(1.0 / nth)) : 0.0;
  p.occupation_after_cooling = n0;
  p.coupling_g_over_2pi_hz = g_over_w;
  p.scheme = s;
  if (s == InteractionScheme::echo) p.echo_half_periods = amount;
  else p.interaction_period_fraction = amount;
  p.qubit_t2_s = 1e300;
  return p;
}

}  // namespace

TEST_CASE("device file: the demo files parse and ranges expand", "[device]") {
  const DeviceSpec s = read_device(std::string(MACROREAL_SOURCE_DIR) +
                                   "/example_runs/devices/membrane_map.json");
  REQUIRE(s.ranges.size() == 2);
  const auto& t = s.ranges.at("bath_temperature_k").values;
  REQUIRE(t.size() == 6);
  CHECK(t.front() == 0.0005);
  CHECK(t.back() == 0.05);
  // Log spacing: constant ratio (10^(2/5) here; common practice, no source).
  CHECK_CLOSE(t[1] / t[0], std::pow(10.0, 0.4), 0.0, 1e-12);
  CHECK(s.base.bath_temperature_k == 0.0005);
  CHECK_FALSE(s.base.occupation_after_cooling.has_value());
  for (const char* f : {"membrane_transmon.json", "levitated_spin.json", "trapped_ion_mode.json"}) {
    const DeviceSpec d = read_device(std::string(MACROREAL_SOURCE_DIR) + "/example_runs/devices/" + f);
    CHECK(d.note.find("invented") != std::string::npos);
  }
}

TEST_CASE("device file: bad files get errors naming the field", "[device]") {
  auto j = base_json();
  j["quality_factor"] = -5;
  CHECK(error_of(j).find("quality_factor") != std::string::npos);
  CHECK(error_of(j).find("must be > 0") != std::string::npos);
  j = base_json();
  j["bath_temperature_k"] = 0;
  j.erase("occupation_after_cooling");
  CHECK(error_of(j).find("bath_temperature_k") != std::string::npos);
  CHECK(error_of(j).find("occupation_after_cooling") != std::string::npos);
  j["occupation_after_cooling"] = 0.1;  // now defined
  CHECK(error_of(j).empty());
  j = base_json();
  j["bath_temperature_mk"] = 10;
  CHECK(error_of(j).find("bath_temperature_mk: unknown unit") != std::string::npos);
  CHECK(error_of(j).find("bath_temperature_k") != std::string::npos);
  j = base_json();
  j["colour"] = "blue";
  CHECK(error_of(j).find("colour: unknown field") != std::string::npos);
  j = base_json();
  j["quality_factor"] = {{"from", 1e5}, {"to", -1}, {"steps", 3}};
  CHECK(error_of(j).find("quality_factor") != std::string::npos);
  j = base_json();
  j["qubit_t2_s"] = {{"from", 1e-5}, {"to", 1e-4}, {"steps", 2.5}};
  CHECK(error_of(j).find("qubit_t2_s.steps") != std::string::npos);
  j = base_json();
  j["format"] = "macroreal-protocol/1";
  CHECK(error_of(j).find("format") != std::string::npos);
}

TEST_CASE("Bose-Einstein occupation with CODATA 2018 constants", "[device]") {
  // hbar = h / 2 pi to the quoted digits (CODATA 2018, Rev. Mod. Phys. 93, 025010 (2021)).
  CHECK_CLOSE(codata2018::kReducedPlanck, codata2018::kPlanck / (2 * kPiValue), 0.0, 1e-9);
  // h f = k_B T gives n = 1 / (e - 1) (definition of the Bose-Einstein distribution).
  const double f = 1.5e6, t = codata2018::kPlanck * f / codata2018::kBoltzmann;
  CHECK_CLOSE(bose_einstein_occupation(f, t), 1.0 / (std::exp(1.0) - 1.0), 0.0, 1e-12);
  // High temperature: n = kT/hf - 1/2 + hf/(12 kT) + ... (series of 1/(e^x - 1), from memory).
  const double x = 1e-3;
  CHECK_CLOSE(bose_einstein_occupation(f, t / x), 1 / x - 0.5 + x / 12, 1e-9, 0.0);
  CHECK(bose_einstein_occupation(f, 0.0) == 0.0);
}

TEST_CASE("interaction displacement: closed forms vs direct integration", "[device]") {
  // alpha = -i g int_0^tau s(t) e^{i w t} dt by the composite Simpson rule (an independent
  // naive implementation of the definition in docs/device_mapping.md), beta = 2 alpha.
  auto direct = [](const DevicePoint& p) {
    const double w = 2 * kPiValue * p.mechanical_frequency_hz;
    const double g = 2 * kPiValue * p.coupling_g_over_2pi_hz;
    // Segments of constant sign: the whole interaction (free) or each half period (echo).
    const bool echo = p.scheme == InteractionScheme::echo;
    const int segments = echo ? static_cast<int>(p.echo_half_periods) : 1;
    const double len = echo ? kPiValue / w : interaction_duration_s(p);
    const int n = 2000;
    cplx total = 0.0;
    for (int k = 0; k < segments; ++k) {
      const double s = k % 2 == 0 ? 1.0 : -1.0;
      cplx sum = 0.0;
      for (int i = 0; i <= n; ++i) {
        const double t = k * len + len * i / n;
        const double wt = (i == 0 || i == n) ? 1.0 : (i % 2 ? 4.0 : 2.0);
        sum += wt * cplx(std::cos(w * t), std::sin(w * t));
      }
      total += s * sum * (len / n / 3.0);
    }
    return 2.0 * cplx(0.0, -g) * total;
  };
  for (double frac : {0.1, 0.25, 0.5, 0.8, 1.0}) {
    const DevicePoint p = unit_point(0.2, 1e6, 0, 0, InteractionScheme::free_evolution, frac);
    const cplx b = interaction_beta(p), d = direct(p);
    CHECK_CLOSE(b.real(), d.real(), 1e-9, 0.0);
    CHECK_CLOSE(b.imag(), d.imag(), 1e-9, 0.0);
    CHECK_CLOSE(std::abs(b), 4 * 0.2 * std::sin(kPiValue * frac), 1e-12, 0.0);
    const auto path = interaction_path(p, 64);
    CHECK_CLOSE(std::abs(2.0 * path.back() - b), 0.0, 1e-12, 0.0);
  }
  for (double m : {1.0, 2.0, 3.0, 6.0}) {
    // The echo with a pi pulse every half period (Simpson's rule on each half period).
    const DevicePoint p = unit_point(0.1, 1e6, 0, 0, InteractionScheme::echo, m);
    const cplx b = interaction_beta(p), d = direct(p);
    CHECK_CLOSE(b.real(), 4 * m * 0.1, 1e-12, 0.0);
    CHECK_CLOSE(std::abs(b - d), 0.0, 1e-9, 0.0);
    const auto path = interaction_path(p, 600);
    CHECK_CLOSE(std::abs(2.0 * path.back() - b), 0.0, 1e-12, 0.0);
  }
}

TEST_CASE("bath decoherence during the interaction: numeric integral vs closed form", "[device]") {
  // Closed form for free evolution with gamma tau << 1 (derived in docs/device_mapping.md):
  // int_0^tau |Gamma|^2 = (8 g^2 / w^2)(tau - sin(w tau)/w).
  for (double frac : {0.3, 0.5, 1.0}) {
    DevicePoint p = unit_point(0.2, 1e7, 1e4, 0.0, InteractionScheme::free_evolution, frac);
    const double num = -std::log(bath_contrast(p, 20000));
    const double closed = -std::log(bath_contrast_free_closed_form(p));
    CHECK_CLOSE(num, closed, 0.0, 1e-6);  // the shrink e^{-gamma tau/2} differs at 1e-7 here
  }
}

TEST_CASE("bath decoherence of the probe coherence vs QuTiP mesolve (n_th <= 5)", "[device]") {
  // Reference: tests/device/qutip_branch_coherence.py (QuTiP 4.7 mesolve of the qubit coupled
  // to the damped oscillator with the time-dependent longitudinal coupling), values committed in
  // qutip_branch_coherence.json. Our value: chi_thermal(Gamma(0)) * decay (device_mapping.hpp).
  const auto ref = nlohmann::json::parse(
      slurp(std::string(MACROREAL_SOURCE_DIR) + "/tests/device/qutip_branch_coherence.json"));
  REQUIRE(ref["cases"].size() >= 4);
  for (const auto& c : ref["cases"]) {
    const auto scheme = c["scheme"] == "echo" ? InteractionScheme::echo
                                              : InteractionScheme::free_evolution;
    const DevicePoint p = unit_point(c["g_over_w"].get<double>(), c["quality_factor"].get<double>(),
                                     c["bath_nbar"].get<double>(), c["initial_nbar"].get<double>(),
                                     scheme, c["amount"].get<double>());
    const double gamma = 2 * kPiValue / p.quality_factor;
    const double nth = bose_einstein_occupation(1.0, p.bath_temperature_k);
    CHECK_CLOSE(nth, c["bath_nbar"].get<double>(), 1e-9, 0.0);
    const auto bd = branch_decoherence(interaction_path(p, 4000), interaction_duration_s(p), gamma, nth);
    const double chi = std::exp(-(c["initial_nbar"].get<double>() + 0.5) * std::norm(bd.gamma0));
    // Tolerance: the QuTiP basis is truncated (thermal tail (n/(n+1))^levels, about 1e-7 of the
    // trace for the n = 5 case, whose coherence is only 5e-4); mesolve rtol 1e-9; our trapezoid
    // over 4000 steps about 1e-7 relative.
    INFO("case " << c.dump());
    CHECK_CLOSE(chi * bd.decay, c["re"].get<double>(), 1e-7, 1e-5);
    // The mapped measurement (instantaneous, beta = Gamma(0), contrast c_bath) on the thermal
    // input: P(+) - 1/2 = c chi(beta) / 2 is the same coherence.
    const MappedDevice m = map_device(p);
    const double mapped = m.contrast * std::exp(-(c["initial_nbar"].get<double>() + 0.5) *
                                                std::norm(m.beta));
    CHECK_CLOSE(mapped, c["re"].get<double>(), 1e-7, 1e-4);
  }
}

TEST_CASE("bath decoherence vs the Fock engine for a straight branch path (n_th <= 5)", "[device]") {
  // The Fock engine's finite-duration symmetric-split measurement applies the displacement
  // along a straight line (fock_engine.hpp): alpha(t) = (beta/2) t / T. Our formula for that path
  // must give its P(+) = 1/2 [1 + c Re(e^{i phi} chi(Gamma(0)) decay)].
  for (double nth : {0.0, 5.0}) {
    const double n0 = 1.0, gamma = 0.3, T = 0.5;
    const cplx beta(0.9, 0.4);
    const double phi = 0.7;
    std::vector<cplx> path(2001);
    for (std::size_t i = 0; i < path.size(); ++i) path[i] = 0.5 * beta * (double(i) / 2000.0);
    const auto bd = branch_decoherence(path, T, gamma, nth);
    const double chi = std::exp(-(n0 + 0.5) * std::norm(bd.gamma0));
    const double ours = 0.5 * (1.0 + (std::exp(cplx(0, phi)) * chi * bd.decay).real());
    MeasurementSequence seq;
    seq.noise.damping_rate_per_s = gamma;
    seq.noise.bath_nbar = nth;
    TimedMeasurement m;
    m.label = "A";
    m.measurement.beta = beta;
    m.measurement.phase_rad = phi;
    m.time_s = 0.0;
    m.duration_s = T;
    seq.steps.push_back(m);
    FockEngineOptions fo;
    fo.interaction_duration_s["A"] = T;
    fo.interaction_slices = 64;
    const FockEngine fock(make_thermal(n0), fo);
    INFO("n_th = " << nth);
    CHECK_CLOSE(fock.probability_value(seq, {+1}), ours, 2e-7, 0.0);
  }
}

TEST_CASE("no decoherence: the device path reproduces the Weyl engine for the mapped settings, "
          "time to conclusive from the correlators", "[device]") {
  DevicePoint p = unit_point(0.15, 1e300, 0.0, 0.0, InteractionScheme::echo, 3);
  p.mechanical_frequency_hz = 1e6;
  p.coupling_g_over_2pi_hz = 0.15e6;
  p.shot_cycle_time_s = 2e-3;
  ReachOptions opt;
  opt.elasticities = false;
  const ReachResult r = reach(p, opt);
  REQUIRE(r.routes.size() == 2);
  CHECK(r.mapped.contrast == 1.0);
  const RouteResult& prep = r.routes[1];
  REQUIRE(prep.setting_names.size() == 7);
  // Rebuild the sequence by hand from DESIGN.md's conventions: beta = 4 m g / w rotated by the
  // cumulative angle, phases as found, the post-selected input from the vacuum.
  const double b0 = 4 * 3 * 0.15;
  const auto& x = prep.settings;  // theta_PA, theta_AB, theta_BC, phi_P, phi_A, phi_B, phi_C
  ModularMeasurement mp;
  mp.beta = b0 * prep.preparation_multiple;
  mp.phase_rad = x[3];
  const auto state = std::make_shared<PreparedState>(make_thermal(0.0), std::vector<ModularMeasurement>{mp}, OutcomeString{+1});
  MeasurementSequence seq;
  double theta = 0.0;
  for (int k = 0; k < 3; ++k) {
    theta += x[static_cast<std::size_t>(k)];
    TimedMeasurement m;
    m.label = std::string(1, char('A' + k));
    m.measurement.beta = b0 * std::exp(cplx(0.0, theta));
    m.measurement.phase_rad = x[static_cast<std::size_t>(4 + k)];
    m.time_s = prep.start_times_s[static_cast<std::size_t>(k)];
    seq.steps.push_back(m);
  }
  const WeylEngine engine(state);
  const auto lg = leggett_garg3(engine, seq);
  CHECK_CLOSE(prep.value, lg.K, 1e-12, 0.0);
  REQUIRE(prep.value > 1.0);  // a cat-like input violates (DESIGN.md section 2)
  // Nondestructive readout: the per-shot variance of o_i o_j is 1 - C_ij^2; with the same cost
  // c per shot the optimum allocation (Neyman 1934) gives Var(K^) = c (sum_s sqrt(1 - C_s^2))^2 / T
  // for lab time T, so T = z^2 c (sum sqrt(1 - C^2))^2 / (K - 1)^2.
  const double c = p.shot_cycle_time_s / state->preparation_probability();
  const double s = std::sqrt(1 - lg.c12 * lg.c12) + std::sqrt(1 - lg.c23 * lg.c23) +
                   std::sqrt(1 - lg.c13 * lg.c13);
  const double z = 5.0 + 0.8416212335729143;  // Phi^-1(0.8) (normal quantile tables)
  CHECK_CLOSE(prep.seconds_needed, z * z * c * s * s / ((lg.K - 1) * (lg.K - 1)), 0.0, 1e-9);
  CHECK_CLOSE(prep.success_probability, state->preparation_probability(), 1e-15, 0.0);
}

TEST_CASE("thermal route: Leggett-Garg K equals the classical point model and stays <= 1",
          "[device]") {
  // DESIGN.md section 2: the symmetric split on a Gaussian input is reproduced by a
  // non-invasive classical point (Leggett & Garg, PRL 54, 857 (1985): K <= 1).
  const DeviceSpec spec = read_device(std::string(MACROREAL_SOURCE_DIR) +
                                      "/example_runs/devices/membrane_transmon.json");
  ReachOptions opt;
  opt.elasticities = false;
  const ReachResult r = reach(spec.base, opt);
  const RouteResult& th = r.routes[0];
  REQUIRE(th.classical_available);
  CHECK(th.value <= 1.0 + 1e-9);
  CHECK_CLOSE(th.value, th.value_classical, 1e-9, 0.0);
  CHECK_FALSE(th.can_be_conclusive);
  CHECK(std::isinf(th.seconds_needed));
}

TEST_CASE("reach map: same bytes for any thread count and for merged shards", "[device]") {
  DeviceSpec spec = read_device(std::string(MACROREAL_SOURCE_DIR) +
                                "/example_runs/devices/membrane_map.json");
  spec.ranges.at("bath_temperature_k").values.resize(3);  // a 3 x 2 corner keeps it fast
  spec.ranges.at("coupling_g_over_2pi_hz").values.resize(2);
  MapOptions mo;
  mo.threads = 1;
  const ReachMap one = reach_map(spec, "bath_temperature_k", "coupling_g_over_2pi_hz", mo);
  const std::string csv1 = map_csv_text(one, mo.reach);
  mo.threads = 2;
  const std::string csv2 =
      map_csv_text(reach_map(spec, "bath_temperature_k", "coupling_g_over_2pi_hz", mo), mo.reach);
  CHECK(csv1 == csv2);
  std::vector<std::string> parts, names;
  mo.shards = 3;
  for (int k = 3; k >= 1; --k) {  // any order
    mo.shard = k;
    parts.push_back(map_part_text(reach_map(spec, "bath_temperature_k", "coupling_g_over_2pi_hz", mo),
                                  mo.reach, k, 3));
    names.push_back("part" + std::to_string(k));
  }
  CHECK(merge_map_parts(parts, names) == csv1);
  // A missing part is an error naming how many points are missing.
  parts.pop_back();
  names.pop_back();
  CHECK_THROWS_WITH(merge_map_parts(parts, names), Catch::Contains("map points are missing"));
  // The grid has 6 rows after the two comment lines and the column line.
  CHECK(std::count(csv1.begin(), csv1.end(), '\n') == 9);
  CHECK_THROWS_AS(reach_map(spec, "quality_factor", "bath_temperature_k", mo), DomainError);
}
