// The pooled tree MLE and the derived quantities of CampaignEstimator.
#include <cmath>
#include <cstdint>
#include <random>

#include <catch2/catch.hpp>

#include "core/error.hpp"
#include "stats/campaign_counts.hpp"
#include "stats/estimator.hpp"
#include "support/compare.hpp"

using namespace macroreal;

namespace {

SequenceSpec seq(std::string name, std::vector<std::string> steps, std::vector<int> dark_is) {
  SequenceSpec s;
  s.name = std::move(name);
  s.steps = std::move(steps);
  s.dark_is = std::move(dark_is);
  return s;
}

TestSpec lg(std::vector<std::string> order) {
  TestSpec t;
  t.kind = TestSpec::Kind::leggett_garg;
  t.order = std::move(order);
  return t;
}

TestSpec nsit(std::string from, std::string to) {
  TestSpec t;
  t.kind = TestSpec::Kind::nsit;
  t.from = std::move(from);
  t.to = std::move(to);
  return t;
}

double value(const CampaignEstimator& e, const std::vector<double>& v, const std::string& name) {
  const int i = e.index_of(name);
  INFO("quantity " << name);
  REQUIRE(i >= 0);
  return v[static_cast<std::size_t>(i)];
}

void set_counts(CampaignCounts& c, const std::string& name, std::vector<double> counts) {
  for (auto& s : c.sequences)
    if (s.name == name) {
      REQUIRE(s.counts.size() == counts.size());
      s.counts = std::move(counts);
      return;
    }
  FAIL("no sequence " << name);
}

// Direct numerical maximisation of the coarsened multinomial likelihood
//   log L(p) = sum_s sum_cells n_c log( sum of p(o) over full strings o extending cell c ),
// p = softmax(theta) over the 2^n full strings, by gradient ascent on theta. This knows
// nothing of the tree factorisation; it is the independent check of the closed-form MLE.
std::vector<double> brute_force_mle(const CampaignCounts& c, std::size_t n, double* grad_norm) {
  const std::size_t m = std::size_t{1} << n;
  std::vector<double> theta(m, 0.0), p(m), grad(m);
  double total = 0.0;
  for (const auto& s : c.sequences) total += s.total();
  auto full_index = [n](const OutcomeString& o) {
    std::size_t b = 0;
    for (int x : o) b = (b << 1) | (x > 0 ? 0u : 1u);
    return b << (n - o.size());
  };
  for (int it = 0; it < 200000; ++it) {
    double mx = theta[0], z = 0.0;
    for (double t : theta) mx = std::max(mx, t);
    for (std::size_t i = 0; i < m; ++i) z += (p[i] = std::exp(theta[i] - mx));
    for (auto& x : p) x /= z;
    std::fill(grad.begin(), grad.end(), 0.0);
    for (const auto& s : c.sequences)
      for (std::size_t j = 0; j < s.cells.size(); ++j) {
        const double w = s.counts[j] / total;
        if (w == 0.0) continue;
        const std::size_t lo = full_index(s.cells[j]);
        const std::size_t span = std::size_t{1} << (n - s.cells[j].size());
        double pc = 0.0;
        for (std::size_t i = lo; i < lo + span; ++i) pc += p[i];
        for (std::size_t i = 0; i < m; ++i) grad[i] -= w * p[i];
        for (std::size_t i = lo; i < lo + span; ++i) grad[i] += w * p[i] / pc;
      }
    double g2 = 0.0;
    for (std::size_t i = 0; i < m; ++i) {
      theta[i] += 2.0 * grad[i];
      g2 += grad[i] * grad[i];
    }
    *grad_norm = std::sqrt(g2);
    if (*grad_norm < 1e-13) break;
  }
  return p;
}

double uniform01(std::mt19937_64& rng) { return static_cast<double>(rng() >> 11) * 0x1.0p-53; }

}  // namespace

