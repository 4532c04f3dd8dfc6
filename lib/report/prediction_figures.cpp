#include "report/prediction_figures.hpp"

#include <algorithm>
#include <cmath>
#include <complex>
#include <cstdio>
#include <filesystem>
#include <map>
#include <numbers>
#include <optional>

#include <boost/math/tools/minima.hpp>

#include "core/error.hpp"
#include "phase_space/wigner_map.hpp"
#include "protocol/protocol_reader.hpp"

namespace macroreal {

namespace {

std::string num(double v, int digits = 3) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", digits, v);
  return buf;
}

const TestSpec& test_at(const Protocol& p, std::size_t i) {
  if (i >= p.tests.size())
    throw DomainError("figures: test index " + std::to_string(i) + ", but the protocol has " +
                      std::to_string(p.tests.size()) + " tests");
  return p.tests[i];
}

std::vector<std::string> test_measurements(const TestSpec& t) {
  if (t.kind == TestSpec::Kind::leggett_garg) return t.order;
  return {t.from, t.to};
}

// The protocol reduced to one test; its sequences are dropped, so predict() asks the engine
// for exactly the probabilities this test needs (the same engine calls the full run makes).
Protocol single_test(const Protocol& p, const TestSpec& t) {
  Protocol q = p;
  q.tests = {t};
  q.sequences.clear();
  return q;
}

std::string split_in_use(const Protocol& p, const std::vector<std::string>& names) {
  bool sym = false, one = false;
  for (const auto& n : names)
    (p.measurement(n).measurement.split == Split::symmetric ? sym : one) = true;
  return sym && one ? "mixed" : (one ? "one-sided" : "symmetric");
}

struct PointValue {
  double value = 0.0;
  std::optional<double> classical;
};

PointValue evaluate(const Protocol& q, const PredictOptions& o) {
  const PredictionResult r = predict(q, o);
  const TestPrediction& t = r.tests.front();
  if (t.lg) {
    const bool kicked = t.lg->model_in_use == ClassicalKind::kicked;
    return {t.lg->K, kicked ? t.lg->K_classical_kicked : t.lg->K_classical};
  }
  const bool kicked = split_in_use(q, {t.nsit->from, t.nsit->to}) != "symmetric";
  return {t.nsit->S, kicked ? t.nsit->S_classical_kicked : t.nsit->S_classical};
}

// What the scan maximises: K for LG, |S| for NSIT.
double merit(const SettingScan& s, double v) { return s.leggett_garg ? v : std::abs(v); }

// Grid maximum, refined by Brent's method on the two neighbouring intervals (Brent,
// "Algorithms for Minimization without Derivatives" (1973), ch. 5, as in Boost.Math).
template <class F>
void find_optimum(SettingScan& s, F&& value_at) {
  std::size_t best = 0;
  for (std::size_t k = 1; k < s.x.size(); ++k)
    if (merit(s, s.value[k]) > merit(s, s.value[best])) best = k;
  s.optimum_x = s.x[best];
  s.optimum_value = s.value[best];
  const double a = s.x[best == 0 ? 0 : best - 1];
  const double b = s.x[std::min(best + 1, s.x.size() - 1)];
  if (!(b > a)) return;
  const auto r = boost::math::tools::brent_find_minima(
      [&](double x) { return -merit(s, value_at(x)); }, a, b, 30);
  if (-r.second > merit(s, s.optimum_value)) {
    s.optimum_x = r.first;
    s.optimum_value = value_at(r.first);
  }
}

std::string quantity_of(const TestSpec& t) {
  if (t.kind == TestSpec::Kind::nsit) return "S";
  return "K_" + std::to_string(t.order.size());
}

std::string classical_label_of(const Protocol& p, const TestSpec& t) {
  return split_in_use(p, test_measurements(t)) == "symmetric" ? "classical model (non-invasive)"
                                                              : "classical model (kicked)";
}

// Adds the evaluated point to the scan.
void push(SettingScan& s, double x, const PointValue& v, bool& classical_everywhere) {
  s.x.push_back(x);
  s.value.push_back(v.value);
  if (v.classical)
    s.classical.push_back(*v.classical);
  else
    classical_everywhere = false;
}

std::vector<double> grid_with(double lo, double hi, int points, double extra) {
  // A grid point that rounds to the extra one gives way to it, so the setting itself is drawn.
  std::vector<double> g{extra};
  for (int k = 0; k < points; ++k) {
    const double x = lo + (hi - lo) * k / (points - 1);
    if (std::abs(x - extra) > 1e-9 * (hi - lo)) g.push_back(x);
  }
  std::sort(g.begin(), g.end());
  return g;
}

double direction_deg(cplx beta) {
  double d = std::arg(beta) * 180.0 / std::numbers::pi;
  if (d < 0) d += 360.0;
  return d;
}

// PLplot text for a quantity: K_3 -> "K#d3#u".
std::string plot_text(const std::string& quantity) {
  const auto u = quantity.find('_');
  if (u == std::string::npos) return quantity;
  return quantity.substr(0, u) + "#d" + quantity.substr(u + 1) + "#u";
}

}  // namespace

