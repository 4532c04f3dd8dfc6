#include "detection/readout_corrected_analysis.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>

#include <boost/math/distributions/normal.hpp>

#include "core/error.hpp"
#include "phase_space/number_text.hpp"
#include "stats/bootstrap.hpp"
#include "stats/estimator.hpp"
#include "stats/random_variates.hpp"

namespace macroreal {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
using detail::number_text;

std::string fmt(double x, int digits = 4) {
  if (!std::isfinite(x)) return "n/a";
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", digits, x);
  return buf;
}

std::string fmt_g(double x) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.3g", x);
  return buf;
}

std::string fmt_p(double p) {
  if (!std::isfinite(p)) return "n/a";
  char buf[64];
  if (p < 1e-4) std::snprintf(buf, sizeof buf, "%.2e", p);
  else std::snprintf(buf, sizeof buf, "%.4f", p);
  return buf;
}

double z_of_level(double level) {
  return boost::math::quantile(boost::math::normal(), 0.5 * (1.0 + level));
}

// A rate with its effective binomial calibration sample (header comment); n = 0: exact.
struct RateStratum {
  double point = 0.0, n = 0.0, k = 0.0;
};

RateStratum stratum_of(double e, double se) {
  RateStratum r;
  r.point = e;
  if (!(se > 0.0) || !(e > 0.0) || !(e < 1.0)) return r;
  r.n = std::max(1.0, std::round(e * (1.0 - e) / (se * se)));
  r.k = std::round(e * r.n);
  return r;
}

// The corrected estimator as a function of the augmented counts: the campaign's sequences,
// then (with_rates) one stratum [k, n - k] per rate.
class CorrectedFunction {
 public:
  CorrectedFunction(const CampaignEstimator& estimator, const CampaignCounts& layout,
                    const RateStratum& e1, const RateStratum& e2, const MisreadContinuation& continuation,
                    bool with_rates)
      : estimator_(estimator), layout_(layout), e1_(e1), e2_(e2), continuation_(continuation),
        with_rates_(with_rates) {}

  std::size_t sequences() const { return layout_.sequences.size(); }

  MisassignmentRates rates_of(const CellCounts& aug) const {
    MisassignmentRates r{e1_.point, e2_.point};
    if (!with_rates_) return r;
    const std::size_t S = sequences();
    auto redraw = [&](const RateStratum& st, const std::vector<double>& c) {
      if (st.n <= 0.0) return st.point;
      const double tot = c[0] + c[1];
      return std::max(0.0, st.point + c[0] / tot - st.k / st.n);
    };
    r.dark_read_bright = redraw(e1_, aug[S]);
    r.bright_read_dark = redraw(e2_, aug[S + 1]);
    return r;
  }

  void operator()(const CellCounts& aug, std::vector<double>& out) const {
    const MisassignmentRates r = rates_of(aug);
    const std::size_t S = sequences();
    if (!(r.dark_read_bright + r.bright_read_dark < 1.0)) {
      out.assign(estimator_.size(), kNaN);
      return;
    }
    thread_local CellCounts corrected;
    corrected.resize(S);
    for (std::size_t s = 0; s < S; ++s)
      corrected[s] = true_from_recorded(layout_.sequences[s], layout_.readout, aug[s], r, continuation_);
    estimator_.evaluate(corrected, out);
  }

 private:
  const CampaignEstimator& estimator_;
  const CampaignCounts& layout_;
  RateStratum e1_, e2_;
  MisreadContinuation continuation_;
  bool with_rates_;
};

// Multinomial delta method over the first `strata` strata of `counts` (the formula of
// estimator.hpp: sum_j c_j d_j^2 - (sum_j c_j d_j)^2 / n per stratum, d_j = df/dc_j by
// central differences).
std::vector<double> delta_se(const CorrectedFunction& f, const CellCounts& counts, std::size_t strata,
                             std::size_t m) {
  std::vector<double> base(m), plus(m), minus(m), var(m, 0.0), sum_cd(m);
  f(counts, base);
  CellCounts work = counts;
  for (std::size_t s = 0; s < strata; ++s) {
    double n = 0.0;
    for (double c : counts[s]) n += c;
    if (n <= 0.0) continue;
    std::fill(sum_cd.begin(), sum_cd.end(), 0.0);
    for (std::size_t j = 0; j < counts[s].size(); ++j) {
      const double c = counts[s][j];
      if (c <= 0.0) continue;
      const double h = 1e-4 * c;
      work[s][j] = c + h;
      f(work, plus);
      work[s][j] = c - h;
      f(work, minus);
      work[s][j] = c;
      for (std::size_t q = 0; q < m; ++q) {
        const double d = (plus[q] - minus[q]) / (2.0 * h);
        var[q] += c * d * d;
        sum_cd[q] += c * d;
      }
    }
    for (std::size_t q = 0; q < m; ++q) var[q] -= sum_cd[q] * sum_cd[q] / n;
  }
  std::vector<double> se(m);
  for (std::size_t q = 0; q < m; ++q)
    se[q] = std::isfinite(base[q]) && std::isfinite(var[q]) ? std::sqrt(std::max(var[q], 0.0)) : kNaN;
  return se;
}

