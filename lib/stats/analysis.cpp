#include "stats/analysis.hpp"

#include <cmath>
#include <cstdio>
#include <limits>

#include "core/error.hpp"
#include "protocol/prediction.hpp"
#include "stats/bootstrap.hpp"
#include "stats/estimator_statistic.hpp"
#include "stats/linear_functional.hpp"
#include "stats/nsit_tests.hpp"
#include "stats/proportion_intervals.hpp"
#include "stats/random_variates.hpp"

namespace macroreal {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

std::string fmt(double x, int digits = 4) {
  if (!std::isfinite(x)) return "n/a";
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", digits, x);
  return buf;
}

std::string fmt_p(double p) {
  if (!std::isfinite(p)) return "n/a";
  char buf[64];
  if (p < 1e-4) std::snprintf(buf, sizeof buf, "%.2e", p);
  else std::snprintf(buf, sizeof buf, "%.4f", p);
  return buf;
}

std::string join(const std::vector<std::string>& v, const std::string& sep = "") {
  std::string s;
  for (std::size_t i = 0; i < v.size(); ++i) s += (i ? sep : "") + v[i];
  return s;
}

TestResult failed_test(const std::string& method, const std::string& why) {
  TestResult t;
  t.method = method;
  t.statistic = kNaN;
  t.p_value = kNaN;
  t.sigma = kNaN;
  t.note = why;
  return t;
}

// Runs one test; a DomainError or UnsupportedError becomes a result with p NaN and the reason.
template <class F>
TestResult guarded(const std::string& method, F&& f) {
  try {
    return f();
  } catch (const DomainError& e) {
    return failed_test(method, e.what());
  } catch (const UnsupportedError& e) {
    return failed_test(method, e.what());
  }
}

IntervalEstimate from_bootstrap(const char* method, const Interval& iv) {
  IntervalEstimate e;
  e.method = method;
  e.valid = iv.valid && std::isfinite(iv.lo) && std::isfinite(iv.hi);
  e.lo = e.valid ? iv.lo : kNaN;
  e.hi = e.valid ? iv.hi : kNaN;
  if (!e.valid) e.note = "not computable (see the estimate's note)";
  return e;
}

IntervalEstimate from_proportion(const ProportionInterval& p, const std::string& note,
                                 double scale = 1.0, double shift = 0.0) {
  IntervalEstimate e;
  e.method = p.method;
  e.lo = scale * p.lower + shift;
  e.hi = scale * p.upper + shift;
  e.valid = true;
  e.note = note;
  return e;
}

// The cell counts (k successes of n) of one outcome string summed over the observed
// sequences with the given steps that have it as a cell: one binomial proportion.
bool binomial_of(const CampaignCounts& c, const std::vector<std::string>& steps,
                 const OutcomeString& o, double& k, double& n, std::vector<std::string>& from) {
  k = n = 0.0;
  for (const auto& s : c.sequences) {
    if (s.steps != steps) continue;
    const int j = s.cell_index(o);
    if (j < 0) continue;
    k += s.counts[static_cast<std::size_t>(j)];
    n += s.total();
    from.push_back(s.name);
  }
  return n > 0.0;
}

std::string proportion_note(double k, double n, const std::vector<std::string>& from) {
  return fmt(k, 0) + "/" + fmt(n, 0) + " = " + fmt(k / n) + " in " + join(from, ", ") +
         " (unpooled proportion)";
}

void add_binomial_intervals(QuantityEstimate& q, const QuantityInfo& info,
                            const CampaignCounts& c, double level) {
  double k = 0.0, n = 0.0;
  std::vector<std::string> from;
  if (info.kind == QuantityKind::joint_probability) {
    if (!binomial_of(c, info.steps, info.outcomes, k, n, from)) return;
    const std::string note = proportion_note(k, n, from);
    q.intervals.push_back(from_proportion(wilson_interval(k, n, level), note));
    q.intervals.push_back(from_proportion(clopper_pearson_interval(k, n, level), note));
  } else if (info.kind == QuantityKind::single_average) {
    if (!binomial_of(c, info.steps, OutcomeString{+1}, k, n, from)) return;
    const std::string note = "2 p - 1, p = " + proportion_note(k, n, from);
    q.intervals.push_back(from_proportion(wilson_interval(k, n, level), note, 2.0, -1.0));
    q.intervals.push_back(from_proportion(clopper_pearson_interval(k, n, level), note, 2.0, -1.0));
  }
}

std::string detection_sentence(const Protocol& p) {
  std::string s =
      "Detector results are used as recorded: each dark or bright result stands for the sign "
      "given by its sequence's dark_is, with no correction for misassignment. The protocol's "
      "detection model gives P(read bright | dark) = " +
      fmt(p.detection.dark_read_bright, 6) + " and P(read dark | bright) = " +
      fmt(p.detection.bright_read_dark, 6);
  if (p.detection.threshold) s += ", photon counts <= " + fmt(*p.detection.threshold, 2) + " read dark";
  s += ". Misassignment pulls every correlator towards 0 and, under destructive readout, lets "
       "some shots continue or end on the wrong result, so the estimates describe the recorded "
       "results, not the ideal outcomes.";
  return s;
}

}  // namespace

