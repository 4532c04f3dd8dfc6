// Checks of the Fock engine's own machinery (lib/fock/fock_engine.hpp): the dephasing law,
// slicing convergence, truncation control and tabulated states.
#include <cmath>
#include <cstdio>
#include <fstream>

#include <boost/math/special_functions/bessel.hpp>
#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "fock/density_matrix_state.hpp"
#include "fock/fock_engine.hpp"
#include "fock/fock_tabulation.hpp"
#include "phase_space/weyl_engine.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

MeasurementSequence one_step(cplx beta, double phase, double time_s, Split split = Split::symmetric) {
  MeasurementSequence seq;
  TimedMeasurement tm;
  tm.label = "A";
  tm.measurement.beta = beta;
  tm.measurement.phase_rad = phase;
  tm.measurement.split = split;
  tm.time_s = time_s;
  seq.steps.push_back(tm);
  return seq;
}

std::string temp_path(const std::string& name) {
  return std::string(MACROREAL_BINARY_DIR) + "/fock_test_" + name;
}

}  // namespace

TEST_CASE("Fock engine: Markovian dephasing decays a Fock coherence as exp(-kappa t (m-n)^2/2)", "[fock]") {
  // For d rho/dt = kappa D[a^dag a] rho,
  //   d rho_mn/dt = kappa (m n - m^2/2 - n^2/2) rho_mn = -kappa (m - n)^2 / 2 rho_mn
  // (published form: G. J. Milburn, Phys. Rev. A 44, 5401 (1991), the double-commutator
  // equation with H = a^dag a; see test_dephasing_published.cpp). For (|0> + |1>)/sqrt2,
  //   chi_t(b) = e^{-|b|^2/2} [1 - |b|^2/2 + i Im(b) e^{-kappa t/2}]
  // (with <1|D|0> = b e^{-|b|^2/2}, <0|D|1> = -b* e^{-|b|^2/2}, <1|D|1> = (1-|b|^2) e^{-|b|^2/2},
  // Cahill & Glauber 1969), so at phase pi/2:
  //   P(+) = 1/2 [1 - e^{-|b|^2/2} Im(b) e^{-kappa t/2}].
  const auto state = make_superposition({{PureComponent::Kind::fock, 1.0, 0.0, 0},
                                         {PureComponent::Kind::fock, 1.0, 0.0, 1}});
  const cplx beta(0.3, 0.8);
  for (double t : {0.0, 100e-6, 700e-6}) {
    auto seq = one_step(beta, kPi / 2, t);
    seq.noise.dephasing_rate_per_s = 1500.0;
    const double want =
        0.5 * (1.0 - std::exp(-std::norm(beta) / 2) * beta.imag() * std::exp(-1500.0 * t / 2));
    CHECK_CLOSE(FockEngine(state).probability(seq, {+1}).value, want, 1e-12, 0.0);
  }
  // Together with damping the generators add: coherences of a Fock superposition then also
  // shrink by e^{-gamma t/2} per unit of |m - n| at zero temperature (rho_01 -> rho_01
  // e^{-(gamma + kappa) t/2} for (|0> + |1>)/sqrt2, derived here from the component equation
  // d rho_01/dt = -(gamma/2 + kappa/2) rho_01 with the population of |1> decaying into |0>).
  auto seq = one_step(beta, kPi / 2, 200e-6);
  seq.noise.dephasing_rate_per_s = 1500.0;
  seq.noise.damping_rate_per_s = 800.0;
  // chi_t(b) = rho_00 + rho_11 (1 - |b|^2) + (rho_01 <1|D|0> + c.c.) with rho_11 = e^{-gamma t}/2.
  const double t = 200e-6, x = std::norm(beta);
  const double rho11 = 0.5 * std::exp(-800.0 * t);
  const double coh = 0.5 * std::exp(-(800.0 + 1500.0) * t / 2);
  const double im_chi = std::exp(-x / 2) * 2.0 * coh * beta.imag();  // Im of rho_01 b - rho_10 b*
  CHECK_CLOSE(FockEngine(state).probability(seq, {+1}).value, 0.5 * (1.0 - im_chi), 1e-12, 0.0);
  (void)rho11;
}