CorrectedInterval interval_of(IntervalMethod m, const BootstrapQuantity& q) {
  const Interval& iv = q.interval(m);
  CorrectedInterval c;
  c.method = to_string(m);
  c.valid = iv.valid && std::isfinite(iv.lo) && std::isfinite(iv.hi);
  if (c.valid) {
    c.lo = iv.lo;
    c.hi = iv.hi;
  }
  return c;
}

TestResult z_test(double estimate, double se, double bound, bool two_sided) {
  TestResult t;
  t.method = "z-asymptotic";
  if (!std::isfinite(estimate) || !std::isfinite(se) || !(se > 0.0)) {
    t.statistic = t.p_value = t.sigma = kNaN;
    t.note = "the corrected estimate or its standard error is undefined";
    return t;
  }
  if (!two_sided) {
    t = lg_z_test(estimate, se, bound);
  } else {
    const double z = (estimate - bound) / se;
    t.statistic = z;
    t.p_value = 2.0 * boost::math::cdf(boost::math::complement(boost::math::normal(), std::fabs(z)));
    t.sigma = gaussian_sigma(t.p_value, Sidedness::two_sided, &t.sigma_capped);
  }
  t.note = "corrected estimate, delta-method se including the rates' uncertainty";
  return t;
}

}  // namespace

CorrectionRates rates_from_calibration(const Calibration& c, const std::string& file) {
  CorrectionRates r;
  r.point = {c.dark_read_bright, c.bright_read_dark};
  validate_rates(r.point);
  const double z = z_of_level(c.ci_level);
  std::string words;
  if (c.dark_read_bright_ci) r.dark_read_bright_se = (c.dark_read_bright_ci->second - c.dark_read_bright_ci->first) / (2 * z);
  if (c.bright_read_dark_ci) r.bright_read_dark_se = (c.bright_read_dark_ci->second - c.bright_read_dark_ci->first) / (2 * z);
  r.source = "calibration file " + file + " (errors.dark_read_bright, errors.bright_read_dark at threshold " +
             number_text(c.threshold) + ")";
  if (r.dark_read_bright_se > 0 || r.bright_read_dark_se > 0)
    r.uncertainty =
        "each rate's stored " + fmt(100 * c.ci_level, 0) +
        " % interval is read as a normal interval (se = width / (2 z)) and turned into an effective "
        "binomial calibration sample n = e (1 - e) / se^2; every bootstrap replicate redraws the rate "
        "from it (parametric bootstrap of the calibration) along with the shots";
  else
    r.uncertainty = "the calibration file gives no intervals: the rates are taken as exact";
  if (!c.dark_read_bright_ci || !c.bright_read_dark_ci)
    if (r.dark_read_bright_se > 0 || r.bright_read_dark_se > 0)
      r.uncertainty += " (a rate without an interval is taken as exact)";
  return r;
}

CorrectionRates rates_from_protocol(const Protocol& p) {
  CorrectionRates r;
  r.point = {p.detection.dark_read_bright, p.detection.bright_read_dark};
  if (r.point.dark_read_bright == 0.0 && r.point.bright_read_dark == 0.0)
    throw DomainError("--correct-readout needs error rates: give --calibration FILE or set "
                      "detection.dark_read_bright / detection.bright_read_dark in the protocol " +
                      p.file + " (both are 0 there)");
  validate_rates(r.point);
  r.source = "the protocol's detection model (" + p.file + ": detection.dark_read_bright, detection.bright_read_dark)";
  r.uncertainty = "the protocol gives the rates without uncertainty: they are taken as exact, so the "
                  "intervals do not include any uncertainty of the rates";
  return r;
}

