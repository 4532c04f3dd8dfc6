// Weyl engine with rotating noise: the rotation rule, Gauss-Hermite averaging against brute
// force, dephasing against the Lindblad equation, error estimates and the refusal.
#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "phase_space/sequence_reference.hpp"
#include "phase_space/weyl_engine.hpp"
#include "support/compare.hpp"

using namespace macroreal;
using namespace macroreal::testing;

namespace {

TimedMeasurement step(cplx beta, double phase, Split s, double t) {
  TimedMeasurement m;
  m.measurement.beta = beta;
  m.measurement.phase_rad = phase;
  m.measurement.split = s;
  m.time_s = t;
  return m;
}

// E[f(Z)], Z ~ N(0, 1), by the trapezoid rule on [-12, 12] (exponentially convergent for
// smooth integrands with Gaussian decay: Trefethen & Weideman, SIAM Review 56, 385 (2014)).
template <class F>
double normal_average(F f, int points = 2001) {
  const double lo = -12.0, h = 24.0 / (points - 1);
  double s = 0.0;
  for (int i = 0; i < points; ++i) {
    const double z = lo + i * h;
    const double w = (i == 0 || i == points - 1) ? 0.5 : 1.0;
    s += w * std::exp(-0.5 * z * z) * f(z);
  }
  return s * h / std::sqrt(2.0 * kPi);
}

// The same sequence with every beta_j multiplied by e^{i theta_j} and no rotating noise.
MeasurementSequence rotated(MeasurementSequence seq, const std::vector<double>& theta) {
  for (std::size_t j = 0; j < seq.steps.size(); ++j)
    seq.steps[j].measurement.beta *= std::polar(1.0, theta[j]);
  seq.noise.dephasing_rate_per_s = 0.0;
  seq.noise.frequency_noise_sd_rad_per_s = 0.0;
  return seq;
}

}  // namespace

TEST_CASE("Rotation rule: U^dag D(b) U = D(b e^{i theta}) for U = exp(-i theta a^dag a)",
          "[phase_space]") {
  // The sign used by the engine (weyl_engine.cpp), checked on truncated matrices.
  const int dim = 60, block = 10;
  const cplx b(0.7, -0.4);
  const double theta = 0.9;
  const Mat u = rotation_matrix(dim, theta);
  const Mat lhs = u.adjoint() * displacement_matrix(dim, b) * u;
  const Mat rhs = displacement_matrix(dim, b * std::polar(1.0, theta));
  CHECK((lhs - rhs).topLeftCorner(block, block).cwiseAbs().maxCoeff() < 1e-10);
}

TEST_CASE("Quasi-static frequency noise: quadrature matches a brute-force average",
          "[phase_space]") {
  const double sigma = 1000.0;  // rad/s: angle sd 0.1 - 0.5 rad over the sequences below
  const cplx alpha(1.2, 0.5);
  const auto coh = make_coherent(alpha);
  SECTION("single measurement on a coherent state, closed-form integrand") {
    MeasurementSequence seq;
    seq.steps.push_back(step(cplx(1.5, 0.3), 0.4, Split::symmetric, 400e-6));
    seq.noise.frequency_noise_sd_rad_per_s = sigma;
    const auto v = WeylEngine(coh).probability(seq, {1});
    // P(+) = E[1/2 (1 + Re(e^{i phi} chi(beta e^{i delta t})))], DESIGN.md §2.
    const double ref = normal_average([&](double z) {
      const cplx b = cplx(1.5, 0.3) * std::polar(1.0, sigma * z * 400e-6);
      return 0.5 * (1.0 + (std::polar(1.0, 0.4) * coh->characteristic(b)).real());
    });
    CHECK(v.rotation_dimensions == 1);
    CHECK(v.hermite_nodes > 0);
    CHECK_CLOSE(v.value, ref, 1e-11, 0.0);
    CHECK(std::abs(v.value - ref) <= v.error_estimate + 1e-12);
  }
  SECTION("two-step correlator, one-sided split, with heating") {
    MeasurementSequence seq;
    seq.steps.push_back(step(cplx(1.0, 0.4), 0.2, Split::one_sided, 100e-6));
    seq.steps.push_back(step(cplx(-0.6, 1.1), -0.5, Split::symmetric, 500e-6));
    seq.noise.frequency_noise_sd_rad_per_s = sigma;
    seq.noise.heating_quanta_per_s = 200.0;
    const WeylEngine eng(coh);
    const auto v = eng.correlator(seq);
    const double ref = normal_average([&](double z) {
      const double d = sigma * z;
      return eng.correlator(rotated(seq, {d * 100e-6, d * 500e-6})).value;
    });
    CHECK(v.rotation_dimensions == 1);
    CHECK_CLOSE(v.value, ref, 1e-11, 0.0);
    CHECK(std::abs(v.value - ref) <= v.error_estimate + 1e-12);
  }
  SECTION("a loose tolerance gives an honest error estimate") {
    MeasurementSequence seq;
    seq.steps.push_back(step(cplx(1.5, 0.3), 0.4, Split::symmetric, 400e-6));
    seq.noise.frequency_noise_sd_rad_per_s = 2500.0;  // angle sd 1 rad: a harder integrand
    WeylEngineOptions opt;
    opt.initial_hermite_nodes = 4;
    opt.rotation_tolerance = 1e-6;
    const auto v = WeylEngine(coh, opt).probability(seq, {1});
    const double ref = normal_average([&](double z) {
      const cplx b = cplx(1.5, 0.3) * std::polar(1.0, 1.0 * z);
      return 0.5 * (1.0 + (std::polar(1.0, 0.4) * coh->characteristic(b)).real());
    }, 8001);
    INFO("value " << v.value << " ref " << ref << " estimate " << v.error_estimate << " nodes "
                  << v.hermite_nodes);
    CHECK(v.error_estimate <= 1e-6);
    CHECK(v.error_estimate > 1e-12);  // stopped early: the estimate is not just round-off
    CHECK(std::abs(v.value - ref) <= v.error_estimate + 1e-12);
  }
}