SettingScan scan_test_over_beta(const Protocol& protocol, std::size_t test_index,
                                const SettingScanOptions& options) {
  const TestSpec& t = test_at(protocol, test_index);
  if (options.points < 3) throw DomainError("figures: scan points = " + std::to_string(options.points) + ", but must be >= 3");
  if (options.beta_max < 0) throw DomainError("figures: beta_max must be >= 0");
  const Protocol base = single_test(protocol, t);
  const std::vector<std::string> names = test_measurements(t);
  double setting = 0.0, smallest = std::numeric_limits<double>::infinity();
  for (const auto& n : names) {
    const double m = std::abs(base.measurement(n).measurement.beta);
    setting = std::max(setting, m);
    smallest = std::min(smallest, m);
  }
  if (!(setting > 0))
    throw DomainError("figures: every displacement of " + t.label() + " is 0, nothing to scale");
  const bool equal = setting - smallest <= 1e-12 * setting;

  SettingScan s;
  s.test_label = t.label();
  s.quantity = quantity_of(t);
  s.leggett_garg = t.kind == TestSpec::Kind::leggett_garg;
  s.x_label = equal ? "|#gb| of every measurement (dimensionless)"
                    : "largest |#gb|, all of the test's #gb scaled together (dimensionless)";
  const auto value_at = [&](double x) {
    Protocol q = base;
    const double f = x / setting;
    for (const auto& n : names) q.measurements.at(n).measurement.beta *= f;
    return evaluate(q, options.predict);
  };
  const PointValue at_setting = evaluate(base, options.predict);
  s.bound = 0.0;
  if (s.leggett_garg) s.bound = predict(base, options.predict).tests.front().lg->bound;
  const double hi = options.beta_max > 0 ? options.beta_max : std::max(2.0 * setting, 1.0);
  bool classical_everywhere = true;
  for (double x : grid_with(0.0, hi, options.points, setting))
    push(s, x, x == setting ? at_setting : value_at(x), classical_everywhere);
  if (!classical_everywhere) s.classical.clear();
  s.classical_label = classical_label_of(base, t);
  s.settings.push_back({"protocol setting", setting, at_setting.value});
  find_optimum(s, [&](double x) { return value_at(x).value; });
  return s;
}

SettingScan scan_nsit_over_direction(const Protocol& protocol, std::size_t test_index,
                                     const SettingScanOptions& options) {
  const TestSpec& t = test_at(protocol, test_index);
  if (t.kind != TestSpec::Kind::nsit)
    throw DomainError("figures: " + t.label() + " is not an NSIT test; no direction scan");
  if (options.points < 3) throw DomainError("figures: scan points = " + std::to_string(options.points) + ", but must be >= 3");
  const Protocol base = single_test(protocol, t);
  const cplx beta = base.measurement(t.from).measurement.beta;
  const double modulus = std::abs(beta);
  SettingScan s;
  s.test_label = t.label();
  s.quantity = "S";
  s.leggett_garg = false;
  s.x_label = "direction of #gb of " + t.from + " (deg)";
  const auto value_at = [&](double deg) {
    Protocol q = base;
    q.measurements.at(t.from).measurement.beta = std::polar(modulus, deg * std::numbers::pi / 180.0);
    return evaluate(q, options.predict);
  };
  const double setting = direction_deg(beta);
  const PointValue at_setting = evaluate(base, options.predict);
  bool classical_everywhere = true;
  // Three times the intervals: directions often oscillate faster than moduli (orientation scans).
  for (double x : grid_with(0.0, 360.0, 3 * (options.points - 1) + 1, setting))
    push(s, x, x == setting ? at_setting : value_at(x), classical_everywhere);
  if (!classical_everywhere) s.classical.clear();
  s.classical_label = classical_label_of(base, t);
  s.settings.push_back({t.label(), setting, at_setting.value});
  find_optimum(s, [&](double x) { return value_at(x).value; });
  return s;
}

