// Checks of the Fock-basis tabulation of states (lib/fock/fock_tabulation.hpp).
#include <cmath>
#include <fstream>

#include <catch2/catch.hpp>
#include <nlohmann/json.hpp>

#include "fock/fock_tabulation.hpp"
#include "phase_space/prepared_state.hpp"
#include "phase_space/state.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

double max_diff(const Eigen::MatrixXcd& a, const Eigen::MatrixXcd& b) {
  return (a - b).cwiseAbs().maxCoeff();
}

Eigen::MatrixXcd json_matrix(const nlohmann::json& c) {
  const int n = static_cast<int>(c["real"].size());
  Eigen::MatrixXcd m(n, n);
  for (int i = 0; i < n; ++i)
    for (int j = 0; j < n; ++j)
      m(i, j) = cplx(c["real"][i][j].get<double>(), c["imag"][i][j].get<double>());
  return m;
}

}  // namespace

TEST_CASE("fock tabulation: direct densities match QuTiP", "[fock]") {
  // Source: tests/reference/qutip_fock_states_reference.py (QuTiP 4.7 squeeze, displace,
  // thermal_dm, coherent on 200 levels; the 24-level block).
  std::ifstream in(std::string(MACROREAL_SOURCE_DIR) + "/tests/reference/qutip_fock_states_reference.json");
  REQUIRE(in.good());
  const auto ref = nlohmann::json::parse(in);
  for (const auto& c : ref["cases"]) {
    const Eigen::MatrixXcd want = json_matrix(c);
    const int n = static_cast<int>(want.rows());
    Eigen::MatrixXcd got;
    StatePtr closed;
    if (c["kind"] == "squeezed") {
      const cplx alpha(c["alpha"][0].get<double>(), c["alpha"][1].get<double>());
      got = squeezed_density(c["r"], c["theta_rad"], c["nbar"], alpha, n);
      closed = make_squeezed(c["r"], c["theta_rad"], c["nbar"], alpha);
    } else {
      const cplx alpha(c["alpha"][0].get<double>(), c["alpha"][1].get<double>());
      got = cat_density(alpha, c["relative_phase_rad"], n);
      closed = make_cat(alpha, c["relative_phase_rad"]);
    }
    INFO("case " << c["kind"]);
    CHECK(max_diff(got, want) < 1e-12);
    // Route 1 (from chi of the closed-form state) against the same QuTiP matrix.
    const double d1 = max_diff(tabulate_from_characteristic(*closed, n, {160}), want);
    INFO("route 1 difference " << d1);
    CHECK(d1 < 1e-12);
  }
}

TEST_CASE("fock tabulation: from chi reproduces the known amplitudes", "[fock]") {
  // Thermal populations nbar^m/(nbar+1)^{m+1} and coherent amplitudes
  // e^{-|a|^2/2} a^m/sqrt(m!) (Gerry & Knight, Introductory Quantum Optics, eqs. (2.141),
  // (3.22)); Fock state |n><n|.
  const int n = 40;
  CHECK(max_diff(tabulate_from_characteristic(*make_thermal(0.7), n, {120}), thermal_density(0.7, n)) < 1e-12);
  CHECK(max_diff(tabulate_from_characteristic(*make_coherent({1.2, -0.9}), n),
                 coherent_density({1.2, -0.9}, n)) < 1e-12);
  CHECK(max_diff(tabulate_from_characteristic(*make_fock(7), n), fock_density(7, n)) < 1e-12);
  CHECK(max_diff(tabulate_from_characteristic(*make_cat({2.0, 0.5}, 1.0), n),
                 cat_density({2.0, 0.5}, 1.0, n)) < 1e-12);
  // Thermal populations in closed form.
  const auto th = thermal_density(0.3, 5);
  CHECK_CLOSE(th(3, 3).real(), std::pow(0.3, 3) / std::pow(1.3, 4), 1e-16, 1e-14);
}

TEST_CASE("fock tabulation: prepared state equals Kraus-applied density", "[fock]") {
  // The prepared state rho' = K rho K^dag / p (DESIGN.md section 2) tabulated from H1's
  // Heisenberg-picture chi, against Kraus matrices applied to the base state.
  ModularMeasurement m;
  m.beta = {1.8, 0.4};
  m.phase_rad = 0.7;
  m.contrast = 0.9;
  const auto prepared = make_prepared(make_coherent({0.5, 0.2}), {m}, {+1});
  const int n = 40, big = 90;
  Eigen::MatrixXcd direct = apply_outcome(m, +1, coherent_density({0.5, 0.2}, big));
  direct /= direct.trace().real();
  CHECK(max_diff(tabulate(*prepared, n), direct.topLeftCorner(n, n)) < 1e-12);
}