ReadoutCorrectedAnalysis readout_corrected_analysis(const Protocol& protocol, const CampaignCounts& all,
                                                    const ReadoutCorrectionOptions& options) {
  validate_rates(options.rates.point);
  if (options.replicates < 100)
    throw DomainError("bootstrap replicates = " + std::to_string(options.replicates) + ", but must be at least 100");
  if (!(options.level > 0.0 && options.level < 1.0))
    throw DomainError("level = " + number_text(options.level) + ", but must be in (0, 1)");
  const double alpha = 1.0 - options.level;

  CampaignCounts c;
  c.readout = all.readout;
  c.rows = all.rows;
  for (const auto& s : all.sequences)
    if (s.total() > 0.0) c.sequences.push_back(s);
  if (c.sequences.empty())
    throw DomainError("readout correction: the runs contain no shot of any sequence of the protocol");

  const CampaignEstimator estimator(protocol, c);
  const std::size_t S = c.sequences.size(), m = estimator.size();
  const CellCounts observed = CampaignEstimator::counts_of(c);
  const RateStratum e1 = stratum_of(options.rates.point.dark_read_bright, options.rates.dark_read_bright_se);
  const RateStratum e2 = stratum_of(options.rates.point.bright_read_dark, options.rates.bright_read_dark_se);
  const bool uncertain = e1.n > 0.0 || e2.n > 0.0;

  // Augmented counts: the sequences, then one stratum per rate ([0, 1] for an exact rate: never
  // redrawn, since its n is 0).
  CellCounts augmented = observed;
  augmented.push_back({e1.n > 0 ? e1.k : 0.0, e1.n > 0 ? e1.n - e1.k : 1.0});
  augmented.push_back({e2.n > 0 ? e2.k : 0.0, e2.n > 0 ? e2.n - e2.k : 1.0});

  const CorrectedFunction with_rates(estimator, c, e1, e2, options.continuation, true);
  const CorrectedFunction fixed(estimator, c, e1, e2, options.continuation, false);

  std::vector<double> point(m), raw(m);
  fixed(observed, point);
  estimator.evaluate(observed, raw);
  const EstimateReport raw_report = estimator.estimate(observed);
  const std::vector<double> se_total = delta_se(with_rates, augmented, S + 2, m);
  const std::vector<double> se_shots = delta_se(fixed, observed, S, m);

  BootstrapOptions bo;
  bo.replicates = options.replicates;
  bo.level = options.level;
  bo.threads = options.threads;
  bo.studentized = false;  // no per-replicate SE for the corrected statistic
  CountStatistic st_rates{m, [&with_rates](const CellCounts& x, std::vector<double>& out) { with_rates(x, out); }, {}};
  CountStatistic st_fixed{m, [&fixed](const CellCounts& x, std::vector<double>& out) { fixed(x, out); }, {}};
  bo.seed = derive_seed(options.seed, 7001);
  const BootstrapResult boot_fixed = stratified_bootstrap(observed, st_fixed, bo);
  BootstrapResult boot_rates = boot_fixed;
  if (uncertain) {
    bo.seed = derive_seed(options.seed, 7002);
    boot_rates = stratified_bootstrap(augmented, st_rates, bo);
  }

  ReadoutCorrectedAnalysis r;
  r.dark_read_bright = options.rates.point.dark_read_bright;
  r.bright_read_dark = options.rates.point.bright_read_dark;
  r.dark_read_bright_se = e1.n > 0 ? options.rates.dark_read_bright_se : 0.0;
  r.bright_read_dark_se = e2.n > 0 ? options.rates.bright_read_dark_se : 0.0;
  r.dark_read_bright_shots = e1.n;
  r.bright_read_dark_shots = e2.n;
  r.rates_source = options.rates.source;
  r.uncertainty = options.rates.uncertainty;
  r.continuation = to_string(options.continuation);
  r.default_interval = to_string(bo.default_method) + " (smoothed resampling, pseudo count " + fmt(bo.smoothing, 2) +
                       " per cell" + (uncertain ? "; the rates redrawn in every replicate)" : ")");
  r.replicates = options.replicates;
  r.seed = options.seed;

  const auto& infos = estimator.quantities();
  for (std::size_t i = 0; i < m; ++i) {
    CorrectedEstimate e;
    e.name = infos[i].name;
    e.kind = infos[i].kind;
    e.raw = raw[i];
    e.estimate = point[i];
    e.std_error = se_total[i];
    e.std_error_shots = se_shots[i];
    const BootstrapQuantity& bq = boot_rates.quantities[i];
    e.ci = interval_of(bq.default_method, bq);
    e.intervals.push_back(e.ci);
    for (IntervalMethod meth : {IntervalMethod::bca, IntervalMethod::percentile, IntervalMethod::basic})
      if (meth != bq.default_method) e.intervals.push_back(interval_of(meth, bq));
    const BootstrapQuantity& bf = boot_fixed.quantities[i];
    e.ci_rates_fixed = interval_of(bf.default_method, bf);
    e.status = raw_report.status[i] != EstimateStatus::ok ? to_string(raw_report.status[i])
               : !std::isfinite(point[i])                 ? "undefined after correction"
                                                          : to_string(bq.status);
    r.estimates.push_back(std::move(e));
  }

  for (std::size_t t = 0; t < protocol.tests.size(); ++t) {
    const TestSpec& spec = protocol.tests[t];
    const bool lg = spec.kind == TestSpec::Kind::leggett_garg;
    const QuantityKind kind = lg ? QuantityKind::lg_k : QuantityKind::nsit_s;
    int qi = -1;
    for (std::size_t i = 0; i < m; ++i)
      if (infos[i].kind == kind && infos[i].test_index == static_cast<int>(t)) qi = static_cast<int>(i);
    if (qi < 0) continue;
    const CorrectedEstimate& e = r.estimates[static_cast<std::size_t>(qi)];
    CorrectedTest ct;
    ct.label = spec.label();
    ct.quantity = e.name;
    ct.raw = e.raw;
    ct.estimate = e.estimate;
    ct.std_error = e.std_error;
    ct.bound = lg ? static_cast<double>(spec.order.size()) - 2.0 : 0.0;
    ct.tests.push_back(z_test(e.estimate, e.std_error, ct.bound, !lg));
    const TestResult& z = ct.tests.front();
    std::string v = "corrected " + e.name + " = " + fmt(e.estimate) + " (raw " + fmt(e.raw) + "), " +
                    fmt(100 * options.level, 0) + " % interval " +
                    (e.ci.valid ? "[" + fmt(e.ci.lo) + ", " + fmt(e.ci.hi) + "]" : std::string("n/a")) + ": ";
    if (!std::isfinite(z.p_value))
      v += "the z test could not be computed.";
    else if (lg)
      v += (z.p_value < alpha ? "the bound " + fmt(ct.bound, 0) + " is violated at alpha = "
                              : "no violation of the bound " + fmt(ct.bound, 0) + " at alpha = ") +
           fmt(alpha, 3) + " (z p = " + fmt_p(z.p_value) + ", " + fmt(z.sigma, 2) + " sigma).";
    else
      v += (z.p_value < alpha ? "no-signalling in time is rejected at alpha = " : "no signalling detected at alpha = ") +
           fmt(alpha, 3) + " (two-sided z p = " + fmt_p(z.p_value) + ").";
    ct.verdict = v;
    (lg ? r.leggett_garg : r.nsit).push_back(std::move(ct));
  }

  r.tests_note =
      "On the corrected estimates: the bootstrap intervals (the rates redrawn in every replicate when "
      "they carry an uncertainty) and the z test with the delta-method standard error that includes "
      "the rates' uncertainty. Only on the raw (recorded) results: the Hoeffding, empirical-Bernstein "
      "and parametric-bootstrap LG tests, the NSIT score, Barnard, Boschloo, Hoeffding and TOST tests, "
      "the multiplicity adjustments, the invasiveness bound and the model comparison (their exact or "
      "finite-sample arguments assume multinomial counts of the recorded results, which corrected "
      "counts are not).";

  r.assumptions.push_back("Error rates: P(read bright | dark) = " + fmt_g(r.dark_read_bright) +
                          ", P(read dark | bright) = " + fmt_g(r.bright_read_dark) + " from " + r.rates_source +
                          ", known up to their own uncertainty: " + r.uncertainty + ".");
  r.assumptions.push_back(
      "Stationary detection: the same two rates at every step of every sequence and shot, independent "
      "between steps and shots, and the same as where they were measured.");
  if (c.readout == Readout::destructive)
    r.assumptions.push_back(
        "Destructive readout: a true dark result misread as bright ends the shot (recorded as bright); a "
        "true bright result misread as dark lets the shot go on with a ruined oscillator state, and every "
        "later true result of that shot is taken as dark with probability " +
        fmt_g(options.continuation.dark_probability) +
        (options.continuation.dark_probability == 0.5 ? " (fair coin flips, the default, which is also what simulate assumes)"
                                                      : " (declared with --misread-continuation)") +
        ", then read with the same errors. The linear map from true to recorded cell probabilities of "
        "each sequence is inverted exactly (docs/readout_correction.md).");
  else
    r.assumptions.push_back("Non-destructive readout: a misread does not change the oscillator state; each "
                            "step's result is flipped independently.");
  r.assumptions.push_back(
      "Corrected estimates are not clipped to [0, 1] (probabilities) or [-1, 1] (correlators): clipping "
      "would bias them; a value just outside its range is a chance fluctuation.");
  for (const auto& a : options.extra_assumptions) r.assumptions.push_back(a);
  return r;
}

void attach_readout_correction(AnalysisResult& result, ReadoutCorrectedAnalysis corrected) {
  const std::string sentence =
      "Detection model (readout correction): the section 'Readout-corrected estimates' inverts the "
      "misassignment with P(read bright | dark) = " + fmt_g(corrected.dark_read_bright) +
      " and P(read dark | bright) = " + fmt_g(corrected.bright_read_dark) + " from " + corrected.rates_source +
      "; every other estimate and test describes the recorded results as they are.";
  for (auto& c : result.cautions)
    if (c.rfind("Detection model: ", 0) == 0) c += " " + sentence;
  result.readout_corrected = std::move(corrected);
}

}  // namespace macroreal