TEST_CASE("Estimator: pooled tree MLE equals a direct maximisation of the likelihood", "[stats]") {
  // Three-step destructive campaign: the four configurations continue on different signs,
  // so each observes a different branch of the outcome tree. Counts invented.
  Protocol p;
  p.readout = Readout::destructive;
  p.sequences = {seq("ABC++", {"A", "B", "C"}, {+1, +1, +1}),
                 seq("ABC+-", {"A", "B", "C"}, {+1, -1, +1}),
                 seq("ABC-+", {"A", "B", "C"}, {-1, +1, +1}),
                 seq("ABC--", {"A", "B", "C"}, {-1, -1, +1})};
  auto c = empty_counts(p);
  // Layout: [d1 d2 +], [d1 d2 -], [-d1], [d1 -d2].
  set_counts(c, "ABC++", {120, 95, 310, 180});
  set_counts(c, "ABC+-", {60, 141, 290, 207});
  set_counts(c, "ABC-+", {88, 52, 402, 163});
  set_counts(c, "ABC--", {47, 99, 377, 190});
  const CampaignEstimator est(p, c);
  std::vector<double> v;
  est.evaluate(CampaignEstimator::counts_of(c), v);

  double gnorm = 1.0;
  const auto ref = brute_force_mle(c, 3, &gnorm);
  REQUIRE(gnorm < 1e-9);  // the ascent converged
  const char* names[8] = {"P[ABC:+++]", "P[ABC:++-]", "P[ABC:+-+]", "P[ABC:+--]",
                          "P[ABC:-++]", "P[ABC:-+-]", "P[ABC:--+]", "P[ABC:---]"};
  double sum = 0.0;
  for (int i = 0; i < 8; ++i) {
    // Source: direct numerical maximisation above (independent of the factorisation).
    CHECK_CLOSE(value(est, v, names[i]), ref[static_cast<std::size_t>(i)], 1e-7, 0.0);
    sum += value(est, v, names[i]);
  }
  CHECK_CLOSE(sum, 1.0, 1e-12, 0.0);  // identity: probabilities sum to 1
}