TEST_CASE("Fock engine: sliced finite-duration measurement converges as n^-2", "[fock]") {
  // Strang splitting: the difference between n and 2n slices falls by ~4 per doubling
  // (common practice, no source), and a vanishing duration gives the instantaneous value.
  const auto state = make_cat({1.2, 0.3}, 0.0);
  auto seq = one_step({1.8, 0.5}, 0.4, 10e-6);
  seq.noise.dephasing_rate_per_s = 3000.0;
  seq.noise.damping_rate_per_s = 500.0;
  std::vector<double> changes;
  for (int n : {4, 8, 16, 32}) {
    FockEngineOptions opt;
    opt.interaction_slices = n;
    opt.interaction_duration_s["A"] = 80e-6;
    changes.push_back(FockEngine(state, opt).probability_detailed(seq, {+1}).diagnostics.slicing_change);
  }
  for (std::size_t i = 1; i < changes.size(); ++i) {
    INFO("slicing change " << changes[i - 1] << " -> " << changes[i]);
    CHECK(changes[i] < changes[i - 1] / 3.5);
    CHECK(changes[i] > changes[i - 1] / 4.5);
  }
  FockEngineOptions tiny;
  tiny.interaction_duration_s["A"] = 1e-15;
  CHECK_CLOSE(FockEngine(state, tiny).probability(seq, {+1}).value,
              FockEngine(state).probability(seq, {+1}).value, 1e-12, 0.0);
}

TEST_CASE("Fock engine: truncation is detected and refused on request", "[fock]") {
  // A coherent state |alpha|=2.5 has most of its weight above 6 levels; the 25 % check must see
  // a large change (common practice, no source).
  const auto state = make_coherent({2.5, 0.0});
  MeasurementSequence seq = one_step({1.5, 0.0}, 0.0, 0.0);
  TimedMeasurement second = one_step({1.5, 0.0}, 0.0, 1e-4).steps[0];
  second.label = std::string(1, 'B');
  seq.steps.push_back(second);
  FockEngineOptions opt;
  opt.cutoff = 8;
  const auto v = FockEngine(state, opt).correlator_detailed(seq);
  CHECK(v.diagnostics.truncation_change > 1e-3);
  CHECK(v.diagnostics.edge_population > 1e-2);
  CHECK(v.value.error_estimate >= v.diagnostics.truncation_change);
  opt.truncation_tolerance = 1e-6;
  CHECK_THROWS_WITH(FockEngine(state, opt).correlator(seq),
                    Catch::Contains("truncation error") && Catch::Contains("raise the cutoff"));
  // The automatic cutoff is fine.
  FockEngineOptions automatic;
  automatic.truncation_tolerance = 1e-9;
  const auto good = FockEngine(state, automatic).correlator_detailed(seq);
  CHECK(good.diagnostics.truncation_change < 1e-9);
  CHECK_CLOSE(good.value.value, WeylEngine(state).correlator(seq).value, 1e-10, 0.0);
  // A hot thermal state does not fit: the message names the Weyl engine.
  CHECK_THROWS_WITH(FockEngine(make_thermal(1000.0)).correlator(seq), Catch::Contains("--engine weyl"));
}

TEST_CASE("density matrix files: read, checked, usable by both engines", "[fock]") {
  // A thermal state nbar = 0.4 written as a file (populations nbar^m/(nbar+1)^{m+1}, Gerry &
  // Knight eq. (2.141)) must give the closed-form thermal probabilities in both engines.
  const int n = 60;
  const Eigen::MatrixXcd th = thermal_density(0.4, n);
  const Eigen::MatrixXcd rho = th / th.trace().real();
  const std::string json_path = temp_path("thermal.json"), csv_path = temp_path("thermal.csv");
  {
    std::ofstream j(json_path);
    j.precision(17);
    j << "{\"format\": \"macroreal-density-matrix/1\", \"dimension\": " << n << ", \"real\": [";
    for (int m = 0; m < n; ++m) {
      j << (m ? "," : "") << "[";
      for (int k = 0; k < n; ++k) j << (k ? "," : "") << rho(m, k).real();
      j << "]";
    }
    j << "]}";
    std::ofstream c(csv_path);
    c.precision(17);
    c << "# invented test file\nm,n,re,im\n";
    for (int m = 0; m < n; ++m) c << m << "," << m << "," << rho(m, m).real() << ",0\n";
  }
  const auto a = read_density_matrix(json_path);
  const auto b = read_density_matrix(csv_path);
  CHECK(a->dimension() == n);
  CHECK(b->rotation_invariant());
  auto seq = one_step({1.1, -0.6}, 0.3, 50e-6);
  seq.noise.heating_quanta_per_s = 300.0;
  const double want = WeylEngine(make_thermal(0.4)).probability(seq, {-1}).value;
  CHECK_CLOSE(FockEngine(a).probability(seq, {-1}).value, want, 1e-12, 0.0);
  CHECK_CLOSE(WeylEngine(b).probability(seq, {-1}).value, want, 1e-12, 0.0);

  SECTION("non-Hermitian") {
    std::ofstream c(csv_path);
    c << "0,0,0.5,0\n1,1,0.5,0\n0,1,0.2,0\n";
    c.close();
    CHECK_THROWS_WITH(read_density_matrix(csv_path),
                      Catch::Contains(csv_path) && Catch::Contains("not Hermitian"));
  }
  SECTION("trace") {
    std::ofstream c(csv_path);
    c << "0,0,0.5\n1,1,0.4\n";
    c.close();
    CHECK_THROWS_WITH(read_density_matrix(csv_path), Catch::Contains("trace = 0.9"));
  }
  SECTION("not positive") {
    // [[0.5, 0.6], [0.6, 0.5]] has eigenvalues 1.1 and -0.1.
    std::ofstream c(csv_path);
    c << "0,0,0.5\n1,1,0.5\n0,1,0.6\n1,0,0.6\n";
    c.close();
    CHECK_THROWS_WITH(read_density_matrix(csv_path),
                      Catch::Contains("smallest eigenvalue = -0.1") && Catch::Contains(csv_path));
  }
  SECTION("bad JSON field") {
    std::ofstream j(json_path);
    j << "{\"format\": \"macroreal-density-matrix/1\", \"dimension\": 2, \"real\": [[1, 0], [0]]}";
    j.close();
    CHECK_THROWS_AS(read_density_matrix(json_path), InputError);
    CHECK_THROWS_WITH(read_density_matrix(json_path), Catch::Contains("real[1]"));
  }
  std::remove(json_path.c_str());
  std::remove(csv_path.c_str());
}

