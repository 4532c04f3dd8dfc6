// Weyl engine without rotations: against truncated density-matrix sequences, identities of
// probabilities, the single-measurement formula and the numerical range.
#include <random>

#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "phase_space/prepared_state.hpp"
#include "phase_space/sequence_reference.hpp"
#include "phase_space/weyl_engine.hpp"
#include "support/compare.hpp"

using namespace macroreal;
using namespace macroreal::testing;

namespace {

MeasurementSequence three_steps(Split s1, Split s2, Split s3, double contrast) {
  MeasurementSequence seq;
  auto step = [&](const char* l, cplx b, double ph, Split s, double t) {
    TimedMeasurement m;
    m.label = l;
    m.measurement.beta = b;
    m.measurement.phase_rad = ph;
    m.measurement.split = s;
    m.measurement.contrast = contrast;
    m.time_s = t;
    seq.steps.push_back(m);
  };
  step("A", cplx(0.9, 0.2), 0.3, s1, 0.05);
  step("B", cplx(-0.3, 0.8), -0.7, s2, 0.15);
  step("C", cplx(0.5, -0.6), 1.1, s3, 0.3);
  return seq;
}

std::vector<OutcomeString> all_strings(int k) {
  std::vector<OutcomeString> r;
  for (int mask = 0; mask < (1 << k); ++mask) {
    OutcomeString o;
    for (int j = 0; j < k; ++j) o.push_back((mask >> j) & 1 ? -1 : 1);
    r.push_back(o);
  }
  return r;
}

}  // namespace

TEST_CASE("WeylEngine: sequence probabilities equal truncated density-matrix sequences",
          "[phase_space]") {
  // Reference: sequence_reference.hpp (Kraus matrices, contrast mixture, Lindblad equation by
  // RK4 between measurements). Agreement to 1e-8 is the RK4 and truncation error.
  const int dim = 36;
  const cplx alpha(0.8, 0.3);
  Vec cat = coherent_vector(dim, alpha) + std::polar(1.0, 0.6) * coherent_vector(dim, -alpha);
  cat.normalize();
  const Vec f2 = fock_vector(dim, 2);
  struct Case {
    StatePtr state;
    Mat rho;
  };
  const std::vector<Case> cases = {{make_cat(alpha, 0.6), cat * cat.adjoint()},
                                   {make_fock(2), f2 * f2.adjoint()},
                                   {make_thermal(0.4), thermal_matrix(dim, 0.4)}};
  auto seq = three_steps(Split::symmetric, Split::one_sided, Split::symmetric, 0.85);
  seq.noise.damping_rate_per_s = 0.6;
  seq.noise.bath_nbar = 0.2;
  seq.noise.heating_quanta_per_s = 0.1;
  for (const auto& c : cases) {
    const WeylEngine eng(c.state);
    double corr = 0.0;
    for (const auto& o : all_strings(3)) {
      const double ref = sequence_probability(c.rho, seq, o);
      const double got = eng.probability(seq, o).value;
      INFO(c.state->describe() << " outcomes " << to_string(o));
      CHECK_CLOSE(got, ref, 1e-8, 0.0);
      corr += o[0] * o[1] * o[2] * ref;
    }
    CHECK_CLOSE(eng.correlator(seq).value, corr, 1e-8, 0.0);
    // Last average: sum over all outcomes of o_3 P(o_1 o_2 o_3) (DESIGN.md §2 sequences).
    double last = 0.0;
    for (const auto& o : all_strings(3)) last += o[2] * sequence_probability(c.rho, seq, o);
    CHECK_CLOSE(eng.last_average(seq).value, last, 1e-8, 0.0);
  }
}

TEST_CASE("WeylEngine: probabilities sum to 1 and marginalise over later outcomes",
          "[phase_space]") {
  // Completeness of the Kraus operators (sum_o K_o^dag K_o = 1) and causality: a later
  // measurement does not change the joint probabilities of earlier outcomes (common
  // practice, no source).
  const std::vector<StatePtr> states = {make_thermal(0.3), make_fock(3), make_cat(cplx(1.5, 0.5), 0.0),
                                        make_squeezed(0.5, 0.3, 0.1, cplx(0.2, -1.0)),
                                        make_prepared(make_thermal(0.2), {ModularMeasurement{2.0}}, {1})};
  for (Split s : {Split::symmetric, Split::one_sided}) {
    auto seq = three_steps(s, Split::symmetric, s, 0.9);
    for (auto& st : seq.steps) st.measurement.beta *= 2.5;
    seq.noise.heating_quanta_per_s = 0.5;
    seq.noise.damping_rate_per_s = 0.1;
    for (const auto& st : states) {
      const WeylEngine eng(st);
      double total = 0.0;
      for (const auto& o : all_strings(3)) {
        const double p = eng.probability(seq, o).value;
        CHECK(p >= 0.0);
        total += p;
      }
      CHECK_CLOSE(total, 1.0, 1e-12, 0.0);
      for (const auto& o : all_strings(2)) {
        OutcomeString a = o, b = o;
        a.push_back(1);
        b.push_back(-1);
        CHECK_CLOSE(eng.probability(seq, a).value + eng.probability(seq, b).value,
                    eng.probability(seq, o).value, 1e-12, 0.0);
      }
    }
  }
}