TEST_CASE("Estimator: two-step pooling by hand, correlators, K, family and NSIT", "[stats]") {
  Protocol p;
  p.readout = Readout::destructive;
  p.sequences = {seq("AB+", {"A", "B"}, {+1, +1}), seq("AB-", {"A", "B"}, {-1, +1}),
                 seq("BC+", {"B", "C"}, {+1, +1}), seq("BC-", {"B", "C"}, {-1, +1}),
                 seq("AC+", {"A", "C"}, {+1, +1}), seq("AC-", {"A", "C"}, {-1, +1}),
                 seq("B", {"B"}, {+1})};
  p.tests = {lg({"A", "B", "C"}), nsit("A", "B")};
  auto c = empty_counts(p);
  // AB: hand calculation (invented counts). Pooled first step: N(+) = 30+10 (AB+) + 60
  // (AB-, ended bright = +) = 100, N(-) = 60 + 20+20 = 100, so P(A=+) = 1/2;
  // P(B=+|A=+) = 30/40, P(B=+|A=-) = 20/40. Hence P(++) = 3/8, P(+-) = 1/8,
  // P(-+) = 1/4, P(--) = 1/4 and C_AB = 3/8 - 1/8 - 1/4 + 1/4 = 1/4.
  set_counts(c, "AB+", {30, 10, 60});
  set_counts(c, "AB-", {20, 20, 60});
  set_counts(c, "BC+", {50, 10, 40});   // B=+: 60 + 30 = 90 of 200; C=+|B=+: 50/60
  set_counts(c, "BC-", {15, 55, 30});   // B=-: 40 + 70 = 110;        C=+|B=-: 15/70
  set_counts(c, "AC+", {10, 30, 60});   // A=+: 40 + 25 = 65 of 200;  C=+|A=+: 10/40
  set_counts(c, "AC-", {35, 40, 25});   // A=-: 60 + 75 = 135;        C=+|A=-: 35/75
  set_counts(c, "B", {70, 30});         // P_B(+) = 0.7
  const CampaignEstimator est(p, c);
  std::vector<double> v;
  est.evaluate(CampaignEstimator::counts_of(c), v);

  // Source: hand calculation from P^(x|prefix) = N(prefix, x) / N(prefix) (comments above).
  CHECK_CLOSE(value(est, v, "P[AB:++]"), 3.0 / 8, 1e-15, 0.0);
  CHECK_CLOSE(value(est, v, "P[AB:+-]"), 1.0 / 8, 1e-15, 0.0);
  CHECK_CLOSE(value(est, v, "P[AB:-+]"), 1.0 / 4, 1e-15, 0.0);
  CHECK_CLOSE(value(est, v, "P[AB:--]"), 1.0 / 4, 1e-15, 0.0);
  const double c_ab = 0.25;
  const double pb = 0.45, c_bc = pb * (50.0 / 60 - 10.0 / 60) + (1 - pb) * (55.0 / 70 - 15.0 / 70);
  const double pa = 0.325, c_ac = pa * (10.0 / 40 - 30.0 / 40) + (1 - pa) * (40.0 / 75 - 35.0 / 75);
  CHECK_CLOSE(value(est, v, "C[AB]"), c_ab, 1e-14, 0.0);
  CHECK_CLOSE(value(est, v, "C[BC]"), c_bc, 1e-14, 0.0);
  CHECK_CLOSE(value(est, v, "C[AC]"), c_ac, 1e-14, 0.0);
  CHECK_CLOSE(value(est, v, "Q[B]"), 0.4, 1e-14, 0.0);
  // Source: DESIGN.md section 2 definitions K_3 = C12 + C23 - C13, family
  // 1 + s1 C12 + s2 C23 + s1 s2 C13, S = P_B(+) - sum_a P_AB(a, +).
  CHECK_CLOSE(value(est, v, "K[ABC]"), c_ab + c_bc - c_ac, 1e-14, 0.0);
  CHECK_CLOSE(value(est, v, "LGfamily[ABC:++]"), 1 + c_ab + c_bc + c_ac, 1e-14, 0.0);
  CHECK_CLOSE(value(est, v, "LGfamily[ABC:+-]"), 1 + c_ab - c_bc - c_ac, 1e-14, 0.0);
  CHECK_CLOSE(value(est, v, "LGfamily[ABC:-+]"), 1 - c_ab + c_bc - c_ac, 1e-14, 0.0);
  CHECK_CLOSE(value(est, v, "LGfamily[ABC:--]"), 1 - c_ab - c_bc + c_ac, 1e-14, 0.0);
  CHECK_CLOSE(value(est, v, "S[A->B]"), 0.7 - (3.0 / 8 + 1.0 / 4), 1e-14, 0.0);

  const auto& info = est.quantities();
  const auto& k = info[static_cast<std::size_t>(est.index_of("K[ABC]"))];
  CHECK(k.kind == QuantityKind::lg_k);
  CHECK(k.bound == 1.0);
  CHECK(k.bound_side == BoundSide::upper);
  CHECK(k.test_index == 0);
  const auto& f = info[static_cast<std::size_t>(est.index_of("LGfamily[ABC:+-]"))];
  CHECK(f.bound == 0.0);
  CHECK(f.bound_side == BoundSide::lower);
  const auto& s = info[static_cast<std::size_t>(est.index_of("S[A->B]"))];
  CHECK(s.bound_side == BoundSide::equality);
  CHECK(s.test_index == 1);
  CHECK(est.quantity_names().size() == est.size());

  // The report agrees with evaluate() and says ok everywhere.
  const auto r = est.estimate(CampaignEstimator::counts_of(c));
  for (std::size_t i = 0; i < est.size(); ++i) {
    CHECK(r.status[i] == EstimateStatus::ok);
    CHECK(r.values[i] == v[i]);
  }
}