Figure setting_scan_figure(const SettingScan& s, const std::string& title) {
  Figure f;
  f.title = title;
  f.x_label = s.x_label;
  f.y_label = s.leggett_garg ? plot_text(s.quantity) + " (dimensionless)"
                             : "S = P#dB#u(+) - #gS#da#u P#dAB#u(a,+) (probability)";
  FigureSeries model;
  model.label = "model";
  model.colour = PaletteColour::blue;
  model.x = s.x;
  model.y = s.value;
  f.series.push_back(model);
  if (!s.classical.empty()) {
    FigureSeries cl;
    cl.label = s.classical_label;
    cl.colour = PaletteColour::orange;
    cl.dashed = true;
    cl.x = s.x;
    cl.y = s.classical;
    f.series.push_back(cl);
  }
  FigureSeries bound;
  bound.kind = FigureSeries::Kind::horizontal_line;
  bound.label = s.leggett_garg ? "classical bound " + plot_text(s.quantity) + " = " + num(s.bound, 0)
                               : "no signalling (S = 0)";
  bound.colour = PaletteColour::black;
  bound.dashed = true;
  bound.y = {s.bound};
  f.series.push_back(bound);
  FigureSeries opt;
  opt.kind = FigureSeries::Kind::points;
  opt.label = "optimum of the curve: " + plot_text(s.quantity) + " = " + num(s.optimum_value) +
              " at " + num(s.optimum_x, 2);
  opt.colour = PaletteColour::bluish_green;
  opt.x = {s.optimum_x};
  opt.y = {s.optimum_value};
  f.series.push_back(opt);
  FigureSeries set;
  set.kind = FigureSeries::Kind::points;
  set.colour = PaletteColour::vermillion;
  for (const auto& m : s.settings) {
    set.x.push_back(m.x);
    set.y.push_back(m.value);
  }
  set.label = s.settings.size() == 1
                  ? s.settings[0].label + ": " + plot_text(s.quantity) + " = " + num(s.settings[0].value)
                  : "the protocol's " + std::to_string(s.settings.size()) + " tests";
  f.series.push_back(set);
  leave_room_for_legend(f);
  return f;
}

// Largest |beta| (up to 60) where |chi| exceeds 1e-12 on 16 rays, plus 0.5 (the rule
// wigner_map uses when it chooses the extent itself).
double chi_extent_of(const State& state) {
  double extent = 1.0;
  for (int k = 0; k < 16; ++k) {
    const cplx dir = std::polar(1.0, 2.0 * std::numbers::pi * k / 16.0);
    for (double r = 0.25; r <= 60.0; r += 0.25)
      if (std::abs(state.characteristic(r * dir)) > 1e-12) extent = std::max(extent, r);
  }
  return extent + 0.5;
}

Figure wigner_figure(const State& state, const std::string& what, const WignerFigureOptions& o) {
  WignerMap w;
  if (o.half_width > 0) {
    if (o.points < 2) throw DomainError("figures: Wigner map points must be >= 2");
    w = wigner_map(state, o.half_width, o.points);
  } else {
    if (!(o.spacing > 0)) throw DomainError("figures: Wigner map spacing must be > 0");
    // chi's extent mirrors the state's (wigner_map.hpp): B/2 + 3 covers it. One chi grid only:
    // for broad states (a 10 dB grid state) each chi grid costs seconds.
    const double chi_extent = chi_extent_of(state);
    const double cover = std::max(4.0, 0.5 * chi_extent + 3.0);
    const int half = static_cast<int>(std::ceil(cover / o.spacing));
    const WignerMap all = wigner_map(state, half * o.spacing, 2 * half + 1, chi_extent);
    double peak = 0.0;
    for (const auto& row : all.w)
      for (double v : row) peak = std::max(peak, std::abs(v));
    double extent = 0.0;
    for (std::size_t i = 0; i < all.w.size(); ++i)
      for (std::size_t j = 0; j < all.w[i].size(); ++j)
        if (std::abs(all.w[i][j]) > 1e-3 * peak)
          extent = std::max({extent, std::abs(all.re_alpha[i]), std::abs(all.im_alpha[j])});
    const int keep = std::min(half, static_cast<int>(std::ceil(std::max(2.0, extent + 1.0) / o.spacing)));
    const int from = half - keep, n = 2 * keep + 1;
    w.re_alpha.assign(all.re_alpha.begin() + from, all.re_alpha.begin() + from + n);
    w.im_alpha.assign(all.im_alpha.begin() + from, all.im_alpha.begin() + from + n);
    for (int i = 0; i < n; ++i)
      w.w.emplace_back(all.w[from + i].begin() + from, all.w[from + i].begin() + from + n);
    w.min_value = all.min_value;
  }
  Figure f;
  f.title = "Wigner function of " + what + " (min W = " + num(w.min_value) + ")";
  f.x_label = "Re #ga (dimensionless, #ga = (x + ip)/sqrt 2)";
  f.y_label = "Im #ga (dimensionless)";
  FigureMap m;
  m.z = w.w;
  m.x_min = w.re_alpha.front();
  m.x_max = w.re_alpha.back();
  m.y_min = w.im_alpha.front();
  m.y_max = w.im_alpha.back();
  m.z_label = "W(#ga) (per unit area in #ga)";
  m.diverging = true;
  f.map = m;
  return f;
}