TEST_CASE("Fock engine: dephasing of a cat's interference term, Bessel-series law", "[fock]") {
  // Derived here, no source for the combination (the ingredients are standard; the published
  // check value of the dephasing law is in test_dephasing_published.cpp): dephasing
  // kappa D[a^dag a] over t is a random rotation of angle variance kappa t (both multiply
  // rho_mn by exp(-kappa t (m-n)^2/2)), so chi_t(b) = E_theta chi_0(b e^{i theta}) and every
  // angular harmonic k of chi_0 is multiplied by exp(-kappa t k^2 / 2). For the cat
  // N(|a> + e^{i phi}|-a>) (Cahill & Glauber 1969 for the coherent matrix elements):
  //   <+-a|D(g)|+-a> = exp(-|g|^2/2 +- 2i Im(g a*)),
  //   <a|D(g)|-a>    = exp(-|g|^2/2 - 2|a|^2 + 2 Re(g a*)),   <-a|D(g)|a>: a -> -a,
  // and with z = 2|a||b|, psi = arg b - arg a, the Jacobi-Anger expansions
  //   e^{i z sin x} = sum_k J_k(z) e^{i k x}   (Abramowitz & Stegun 9.1.41),
  //   e^{z cos x}   = sum_k I_k(z) e^{i k x}   (A&S 9.6.33):
  //   chi_t(b) = N^2 e^{-|b|^2/2} sum_k e^{-kappa t k^2/2} e^{i k psi}
  //              [ (1 + (-1)^k) J_k(z) + e^{-2|a|^2} (e^{i phi} + e^{-i phi} (-1)^k) I_k(z) ],
  //   N^2 = 1 / (2 + 2 cos(phi) e^{-2|a|^2}).
  // The interference (I_k) part carries weight at |k| up to about z = 2|a||b|, so it is
  // destroyed faster than the J_k part, the more so the larger the cat.
  const cplx alpha = std::polar(1.3, 0.4);
  const double phi = 0.9, kappa = 2500.0;
  const auto cat = make_cat(alpha, phi);
  for (const cplx beta : {cplx(0.4, 2.1), cplx(-1.5, 0.3)}) {
    for (double t : {0.0, 150e-6, 600e-6}) {
      const double z = 2.0 * std::abs(alpha) * std::abs(beta);
      const double psi = std::arg(beta) - std::arg(alpha);
      const double a2 = std::norm(alpha);
      cplx sum = 0.0;
      for (int k = -60; k <= 60; ++k) {
        const double sign = (k % 2 == 0) ? 1.0 : -1.0;
        const double jk = (k >= 0 ? 1.0 : sign) * boost::math::cyl_bessel_j(std::abs(k), z);
        const double ik = boost::math::cyl_bessel_i(std::abs(k), z);
        const cplx term = (1.0 + sign) * jk +
                          std::exp(-2.0 * a2) * (std::polar(1.0, phi) + std::polar(1.0, -phi) * sign) * ik;
        sum += std::exp(-kappa * t * k * k / 2.0) * std::polar(1.0, k * psi) * term;
      }
      const cplx chi = sum * std::exp(-std::norm(beta) / 2) / (2.0 + 2.0 * std::cos(phi) * std::exp(-2.0 * a2));
      const double meas_phase = 0.35;
      const double want = 0.5 * (1.0 + (std::polar(1.0, meas_phase) * chi).real());
      auto seq = one_step(beta, meas_phase, t);
      seq.noise.dephasing_rate_per_s = kappa;
      INFO("beta = " << beta << ", t = " << t);
      CHECK_CLOSE(FockEngine(cat).probability(seq, {+1}).value, want, 1e-11, 0.0);
    }
  }
}