TEST_CASE("Estimator: K_n of an n-time test carries the bound n - 2", "[stats]") {
  Protocol p;
  p.readout = Readout::destructive;
  p.tests = {lg({"A", "B", "C", "D"})};
  const CampaignEstimator est(p, empty_counts(p));
  const int i = est.index_of("K[ABCD]");
  REQUIRE(i >= 0);
  // Source: DESIGN.md section 2, K_n <= n - 2.
  CHECK(est.quantities()[static_cast<std::size_t>(i)].bound == 2.0);
  CHECK(est.index_of("C[AB]") >= 0);
  CHECK(est.index_of("C[CD]") >= 0);
  CHECK(est.index_of("C[AD]") >= 0);
  CHECK(est.index_of("LGfamily[ABCD:++]") < 0);
}

TEST_CASE("Estimator: non-destructive sequences pool to relative frequencies", "[stats]") {
  Protocol p;
  p.readout = Readout::nondestructive;
  p.sequences = {seq("AB", {"A", "B"}, {+1, +1}), seq("AB2", {"A", "B"}, {-1, +1})};
  auto c = empty_counts(p);
  set_counts(c, "AB", {10, 20, 30, 40});  // ++ +- -+ --
  set_counts(c, "AB2", {5, 5, 25, 65});
  const CampaignEstimator est(p, c);
  std::vector<double> v;
  est.evaluate(CampaignEstimator::counts_of(c), v);
  // Source: naive pooled relative frequencies (the MLE of one multinomial).
  CHECK_CLOSE(value(est, v, "P[AB:++]"), 15.0 / 200, 1e-15, 0.0);
  CHECK_CLOSE(value(est, v, "P[AB:+-]"), 25.0 / 200, 1e-15, 0.0);
  CHECK_CLOSE(value(est, v, "P[AB:-+]"), 55.0 / 200, 1e-15, 0.0);
  CHECK_CLOSE(value(est, v, "P[AB:--]"), 105.0 / 200, 1e-15, 0.0);
  CHECK_CLOSE(value(est, v, "C[AB]"), (15.0 - 25 - 55 + 105) / 200, 1e-15, 0.0);
}

TEST_CASE("Estimator: unobserved branches and missing sequences are NaN with a status", "[stats]") {
  Protocol p;
  p.readout = Readout::destructive;
  p.sequences = {seq("AB+", {"A", "B"}, {+1, +1})};
  p.tests = {nsit("A", "B")};
  auto c = empty_counts(p);
  set_counts(c, "AB+", {30, 10, 60});
  const CampaignEstimator est(p, c);
  const auto r = est.estimate(CampaignEstimator::counts_of(c));
  auto status = [&](const std::string& n) { return r.status[static_cast<std::size_t>(est.index_of(n))]; };
  auto val = [&](const std::string& n) { return r.values[static_cast<std::size_t>(est.index_of(n))]; };
  CHECK_CLOSE(val("P[AB:++]"), 0.3, 1e-15, 0.0);
  CHECK(status("P[AB:++]") == EstimateStatus::ok);
  CHECK(std::isnan(val("P[AB:-+]")));
  CHECK(status("P[AB:-+]") == EstimateStatus::unobserved_branch);
  CHECK_THAT(r.messages[static_cast<std::size_t>(est.index_of("P[AB:-+]"))],
             Catch::Contains("reached step 2 after -"));
  CHECK(std::isnan(val("C[AB]")));
  CHECK(status("C[AB]") == EstimateStatus::unobserved_branch);
  CHECK(std::isnan(val("Q[B]")));
  CHECK(status("Q[B]") == EstimateStatus::no_sequence);
  CHECK(std::isnan(val("S[A->B]")));
  CHECK(status("S[A->B]") != EstimateStatus::ok);
  const auto se = est.delta_method_se(CampaignEstimator::counts_of(c));
  CHECK(std::isnan(se[static_cast<std::size_t>(est.index_of("C[AB]"))]));

  std::vector<double> out;
  CHECK_THROWS_AS(est.evaluate({{1.0, 2.0}}, out), DomainError);
  CHECK_THROWS_AS(est.evaluate({}, out), DomainError);
}