TEST_CASE("WeylEngine: single measurement P(o) = 1/2 [1 + o c Re(e^{i phi} chi_t(beta))]",
          "[phase_space]") {
  // DESIGN.md §2 (c = 1 there; the contrast mixture scales the interference term by c), with
  // chi_t the characteristic function after the noise channel up to the measurement time.
  const std::vector<StatePtr> states = {make_thermal(0.3), make_fock(5), make_cat(cplx(2.0, 0.0), kPi / 3),
                                        make_coherent(cplx(0.4, 1.0))};
  NoiseModel nm;
  nm.heating_quanta_per_s = 2.0;
  nm.damping_rate_per_s = 1.5;
  nm.bath_nbar = 0.5;
  const auto ch = GaussianChannel::over(nm, 0.2);
  for (const auto& st : states)
    for (double c : {1.0, 0.7}) {
      double p_split[2][2];
      for (Split s : {Split::symmetric, Split::one_sided}) {
        MeasurementSequence seq;
        seq.noise = nm;
        TimedMeasurement m;
        m.measurement.beta = cplx(1.3, -0.9);
        m.measurement.phase_rad = 0.4;
        m.measurement.split = s;
        m.measurement.contrast = c;
        m.time_s = 0.2;
        seq.steps.push_back(m);
        const WeylEngine eng(st);
        const cplx chi_t = std::exp(-ch.diffusion * std::norm(m.measurement.beta)) *
                           st->characteristic(m.measurement.beta * ch.shrink);
        for (int o : {1, -1}) {
          const double ref = 0.5 * (1.0 + o * c * (std::polar(1.0, 0.4) * chi_t).real());
          const double got = eng.probability(seq, {o}).value;
          CHECK_CLOSE(got, ref, 1e-14, 0.0);
          p_split[s == Split::symmetric][o > 0] = got;
        }
      }
      // The two splits give equal single-measurement probabilities (DESIGN.md §2).
      CHECK_CLOSE(p_split[0][0], p_split[1][0], 1e-14, 0.0);
      CHECK_CLOSE(p_split[0][1], p_split[1][1], 1e-14, 0.0);
    }
}

TEST_CASE("WeylEngine: probabilities stay in [0, 1] for |beta| up to 40 and nbar up to 1e8",
          "[phase_space]") {
  // Probabilities lie in [0, 1] (common practice, no source); the engine may only absorb
  // round-off of 1e-12 by clamping.
  const std::vector<StatePtr> states = {make_thermal(1e8), make_thermal(1e6), make_thermal(0.0),
                                        make_fock(200), make_fock(1), make_cat(cplx(8.0, 3.0), 0.5),
                                        make_coherent(cplx(20.0, -10.0)),
                                        make_squeezed(1.5, 0.4, 1e3, cplx(3.0, 3.0))};
  NoiseModel nm;
  nm.heating_quanta_per_s = 50.0;
  for (double mod : {0.5, 5.0, 20.0, 40.0})
    for (Split s : {Split::symmetric, Split::one_sided}) {
      auto seq = three_steps(s, s, Split::symmetric, 1.0);
      for (auto& st : seq.steps) st.measurement.beta *= mod / std::abs(st.measurement.beta);
      seq.noise = nm;
      for (const auto& st : states) {
        const WeylEngine eng(st);
        for (const auto& o : all_strings(3)) {
          const double p = eng.probability(seq, o).value;
          INFO(st->describe() << " |beta| " << mod << " " << to_string(o));
          REQUIRE(std::isfinite(p));
          CHECK(p >= 0.0);
          CHECK(p <= 1.0);
        }
        const double c = eng.correlator(seq).value;
        CHECK(std::isfinite(c));
        CHECK(std::abs(c) <= 1.0);
      }
    }
}

TEST_CASE("WeylEngine: input validation", "[phase_space]") {
  const WeylEngine eng(make_thermal(0.1));
  auto seq = three_steps(Split::symmetric, Split::symmetric, Split::symmetric, 1.0);
  seq.steps[2].time_s = 0.1;  // earlier than B at 0.15
  CHECK_THROWS_WITH(eng.correlator(seq), Catch::Contains("step C") && Catch::Contains("step B"));
  seq.steps[2].time_s = 0.3;
  seq.steps[1].measurement.contrast = 1.2;
  CHECK_THROWS_WITH(eng.correlator(seq), Catch::Contains("contrast = 1.2, but must be in [0, 1]"));
  seq.steps[1].measurement.contrast = 1.0;
  CHECK_THROWS_AS(eng.probability(seq, {1, 1, 1, 1}), DomainError);
  CHECK(to_string(parse_outcomes("+-+")) == "+-+");
  CHECK_THROWS_AS(parse_outcomes("+x"), DomainError);
  WeylEngineOptions opt;
  opt.interaction_slices = 0;
  CHECK_THROWS_AS(WeylEngine(make_thermal(0.1), opt), DomainError);
}