TEST_CASE("Quasi-static noise on a rotation-invariant state: only relative angles matter",
          "[phase_space]") {
  // The engine rotates beta_j by delta (t_j - t_0) for rotation-invariant states; the brute
  // force below rotates by the absolute angles delta t_j. Equal for a Fock state, because
  // U rho U^dag = rho (DESIGN.md §2 rotation frame).
  MeasurementSequence seq;
  seq.steps.push_back(step(cplx(1.1, 0.4), 0.3, Split::one_sided, 300e-6));
  seq.steps.push_back(step(cplx(-0.5, 1.2), -0.2, Split::symmetric, 600e-6));
  seq.noise.frequency_noise_sd_rad_per_s = 700.0;
  const WeylEngine eng(make_fock(1));
  for (int o1 : {1, -1}) {
    const auto v = eng.probability(seq, {o1, 1});
    CHECK(v.rotation_dimensions == 1);
    const double ref = normal_average([&](double z) {
      const double d = 700.0 * z;
      return eng.probability(rotated(seq, {d * 300e-6, d * 600e-6}), {o1, 1}).value;
    });
    CHECK_CLOSE(v.value, ref, 1e-11, 0.0);
  }
}

TEST_CASE("Dephasing on a thermal state: two-step correlator", "[phase_space]") {
  // For a rotation-invariant state only the angle between the measurements matters: one
  // Gaussian angle of variance kappa (t2 - t1).
  MeasurementSequence seq;
  seq.steps.push_back(step(cplx(1.4, 0.0), 0.0, Split::symmetric, 0.2));
  seq.steps.push_back(step(std::polar(1.4, 1.0), 0.3, Split::symmetric, 0.5));
  seq.noise.dephasing_rate_per_s = 0.5;
  seq.noise.heating_quanta_per_s = 0.05;
  const auto th = make_thermal(0.3);
  const WeylEngine eng(th);
  const auto v = eng.correlator(seq);
  CHECK(v.rotation_dimensions == 1);
  SECTION("against a direct 1D average over the angle") {
    const double sd = std::sqrt(0.5 * 0.3);
    const double ref = normal_average(
        [&](double z) { return eng.correlator(rotated(seq, {0.0, sd * z})).value; });
    CHECK_CLOSE(v.value, ref, 1e-11, 0.0);
  }
  SECTION("against the Lindblad equation with kappa D[a^dag a] (truncated density matrix)") {
    // sequence_reference.hpp integrates the dephasing generator itself, so this also checks
    // the equivalence of kappa D[a^dag a] with a random rotation of variance kappa dt.
    const int dim = 34;
    const Mat rho = thermal_matrix(dim, 0.3);
    double ref = 0.0;
    for (int o1 : {1, -1})
      for (int o2 : {1, -1}) ref += o1 * o2 * sequence_probability(rho, seq, {o1, o2}, 2000);
    CHECK_CLOSE(v.value, ref, 1e-8, 0.0);
  }
}

TEST_CASE("Dephasing on a coherent state against the Lindblad equation", "[phase_space]") {
  // Not rotation invariant: the angle before the first measurement counts too (2 angles).
  MeasurementSequence seq;
  seq.steps.push_back(step(cplx(0.9, 0.5), 0.1, Split::one_sided, 0.15));
  seq.steps.push_back(step(cplx(-0.4, 1.0), -0.6, Split::symmetric, 0.35));
  seq.noise.dephasing_rate_per_s = 1.5;
  const int dim = 34;
  const Vec c = coherent_vector(dim, cplx(0.8, -0.6));
  const Mat rho = c * c.adjoint();
  const WeylEngine eng(make_coherent(cplx(0.8, -0.6)));
  for (int o1 : {1, -1})
    for (int o2 : {1, -1}) {
      const auto v = eng.probability(seq, {o1, o2});
      CHECK(v.rotation_dimensions == 2);
      CHECK_CLOSE(v.value, sequence_probability(rho, seq, {o1, o2}, 2000), 1e-8, 0.0);
    }
}

TEST_CASE("Rotation averaging refuses when the product rule grows too large", "[phase_space]") {
  // Seven intervals of dephasing on a coherent state: 7 angles, 12^7 > 2e6 evaluations.
  MeasurementSequence seq;
  for (int j = 0; j < 7; ++j) seq.steps.push_back(step(cplx(1.0, 0.2 * j), 0.0, Split::symmetric, 0.1 * (j + 1)));
  seq.noise.dephasing_rate_per_s = 1.0;
  const WeylEngine eng(make_coherent(cplx(1.0, 1.0)));
  CHECK_THROWS_AS(eng.correlator(seq), UnsupportedError);
  CHECK_THROWS_WITH(eng.correlator(seq), Catch::Contains("use the Fock engine (--engine fock)"));
  // A thermal state drops the first interval: 6 angles, still 12^6 > 2e6.
  const WeylEngine th(make_thermal(0.1));
  CHECK_THROWS_WITH(th.correlator(seq), Catch::Contains("--engine fock"));
}
