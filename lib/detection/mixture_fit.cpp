#include "detection/mixture_fit.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <functional>
#include <limits>
#include <vector>

#include "core/error.hpp"
#include "phase_space/number_text.hpp"

namespace macroreal {

namespace {

using detail::number_text;

struct Sums {
  long n_dark = 0, n_bright = 0, n_unknown = 0;
  double s_dark = 0, s_bright = 0, s_unknown = 0;
};

Sums sums_of(const CountHistograms& h) {
  return {histogram_shots(h.dark), histogram_shots(h.bright), histogram_shots(h.unknown),
          histogram_sum(h.dark), histogram_sum(h.bright), histogram_sum(h.unknown)};
}

double safe_log(double p) { return p > 0 ? std::log(p) : -745.0; }

double poisson_log_likelihood(const std::vector<long>& h, double lambda) {
  double s = 0;
  for (std::size_t n = 0; n < h.size(); ++n)
    if (h[n] > 0) s += static_cast<double>(h[n]) * safe_log(poisson_probability(static_cast<long>(n), lambda));
  return s;
}

long longest(const CountHistograms& h) {
  return static_cast<long>(std::max({h.dark.size(), h.bright.size(), h.unknown.size(), std::size_t{1}})) - 1;
}

// Starting values: labelled means where present, else the unknown shots split at their mean.
MixtureFit initial_guess(const CountHistograms& h) {
  const Sums s = sums_of(h);
  double lo_n = 0, lo_s = 0, hi_n = 0, hi_s = 0;
  if (s.n_unknown > 0) {
    const double mean = s.s_unknown / static_cast<double>(s.n_unknown);
    for (std::size_t n = 0; n < h.unknown.size(); ++n) {
      const double c = static_cast<double>(h.unknown[n]);
      if (static_cast<double>(n) <= mean) { lo_n += c; lo_s += c * static_cast<double>(n); }
      else { hi_n += c; hi_s += c * static_cast<double>(n); }
    }
  }
  MixtureFit f;
  f.has_unknown = s.n_unknown > 0;
  f.model.dark_rate = s.n_dark > 0 ? s.s_dark / static_cast<double>(s.n_dark)
                                   : (lo_n > 0 ? lo_s / lo_n : 0.0);
  f.model.bright_rate = s.n_bright > 0 ? s.s_bright / static_cast<double>(s.n_bright)
                                       : (hi_n > 0 ? hi_s / hi_n : f.model.dark_rate + 1.0);
  if (f.model.bright_rate <= f.model.dark_rate) f.model.bright_rate = f.model.dark_rate + 1.0;
  f.bright_fraction = f.has_unknown ? std::clamp(hi_n / static_cast<double>(s.n_unknown), 0.05, 0.95) : 0.0;
  return f;
}

// EM for the two-Poisson mixture (no decay).
MixtureFit fit_em(const CountHistograms& h, MixtureFit f, const MixtureFitOptions& o) {
  const Sums s = sums_of(h);
  f.method = "EM (two Poisson)";
  f.converged = false;
  double previous = -std::numeric_limits<double>::infinity();
  for (int it = 1; it <= o.max_iterations; ++it) {
    double dark_n = static_cast<double>(s.n_dark), dark_s = s.s_dark;
    double bright_n = static_cast<double>(s.n_bright), bright_s = s.s_bright;
    double resp_sum = 0;
    double ll = poisson_log_likelihood(h.dark, f.model.dark_rate) +
                poisson_log_likelihood(h.bright, f.model.bright_rate);
    for (std::size_t n = 0; n < h.unknown.size(); ++n) {
      if (h.unknown[n] == 0) continue;
      const double c = static_cast<double>(h.unknown[n]);
      const double pd = (1 - f.bright_fraction) * poisson_probability(static_cast<long>(n), f.model.dark_rate);
      const double pb = f.bright_fraction * poisson_probability(static_cast<long>(n), f.model.bright_rate);
      const double tot = pd + pb;
      const double r = tot > 0 ? pb / tot : (static_cast<double>(n) > f.model.bright_rate ? 1.0 : 0.0);
      ll += c * safe_log(tot);
      resp_sum += c * r;
      bright_n += c * r;
      bright_s += c * r * static_cast<double>(n);
      dark_n += c * (1 - r);
      dark_s += c * (1 - r) * static_cast<double>(n);
    }
    f.log_likelihood = ll;
    f.iterations = it;
    if (std::abs(ll - previous) <= o.tolerance * (1 + std::abs(ll))) {
      f.converged = true;
      break;
    }
    previous = ll;
    if (dark_n > 0) f.model.dark_rate = dark_s / dark_n;
    if (bright_n > 0) f.model.bright_rate = bright_s / bright_n;
    if (s.n_unknown > 0) f.bright_fraction = resp_sum / static_cast<double>(s.n_unknown);
  }
  return f;
}

// Minimal Nelder-Mead (standard coefficients 1, 2, 0.5, 0.5) on a few parameters.
template <std::size_t D>
std::array<double, D> nelder_mead(const std::function<double(const std::array<double, D>&)>& f,
                                  std::array<double, D> x0, double step, int max_evals, double tol,
                                  int& evals, bool& converged) {
  std::array<std::array<double, D>, D + 1> p;
  std::array<double, D + 1> v;
  p[0] = x0;
  for (std::size_t i = 0; i < D; ++i) {
    p[i + 1] = x0;
    p[i + 1][i] += step;
  }
  for (std::size_t i = 0; i <= D; ++i) v[i] = f(p[i]);
  evals = static_cast<int>(D + 1);
  converged = false;
  while (evals < max_evals) {
    std::array<std::size_t, D + 1> idx;
    for (std::size_t i = 0; i <= D; ++i) idx[i] = i;
    std::sort(idx.begin(), idx.end(), [&](std::size_t a, std::size_t b) { return v[a] < v[b]; });
    const std::size_t best = idx[0], worst = idx[D], second = idx[D - 1];
    if (std::abs(v[worst] - v[best]) <= tol * (1 + std::abs(v[best]))) {
      converged = true;
      break;
    }
    std::array<double, D> c{};
    for (std::size_t i = 0; i <= D; ++i)
      if (i != worst)
        for (std::size_t k = 0; k < D; ++k) c[k] += p[i][k] / D;
    auto along = [&](double t) {
      std::array<double, D> x;
      for (std::size_t k = 0; k < D; ++k) x[k] = c[k] + t * (p[worst][k] - c[k]);
      return x;
    };
    const auto xr = along(-1.0);
    const double vr = f(xr);
    ++evals;
    if (vr < v[best]) {
      const auto xe = along(-2.0);
      const double ve = f(xe);
      ++evals;
      if (ve < vr) { p[worst] = xe; v[worst] = ve; }
      else { p[worst] = xr; v[worst] = vr; }
    } else if (vr < v[second]) {
      p[worst] = xr;
      v[worst] = vr;
    } else {
      const auto xc = vr < v[worst] ? along(-0.5) : along(0.5);
      const double vc = f(xc);
      ++evals;
      if (vc < std::min(vr, v[worst])) {
        p[worst] = xc;
        v[worst] = vc;
      } else {  // shrink towards the best point
        for (std::size_t i = 0; i <= D; ++i) {
          if (i == best) continue;
          for (std::size_t k = 0; k < D; ++k) p[i][k] = p[best][k] + 0.5 * (p[i][k] - p[best][k]);
          v[i] = f(p[i]);
          ++evals;
        }
      }
    }
  }
  std::size_t best = 0;
  for (std::size_t i = 1; i <= D; ++i)
    if (v[i] < v[best]) best = i;
  return p[best];
}

// Direct maximisation with the decay model: theta = (log dark, log(bright - dark), logit w).
MixtureFit fit_decay(const CountHistograms& h, MixtureFit f, const MixtureFitOptions& o) {
  constexpr double kFloor = 1e-9;
  auto model_of = [&](double a, double b) {
    CountModel m;
    m.dark_rate = std::exp(a);
    m.bright_rate = m.dark_rate + std::exp(b);
    m.pump_per_window = o.pump_per_window;
    return m;
  };
  auto logistic = [](double x) { return 1 / (1 + std::exp(-x)); };
  std::array<double, 3> x0{std::log(std::max(f.model.dark_rate, kFloor)),
                           std::log(std::max(f.model.bright_rate - f.model.dark_rate, kFloor)),
                           f.has_unknown ? std::log(std::clamp(f.bright_fraction, 1e-6, 1 - 1e-6) /
                                                    (1 - std::clamp(f.bright_fraction, 1e-6, 1 - 1e-6)))
                                         : 0.0};
  std::function<double(const std::array<double, 3>&)> objective = [&](const std::array<double, 3>& x) {
    if (x[0] < std::log(kFloor)) return std::numeric_limits<double>::max() / 4;
    return -mixture_log_likelihood(h, model_of(x[0], x[1]), f.has_unknown ? logistic(x[2]) : 0.0);
  };
  int evals = 0, total = 0;
  bool conv = false;
  std::array<double, 3> x = x0;
  for (int round = 0; round < 3; ++round) {  // restarts guard against a collapsed simplex
    x = nelder_mead<3>(objective, x, 0.2, 4000, o.tolerance, evals, conv);
    total += evals;
  }
  f.model = model_of(x[0], x[1]);
  f.bright_fraction = f.has_unknown ? logistic(x[2]) : 0.0;
  f.log_likelihood = -objective(x);
  f.iterations = total;
  f.converged = conv;
  f.method = "Nelder-Mead (dark pumped to bright)";
  return f;
}

MixtureFit fit_unchecked(const CountHistograms& h, const MixtureFitOptions& o,
                         const std::optional<MixtureFit>& start) {
  MixtureFit f = start ? *start : initial_guess(h);
  f.has_unknown = histogram_shots(h.unknown) > 0;
  if (!f.has_unknown) f.bright_fraction = 0;
  f.free_parameters = f.has_unknown ? 3 : 2;
  if (f.has_unknown && !start) f.bright_fraction = std::clamp(f.bright_fraction, 0.01, 0.99);
  f = fit_em(h, f, o);
  if (f.model.dark_rate > f.model.bright_rate) {  // unlabelled data: order the components
    std::swap(f.model.dark_rate, f.model.bright_rate);
    f.bright_fraction = 1 - f.bright_fraction;
  }
  if (o.pump_per_window > 0) {
    f.model.pump_per_window = o.pump_per_window;
    f = fit_decay(h, f, o);
  }
  return f;
}

}  // namespace

double mixture_log_likelihood(const CountHistograms& h, const CountModel& model, double w) {
  const long n_max = longest(h);
  const auto pd = dark_pmf(model, n_max);
  const auto pb = bright_pmf(model, n_max);
  double s = 0;
  for (std::size_t n = 0; n < h.dark.size(); ++n)
    if (h.dark[n]) s += static_cast<double>(h.dark[n]) * safe_log(pd[n]);
  for (std::size_t n = 0; n < h.bright.size(); ++n)
    if (h.bright[n]) s += static_cast<double>(h.bright[n]) * safe_log(pb[n]);
  for (std::size_t n = 0; n < h.unknown.size(); ++n)
    if (h.unknown[n]) s += static_cast<double>(h.unknown[n]) * safe_log((1 - w) * pd[n] + w * pb[n]);
  return s;
}

void identify_or_throw(const CountHistograms& h, const MixtureFitOptions& o) {
  auto fail = [&](const std::string& m) { throw InputError(h.file, "", m); };
  const Sums s = sums_of(h);
  const long total = s.n_dark + s.n_bright + s.n_unknown;
  if (total == 0) fail("no calibration shots");
  // A single-valued histogram: every shot has the same count.
  {
    std::vector<bool> seen(static_cast<std::size_t>(longest(h)) + 1, false);
    for (const auto* g : {&h.dark, &h.bright, &h.unknown})
      for (std::size_t n = 0; n < g->size(); ++n)
        if ((*g)[n] > 0) seen[n] = true;
    const auto distinct = std::count(seen.begin(), seen.end(), true);
    if (distinct <= 1) {
      const auto value = std::find(seen.begin(), seen.end(), true) - seen.begin();
      fail("all " + std::to_string(total) + " shots have " + std::to_string(value) +
           " counts: a single-valued histogram cannot separate a dark and a bright rate");
    }
  }
  if (s.n_bright == 0 && s.n_unknown == 0)
    fail("no bright evidence: there are no `bright` or `unknown` rows, only " + std::to_string(s.n_dark) +
         " dark reference shots");
  if (s.n_dark == 0 && s.n_unknown == 0)
    fail("no dark evidence: there are no `dark` or `unknown` rows, only " + std::to_string(s.n_bright) +
         " bright reference shots");
  if (s.n_dark > 0 && s.n_bright > 0) {
    const double md = s.s_dark / static_cast<double>(s.n_dark), mb = s.s_bright / static_cast<double>(s.n_bright);
    // Poisson standard error of each mean, floored at one count per group so that a group with
    // no counts at all does not give a zero error.
    const double se = std::sqrt(std::max(md, 1.0 / static_cast<double>(s.n_dark)) / static_cast<double>(s.n_dark) +
                                std::max(mb, 1.0 / static_cast<double>(s.n_bright)) / static_cast<double>(s.n_bright));
    const double z = (mb - md) / se;
    if (mb <= md)
      fail("bright reference shots have no more counts than dark ones (mean " + number_text(mb) +
           " vs " + number_text(md) + "): labels swapped, or no bright evidence");
    if (z < 3)
      fail("bright mean " + number_text(mb) + " is not above the dark mean " + number_text(md) +
           " by 3 standard errors (z = " + number_text(z) + "): equal rates cannot be told apart");
    return;
  }
  // One label (or none) plus unknown shots: the unknown shots must show a second component.
  MixtureFitOptions em = o;
  em.pump_per_window = 0;
  const MixtureFit two = fit_unchecked(h, em, std::nullopt);
  double one = 0;
  std::string what;
  if (s.n_dark > 0) {  // null: every unknown shot is dark
    const double lam = (s.s_dark + s.s_unknown) / static_cast<double>(s.n_dark + s.n_unknown);
    one = poisson_log_likelihood(h.dark, lam) + poisson_log_likelihood(h.unknown, lam);
    what = "no bright evidence: the unknown shots are consistent with all dark";
  } else if (s.n_bright > 0) {
    const double lam = (s.s_bright + s.s_unknown) / static_cast<double>(s.n_bright + s.n_unknown);
    one = poisson_log_likelihood(h.bright, lam) + poisson_log_likelihood(h.unknown, lam);
    what = "no dark evidence: the unknown shots are consistent with all bright";
  } else {
    const double lam = s.s_unknown / static_cast<double>(s.n_unknown);
    one = poisson_log_likelihood(h.unknown, lam);
    what = "unidentifiable mixture: the unknown shots are consistent with a single Poisson rate";
  }
  const double lr = 2 * (two.log_likelihood - one);
  if (!(lr >= 10.83))
    fail(what + " (likelihood ratio 2 dlogL = " + number_text(lr) +
         " < 10.83, p > 0.001); add labelled reference shots");
}

MixtureFit fit_mixture(const CountHistograms& h, const MixtureFitOptions& o,
                       const std::optional<MixtureFit>& start) {
  if (!(o.pump_per_window >= 0) || !std::isfinite(o.pump_per_window))
    throw DomainError("pump_per_window = " + number_text(o.pump_per_window) + ", but must be >= 0");
  if (!start) identify_or_throw(h, o);
  return fit_unchecked(h, o, start);
}

}  // namespace macroreal