std::vector<NamedFigure> wigner_figures(const Protocol& protocol, const WignerFigureOptions& o) {
  if (!protocol.state) throw DomainError("figures: protocol " + protocol.file + " has no state");
  std::vector<NamedFigure> out;
  out.push_back({"wigner_input", wigner_figure(*protocol.state, "the input state", o)});
  // The states a prepared input was made from, outermost first.
  const std::filesystem::path file(protocol.file);
  const std::string base_dir =
      protocol.file.empty() || protocol.file[0] == '<' ? std::string() : file.parent_path().string();
  nlohmann::json j = protocol.state_json;
  std::string path = "state";
  for (int level = 1; j.is_object() && j.value("kind", "") == "prepared" && j.contains("from"); ++level) {
    j = j["from"];
    path += ".from";
    const StatePtr from = parse_state(j, protocol.file, path, base_dir);
    const std::string stem = level == 1 ? "wigner_before_preparation"
                                        : "wigner_before_preparation_" + std::to_string(level);
    out.push_back({stem, wigner_figure(*from, "the state before preparation step " +
                                                  std::to_string(level) + " (" + j.value("kind", "") + ")", o)});
  }
  return out;
}

std::vector<NamedFigure> prediction_figures(const Protocol& protocol,
                                            const PredictionFigureOptions& o) {
  if (!protocol.state) throw DomainError("figures: protocol " + protocol.file + " has no state");
  std::vector<NamedFigure> out;
  for (std::size_t i = 0; i < protocol.tests.size(); ++i) {
    const TestSpec& t = protocol.tests[i];
    const SettingScan s = scan_test_over_beta(protocol, i, o.scan);
    const std::string q = t.kind == TestSpec::Kind::nsit ? "S" : "K";
    out.push_back({q + "_vs_beta_" + figure_stem(t.label()),
                   setting_scan_figure(s, q + " of " + t.label() + " against |#gb| (model)")});
  }
  // NSIT tests that differ only in the direction of "from" share one direction curve.
  std::vector<bool> done(protocol.tests.size(), false);
  for (std::size_t i = 0; i < protocol.tests.size(); ++i) {
    const TestSpec& t = protocol.tests[i];
    if (t.kind != TestSpec::Kind::nsit || done[i]) continue;
    SettingScan s = scan_nsit_over_direction(protocol, i, o.scan);
    const MeasurementSpec& a = protocol.measurement(t.from);
    for (std::size_t k = i + 1; k < protocol.tests.size(); ++k) {
      const TestSpec& u = protocol.tests[k];
      if (u.kind != TestSpec::Kind::nsit || u.to != t.to) continue;
      const MeasurementSpec& b = protocol.measurement(u.from);
      const bool same = std::abs(std::abs(a.measurement.beta) - std::abs(b.measurement.beta)) < 1e-12 &&
                        a.measurement.phase_rad == b.measurement.phase_rad &&
                        a.measurement.split == b.measurement.split &&
                        a.measurement.contrast == b.measurement.contrast && a.time_s == b.time_s &&
                        a.duration_s == b.duration_s;
      if (!same) continue;
      done[k] = true;
      const double v = evaluate(single_test(protocol, u), o.scan.predict).value;
      s.settings.push_back({u.label(), direction_deg(b.measurement.beta), v});
    }
    const std::string what = s.settings.size() > 1 ? std::to_string(s.settings.size()) + " NSIT tests to " + t.to
                                                   : t.label();
    out.push_back({"S_vs_direction_" + figure_stem(t.label()),
                   setting_scan_figure(s, "S of " + what + " against the direction of the first measurement")});
  }
  for (auto& w : wigner_figures(protocol, o.wigner)) out.push_back(std::move(w));
  return out;
}

}  // namespace macroreal