TEST_CASE("Estimator: delta-method standard errors", "[stats]") {
  SECTION("single proportion: the binomial variance") {
    Protocol p;
    p.readout = Readout::destructive;
    p.sequences = {seq("B", {"B"}, {+1})};
    auto c = empty_counts(p);
    set_counts(c, "B", {700, 300});
    const CampaignEstimator est(p, c);
    const auto se = est.delta_method_se(CampaignEstimator::counts_of(c));
    // Source: Var(p^) = p(1-p)/n for a binomial proportion; Q = 2p - 1 (textbook).
    CHECK_CLOSE(se[static_cast<std::size_t>(est.index_of("Q[B]"))], 2.0 * std::sqrt(0.7 * 0.3 / 1000), 1e-8, 0.0);
    CHECK_CLOSE(se[static_cast<std::size_t>(est.index_of("P[B:+]"))], std::sqrt(0.7 * 0.3 / 1000), 1e-8, 0.0);
  }
  SECTION("pooled correlator: Monte Carlo spread of the estimate") {
    // True joint of AB (invented): P(++) = .40, P(+-) = .15, P(-+) = .20, P(--) = .25.
    // AB+ cells [++, +-, -] have probabilities .40, .15, .45; AB- cells [-+, --, +] have
    // .20, .25, .55. R = 2000 simulated campaigns of 5000 shots per sequence, seed fixed;
    // the relative standard error of a sample SD is 1/sqrt(2(R-1)) = 1.6 %, so the
    // tolerance 7 % is 4.4 sigma (the O(1/n) bias of the delta method is far smaller).
    Protocol p;
    p.readout = Readout::destructive;
    p.sequences = {seq("AB+", {"A", "B"}, {+1, +1}), seq("AB-", {"A", "B"}, {-1, +1})};
    auto c = empty_counts(p);
    const double q1[3] = {0.40, 0.15, 0.45}, q2[3] = {0.20, 0.25, 0.55};
    const int n = 5000;
    set_counts(c, "AB+", {q1[0] * n, q1[1] * n, q1[2] * n});
    set_counts(c, "AB-", {q2[0] * n, q2[1] * n, q2[2] * n});
    const CampaignEstimator est(p, c);
    const auto ci = static_cast<std::size_t>(est.index_of("C[AB]"));
    const double se = est.delta_method_se(CampaignEstimator::counts_of(c))[ci];

    std::mt19937_64 rng(20261201);
    const int reps = 2000;
    double sum = 0.0, sum2 = 0.0;
    std::vector<std::vector<double>> counts(2, std::vector<double>(3));
    std::vector<double> out;
    for (int r = 0; r < reps; ++r) {
      for (int s = 0; s < 2; ++s) {
        const double* q = s == 0 ? q1 : q2;
        std::fill(counts[static_cast<std::size_t>(s)].begin(), counts[static_cast<std::size_t>(s)].end(), 0.0);
        for (int shot = 0; shot < n; ++shot) {
          const double u = uniform01(rng);
          counts[static_cast<std::size_t>(s)][u < q[0] ? 0 : (u < q[0] + q[1] ? 1 : 2)] += 1.0;
        }
      }
      est.evaluate(counts, out);
      sum += out[ci];
      sum2 += out[ci] * out[ci];
    }
    const double mean = sum / reps, sd = std::sqrt((sum2 - reps * mean * mean) / (reps - 1));
    CHECK_CLOSE(se, sd, 0.0, 0.07);
  }
}