void AnalysisOptions::validate() const {
  if (!(level > 0.0 && level < 1.0))
    throw DomainError("level = " + std::to_string(level) + ", but must be in (0, 1)");
  if (replicates < 100)
    throw DomainError("bootstrap replicates = " + std::to_string(replicates) +
                      ", but must be at least 100");
  if (margin && !(*margin > 0.0))
    throw DomainError("margin = " + std::to_string(*margin) + ", but must be > 0");
  if (threads < 0) throw DomainError("threads = " + std::to_string(threads) + ", but must be >= 0");
}

AnalysisResult analyse_campaign(const Protocol& protocol, const CampaignCounts& all,
                                const AnalysisOptions& options) {
  options.validate();
  const double alpha = 1.0 - options.level;
  AnalysisResult r;
  r.protocol_file = protocol.file;
  r.title = protocol.title;
  r.readout = all.readout;
  r.level = options.level;
  r.seed = options.seed;
  r.replicates = options.replicates;
  r.rows = all.rows;

  // Only sequences with shots take part (an empty stratum carries no information).
  CampaignCounts c;
  c.readout = all.readout;
  c.rows = all.rows;
  for (const auto& s : all.sequences) {
    const SequenceSpec* spec = protocol.find_sequence(s.name);
    const bool listed = spec == nullptr || !spec->generated;
    if (s.total() > 0.0) {
      c.sequences.push_back(s);
      r.sequences.push_back({s.name, s.total(), listed});
    } else if (listed) {
      r.unobserved.push_back(s.name);
    }
  }
  if (c.sequences.empty())
    throw DomainError("analyse: the runs contain no shot of any sequence of the protocol");

  const CampaignEstimator estimator(protocol, c);
  const CellCounts counts = CampaignEstimator::counts_of(c);
  const EstimateReport point = estimator.estimate(counts);
  const std::vector<double> se = estimator.delta_method_se(counts);

  BootstrapOptions bo;
  bo.replicates = options.replicates;
  bo.level = options.level;
  bo.seed = derive_seed(options.seed, 0);
  bo.threads = options.threads;
  bo.keep_replicates = options.keep_replicates;
  const CountStatistic statistic = estimator_statistic(estimator);
  const BootstrapResult boot = stratified_bootstrap(counts, statistic, bo);
  r.default_interval = to_string(bo.default_method);
  if (bo.smoothing > 0.0)
    r.default_interval += " (smoothed resampling, pseudo count " + fmt(bo.smoothing, 2) + " per cell)";

  const auto& infos = estimator.quantities();
  for (std::size_t i = 0; i < infos.size(); ++i) {
    const BootstrapQuantity& bq = boot.quantities[i];
    QuantityEstimate q;
    q.name = infos[i].name;
    q.kind = infos[i].kind;
    q.estimate = point.values[i];
    q.std_error = se[i];
    q.level = options.level;
    q.status = point.status[i] == EstimateStatus::ok ? to_string(bq.status) : to_string(point.status[i]);
    q.note = point.messages[i].empty() ? bq.note : point.messages[i];
    const IntervalMethod order[4] = {IntervalMethod::bca, IntervalMethod::percentile,
                                     IntervalMethod::basic, IntervalMethod::studentized};
    q.ci = from_bootstrap(to_string(bq.default_method).c_str(), bq.default_interval());
    q.intervals.push_back(q.ci);
    for (IntervalMethod m : order)
      if (m != bq.default_method) q.intervals.push_back(from_bootstrap(to_string(m).c_str(), bq.interval(m)));
    if (std::isfinite(q.estimate)) add_binomial_intervals(q, infos[i], c, options.level);
    if (options.keep_replicates && (q.kind == QuantityKind::lg_k || q.kind == QuantityKind::nsit_s))
      q.bootstrap_replicates = bq.replicates;
    r.estimates.push_back(std::move(q));
  }
  auto quantity_of = [&](QuantityKind kind, int test) -> int {
    for (std::size_t i = 0; i < infos.size(); ++i)
      if (infos[i].kind == kind && infos[i].test_index == test) return static_cast<int>(i);
    return -1;
  };

  // The model, once (only when the protocol carries a state).
  std::optional<PredictionResult> prediction;
  std::string model_unavailable;
  if (options.model && protocol.state) {
    try {
      PredictOptions po;
      po.engine_kind = EngineKind::automatic;
      prediction = predict(protocol, po);
    } catch (const DomainError& e) {
      model_unavailable = e.what();
    } catch (const UnsupportedError& e) {
      model_unavailable = e.what();
    }
  }

  // NSIT first: their estimates are the invasiveness controls of the LG tests.
  std::vector<NsitControl> controls;
  for (std::size_t t = 0; t < protocol.tests.size(); ++t) {
    const TestSpec& spec = protocol.tests[t];
    if (spec.kind != TestSpec::Kind::nsit) continue;
    NsitAnalysis a;
    a.label = spec.label();
    a.from = spec.from;
    a.to = spec.to;
    const int qi = quantity_of(QuantityKind::nsit_s, static_cast<int>(t));
    a.quantity = qi >= 0 ? infos[static_cast<std::size_t>(qi)].name : "S[" + spec.from + "->" + spec.to + "]";
    a.S = qi >= 0 ? point.values[static_cast<std::size_t>(qi)] : kNaN;
    a.std_error = qi >= 0 ? se[static_cast<std::size_t>(qi)] : kNaN;
    std::optional<LinearFunctional> sf;
    try {
      sf = nsit_functional(c, spec.from, spec.to);
    } catch (const DomainError& e) {
      a.tests.push_back(failed_test("score", e.what()));
    }
    if (sf) a.tests.push_back(guarded("score", [&] { return nsit_score_test(counts, *sf); }));
    a.tests.push_back(guarded("barnard-exact", [&] {
      const BinomialArms arms = nsit_binomial_arms(c, spec.from, spec.to);
      return barnard_exact_test(arms.x1, arms.n1, arms.x2, arms.n2);
    }));
    a.tests.push_back(guarded("boschloo-exact", [&] {
      const BinomialArms arms = nsit_binomial_arms(c, spec.from, spec.to);
      return boschloo_exact_test(arms.x1, arms.n1, arms.x2, arms.n2);
    }));
    if (sf) a.tests.push_back(guarded("hoeffding", [&] { return nsit_hoeffding_test(counts, *sf); }));
    if (spec.margin) {
      a.margin = spec.margin;
      a.margin_source = "protocol";
    } else if (options.margin) {
      a.margin = options.margin;
      a.margin_source = "--margin";
    }
    if (a.margin && sf)
      a.tests.push_back(guarded("tost", [&] { return nsit_tost(counts, *sf, *a.margin); }));
    // Newcombe interval of S as a difference of two proportions, where S is one.
    if (qi >= 0 && std::isfinite(a.S)) {
      try {
        const BinomialArms arms = nsit_binomial_arms(c, spec.from, spec.to);
        const std::string note = "P(+) of [" + spec.to + "] alone (" + fmt(static_cast<double>(arms.x1), 0) +
                                 "/" + fmt(static_cast<double>(arms.n1), 0) + ") minus P(+) of " + spec.to +
                                 " after " + spec.from + " (" + fmt(static_cast<double>(arms.x2), 0) + "/" +
                                 fmt(static_cast<double>(arms.n2), 0) + ")";
        r.estimates[static_cast<std::size_t>(qi)].intervals.push_back(from_proportion(
            newcombe_difference_interval(static_cast<double>(arms.x1), static_cast<double>(arms.n1),
                                         static_cast<double>(arms.x2), static_cast<double>(arms.n2),
                                         options.level),
            note));
      } catch (const UnsupportedError&) {
        // destructive readout: S is not a difference of two binomial proportions
      } catch (const DomainError&) {
      }
    }
    if (prediction && t < prediction->tests.size() && prediction->tests[t].nsit)
      a.S_model = prediction->tests[t].nsit->S;
    if (std::isfinite(a.S) && std::isfinite(a.std_error))
      controls.push_back({spec.from, spec.to, a.S, a.std_error});

    const TestResult& score = a.tests.front();
    std::string v = a.quantity + " = " + fmt(a.S) + ": ";
    if (!std::isfinite(score.p_value)) {
      v += "the score test could not be computed (" + score.note + ").";
    } else if (score.p_value < alpha) {
      v += "no-signalling in time is rejected at alpha = " + fmt(alpha, 3) + " (score p = " +
           fmt_p(score.p_value) + "): measuring " + spec.from + " changes the statistics of " + spec.to + ".";
    } else {
      v += "no signalling detected at alpha = " + fmt(alpha, 3) + " (score p = " + fmt_p(score.p_value) +
           "); this alone does not show that S is small.";
    }
    for (const auto& tr : a.tests)
      if (tr.method == "tost" && std::isfinite(tr.p_value))
        v += tr.p_value < alpha
                 ? " Equivalence |S| < " + fmt(*a.margin) + " is shown (TOST p = " + fmt_p(tr.p_value) + ")."
                 : " Equivalence |S| < " + fmt(*a.margin) + " is not shown (TOST p = " + fmt_p(tr.p_value) + ").";
    a.verdict = v;
    r.nsit.push_back(std::move(a));
  }

  JointScan scan;
  scan.counts = counts;
  for (std::size_t t = 0; t < protocol.tests.size(); ++t) {
    const TestSpec& spec = protocol.tests[t];
    if (spec.kind != TestSpec::Kind::leggett_garg) continue;
    LeggettGargAnalysis a;
    a.label = spec.label();
    a.order = spec.order;
    a.bound = static_cast<double>(spec.order.size()) - 2.0;
    const int qi = quantity_of(QuantityKind::lg_k, static_cast<int>(t));
    a.quantity = qi >= 0 ? infos[static_cast<std::size_t>(qi)].name : "K[" + join(spec.order) + "]";
    a.K = qi >= 0 ? point.values[static_cast<std::size_t>(qi)] : kNaN;
    a.std_error = qi >= 0 ? se[static_cast<std::size_t>(qi)] : kNaN;
    a.tests.push_back(guarded("z-asymptotic", [&] {
      if (!std::isfinite(a.K) || !std::isfinite(a.std_error) || a.std_error <= 0.0)
        throw DomainError("K or its standard error is undefined");
      return lg_z_test(a.K, a.std_error, a.bound);
    }));
    std::optional<LinearFunctional> kf;
    std::string kf_error;
    try {
      kf = lg_functional(c, spec.order);
      a.K_linear = kf->estimate(counts);
      if (!std::isfinite(a.K_linear)) {
        kf_error = "a sequence the non-pooled estimate needs has no shots";
        kf.reset();
      }
    } catch (const DomainError& e) {
      kf_error = e.what();
      a.K_linear = kNaN;
    }
    ParametricBootstrapOptions po;
    po.replicates = options.replicates;
    po.seed = derive_seed(options.seed, 1 + t);
    po.threads = options.threads;
    for (const char* m : {"hoeffding", "empirical-bernstein", "parametric-bootstrap"}) {
      const std::string method = m;
      if (!kf) {
        a.tests.push_back(failed_test(method, kf_error));
        continue;
      }
      a.tests.push_back(guarded(method, [&] {
        if (method == "hoeffding") return lg_hoeffding_test(counts, *kf, a.bound);
        if (method == "empirical-bernstein") return lg_empirical_bernstein_test(counts, *kf, a.bound);
        return lg_parametric_bootstrap_test(counts, *kf, a.bound, po);
      }));
    }
    if (kf) {
      scan.statistics.push_back(*kf);
      scan.bounds.push_back(a.bound);
    }

    if (controls.empty()) {
      a.invasiveness_unavailable = "the protocol has no NSIT control with data; the bound needs an NSIT test for every pair (k, k+1) and (1, n) of the order";
    } else {
      try {
        if (!std::isfinite(a.K) || !std::isfinite(a.std_error))
          throw DomainError("K or its standard error is undefined");
        a.invasiveness = invasiveness_bound(spec.order, a.K, a.std_error, controls, options.level);
      } catch (const DomainError& e) {
        a.invasiveness_unavailable = std::string(e.what()) +
                                     "; the bound needs an NSIT test, with runs of the later "
                                     "measurement alone, for every pair (k, k+1) and (1, n)";
      }
    }

    if (prediction && t < prediction->tests.size() && prediction->tests[t].lg) {
      const LeggettGargPrediction& lp = *prediction->tests[t].lg;
      ModelComparison mc;
      mc.K_model = lp.K;
      mc.K_classical = lp.K_classical;
      mc.K_classical_kicked = lp.K_classical_kicked;
      mc.classical_unavailable = lp.classical_unavailable;
      if (lp.K_classical_kicked) {
        mc.versus_kicked = guarded("z-asymptotic", [&] {
          if (!std::isfinite(a.K) || !std::isfinite(a.std_error) || a.std_error <= 0.0)
            throw DomainError("K or its standard error is undefined");
          TestResult z = lg_z_test(a.K, a.std_error, *lp.K_classical_kicked);
          z.note = "H0: K <= K_classical_kicked = " + fmt(*lp.K_classical_kicked);
          return z;
        });
        const TestResult& z = *mc.versus_kicked;
        if (!std::isfinite(z.p_value)) {
          mc.verdict = "The comparison with the kicked classical model could not be computed.";
        } else if (z.p_value < alpha) {
          mc.verdict = "The measured K exceeds the kicked classical prediction K = " +
                       fmt(*lp.K_classical_kicked) + " (p = " + fmt_p(z.p_value) + ", " +
                       fmt(z.sigma, 2) + " sigma): the model with the split's kick does not explain it.";
        } else {
          mc.verdict = "The measured K is consistent with the kicked classical prediction K = " +
                       fmt(*lp.K_classical_kicked) + " (p = " + fmt_p(z.p_value) +
                       "): measurement back-action of the split explains it; this is not evidence "
                       "against macrorealism.";
        }
      } else {
        mc.verdict = "The model's state is not known to have a non-negative Wigner function, so no "
                     "classical reference model applies (" + lp.classical_unavailable + ").";
      }
      a.model = mc;
    }

    const TestResult* primary = nullptr;
    for (const auto& tr : a.tests)
      if (tr.method == a.primary_method && std::isfinite(tr.p_value)) primary = &tr;
    if (!primary) {
      a.primary_method = "z-asymptotic";
      if (std::isfinite(a.tests.front().p_value)) primary = &a.tests.front();
    }
    std::string v = a.quantity + " = " + fmt(a.K) + " against the macrorealist bound " + fmt(a.bound, 0) + ": ";
    if (!primary) {
      v += "no test could be computed.";
    } else {
      v += primary->p_value < alpha ? "the bound is violated at alpha = " : "no violation at alpha = ";
      v += fmt(alpha, 3) + " (" + primary->method + " p = " + fmt_p(primary->p_value) + ", " +
           fmt(primary->sigma, 2) + " sigma).";
      for (const auto& tr : a.tests)
        if ((tr.method == "hoeffding" || tr.method == "empirical-bernstein") && std::isfinite(tr.p_value) &&
            primary->p_value < alpha)
          v += tr.p_value < alpha ? " The finite-sample " + tr.method + " bound agrees (p = " + fmt_p(tr.p_value) + ")."
                                  : " The finite-sample " + tr.method + " bound does not confirm it (p = " +
                                        fmt_p(tr.p_value) + ").";
    }
    if (a.invasiveness)
      v += a.invasiveness->exceeds
               ? " The lower limit of K exceeds the NSIT bound on invasiveness " + fmt(a.invasiveness->bound_upper) + "."
               : " The lower limit of K does not exceed the NSIT bound on invasiveness " +
                     fmt(a.invasiveness->bound_upper) + ": disturbance can explain the value.";
    a.verdict = v;
    r.leggett_garg.push_back(std::move(a));
  }

  // Multiplicity across the file's tests: one p-value per test.
  {
    std::vector<double> ps;
    for (const auto& a : r.leggett_garg)
      for (const auto& tr : a.tests)
        if (tr.method == a.primary_method && std::isfinite(tr.p_value)) {
          r.multiplicity.entries.push_back({a.label, tr.method, tr.p_value, 1.0, 1.0});
          ps.push_back(tr.p_value);
        }
    for (const auto& a : r.nsit)
      for (const auto& tr : a.tests)
        if (tr.method == a.primary_method && std::isfinite(tr.p_value)) {
          r.multiplicity.entries.push_back({a.label, tr.method, tr.p_value, 1.0, 1.0});
          ps.push_back(tr.p_value);
        }
    if (!ps.empty()) {
      const auto holm = holm_adjust(ps), bh = benjamini_hochberg_adjust(ps);
      for (std::size_t i = 0; i < ps.size(); ++i) {
        r.multiplicity.entries[i].holm = holm[i];
        r.multiplicity.entries[i].benjamini_hochberg = bh[i];
      }
    }
    r.multiplicity.which =
        "one p-value per test of the protocol: for LG the one-sided parametric-bootstrap p "
        "(H0: K <= bound; the z-test p where the bootstrap could not run), for NSIT the two-sided "
        "score p (H0: S = 0); tests without a computable p-value are left out of the family";
    if (scan.statistics.size() >= 2) {
      ParametricBootstrapOptions mo;
      mo.replicates = options.replicates;
      mo.seed = derive_seed(options.seed, 1000);
      mo.threads = options.threads;
      try {
        r.multiplicity.max_statistic = max_statistic_calibration(scan, mo);
        for (const auto& a : r.leggett_garg)
          if (std::isfinite(a.K_linear)) r.multiplicity.max_statistic_labels.push_back(a.label);
        r.multiplicity.max_statistic_note =
            "one stratified resample of the whole campaign per replicate evaluates every LG "
            "statistic (centred at its estimate), so tests that share sequences keep their "
            "dependence; single-step maxT (Westfall & Young 1993)";
      } catch (const DomainError& e) {
        r.multiplicity.max_statistic_note = std::string("not computable: ") + e.what();
      }
    } else {
      r.multiplicity.max_statistic_note = "fewer than two LG tests: no max-statistic calibration";
    }
  }

  r.drift = options.drift ? *options.drift : drift_not_checked("no per-shot table was given");
  r.detection_model = detection_sentence(protocol);

  // Cautions of DESIGN.md section 7.
  {
    std::string s =
        "Non-invasive measurability: a Leggett-Garg violation refutes macrorealism only together "
        "with the assumption that a measurement does not disturb the later ones. ";
    bool any_lg = false;
    for (const auto& a : r.leggett_garg) {
      any_lg = true;
      if (a.invasiveness)
        s += a.label + ": the NSIT controls bound the violation that disturbance alone can produce "
             "(K <= " + fmt(a.invasiveness->bound_upper) + " at the upper confidence limits); the lower "
             "limit of K " + (a.invasiveness->exceeds ? "exceeds" : "does not exceed") + " it. ";
      else
        s += a.label + ": no bound on invasiveness (" + a.invasiveness_unavailable + "). ";
    }
    if (any_lg)
      s += std::string("Every NSIT bound on invasiveness assumes ") + kInvasivenessAssumption + ". ";
    if (!any_lg) s += "The protocol has no LG test. ";
    r.cautions.push_back(s);
  }
  if (r.readout == Readout::destructive)
    r.cautions.push_back(
        "Post-selection on the dark outcome: under destructive readout a shot continues only on the "
        "dark result, so each configuration observes one branch; the joint probabilities are "
        "assembled from several configurations (bright-ended shots are counted, not dropped). This "
        "assumes that the configurations differ only in the mapping of signs to dark and bright and "
        "sample the same process.");
  else
    r.cautions.push_back(
        "Non-destructive readout: every shot runs every step, no outcome is post-selected; the "
        "readout's back-action on the motion is part of the measurement being tested.");
  {
    std::string s =
        "Stationarity: shots of different sequences and times are combined as draws from one "
        "unchanging process. ";
    if (r.drift.checked)
      s += "Drift check (" + r.drift.method + "): chi-square = " + fmt(r.drift.chi_square, 2) +
           " on " + std::to_string(r.drift.df) + " df, p = " + fmt_p(r.drift.p_value) +
           (r.drift.p_value < alpha ? ": the outcome frequencies changed between the halves; the "
                                      "combined estimates are suspect."
                                    : ": no drift detected between the halves (slow drifts only).");
    else
      s += "Drift: not checked (" + r.drift.not_checked + ").";
    r.cautions.push_back(s);
  }
  r.cautions.push_back("Detection model: " + r.detection_model);
  {
    std::string s;
    if (prediction && prediction->wigner_nonnegative)
      s = "The protocol's state has a non-negative Wigner function: its K > bound, if any, is "
          "reproduced by the classical point model with the split's kick, so even a significant "
          "violation here is explained by measurement back-action unless it also exceeds the kicked "
          "classical prediction. ";
    else if (!protocol.state)
      s = "The protocol has no model, so the measured K is not compared with any classical model "
          "that includes the measurement's kick. ";
    else if (!model_unavailable.empty())
      s = "The model's prediction could not be computed (" + model_unavailable + "). ";
    s += "A rejected bound says these runs are unlikely under every non-invasive macrorealist model; "
         "it does not establish a macroscopic superposition, does not exclude invasive classical "
         "models beyond the NSIT bound, and a p-value is not the probability that macrorealism holds. "
         "A non-rejected bound is not evidence for macrorealism.";
    r.not_established.push_back(s);
  }
  return r;
}

}  // namespace macroreal
