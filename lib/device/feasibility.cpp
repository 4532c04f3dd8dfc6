// Feasibility of a test on a device (feasibility.hpp).
#include "device/feasibility.hpp"

#include <algorithm>
#include <cmath>

#include <boost/math/distributions/normal.hpp>

#include "core/error.hpp"
#include "design/shot_allocation.hpp"
#include "phase_space/classical_model.hpp"
#include "phase_space/number_text.hpp"
#include "phase_space/prepared_state.hpp"
#include "phase_space/temporal_tests.hpp"
#include "stats/campaign_counts.hpp"
#include "stats/linear_functional.hpp"

namespace macroreal {

namespace {

constexpr double kTwoPi = 6.283185307179586476925;
constexpr double kInf = std::numeric_limits<double>::infinity();
using detail::number_text;

// The state and the measured sequence for one choice of the free settings.
struct Built {
  StatePtr state;
  MeasurementSequence seq;  // A, B (, C)
  double p_success = 1.0;
};

class RouteProblem {
 public:
  RouteProblem(const MappedDevice& dev, ReachTest test, bool prepared, int prep_index = 0)
      : dev_(dev), test_(test), prepared_(prepared),
        prep_(prepared ? dev.preparations.at(static_cast<std::size_t>(prep_index))
                       : MappedDevice::Preparation{}) {
    if (prepared_) outer_ = {"theta_PA", "theta_AB"};
    else outer_ = {"theta_AB"};
    if (test_ == ReachTest::leggett_garg) outer_.push_back("theta_BC");
    if (prepared_) outer_.push_back("phi_P");
  }
  // The searched settings (rotation angles, preparation phase); the Ramsey phases of the
  // measured steps are optimised inside (inner_phases).
  const std::vector<std::string>& outer_names() const { return outer_; }
  int steps() const { return test_ == ReachTest::leggett_garg ? 3 : 2; }

  Built build(const std::vector<double>& x, const std::vector<double>& phis) const {
    Built b;
    std::size_t k = 0;
    const int n = steps();
    const double theta_pa = prepared_ ? x[k++] : 0.0;
    std::vector<double> gaps;
    for (int i = 0; i + 1 < n; ++i) gaps.push_back(x[k++]);
    const double phi_p = prepared_ ? x[k++] : 0.0;
    StatePtr base = make_thermal(dev_.initial_nbar);
    double t = 0.0, theta = 0.0;
    if (prepared_) {
      ModularMeasurement mp;
      mp.beta = prep_.beta;
      mp.phase_rad = phi_p;
      mp.contrast = prep_.contrast;
      auto prep = std::make_shared<PreparedState>(base, std::vector<ModularMeasurement>{mp},
                                                  OutcomeString{+1});
      b.p_success = prep->preparation_probability();
      b.state = prep;
      // The first measurement starts after the preparation's (possibly longer) interaction.
      MappedDevice longer = dev_;
      longer.interaction_s = prep_.interaction_s;
      t = longer.next_start_s(0.0, theta_pa);
      theta = theta_pa;
    } else {
      b.state = base;
    }
    b.seq.noise = dev_.noise;
    const char* labels[3] = {"A", "B", "C"};
    for (int i = 0; i < n; ++i) {
      if (i > 0) {
        t = dev_.next_start_s(t, gaps[static_cast<std::size_t>(i - 1)]);
        theta += gaps[static_cast<std::size_t>(i - 1)];
      }
      TimedMeasurement m;
      m.label = labels[i];
      m.measurement = dev_.measurement(theta, phis[static_cast<std::size_t>(i)]);
      m.time_s = t;
      b.seq.steps.push_back(m);
    }
    return b;
  }

  // The same sequence with other Ramsey phases (the state and the times do not depend on them).
  static MeasurementSequence with_phases(const MeasurementSequence& seq,
                                         const std::vector<double>& phis) {
    MeasurementSequence out = seq;
    for (std::size_t i = 0; i < out.steps.size(); ++i) out.steps[i].measurement.phase_rad = phis[i];
    return out;
  }

  // K or S of the quantum model.
  double value(const Built& b, const WeylEngineOptions& opt) const {
    const WeylEngine engine(b.state, opt);
    return test_ == ReachTest::leggett_garg ? leggett_garg3(engine, b.seq).K
                                            : nsit_signalling(engine, b.seq, 0, 1);
  }

  // The best Ramsey phases for the outer settings x, and the value there (K, or |S| with S > 0).
  // The signed outcome map of a symmetric-split measurement is linear in e^{+-i phi}
  // (measurement.hpp), so C_ij = Re(a e^{i(phi_i + phi_j)}) + Re(b e^{i(phi_j - phi_i)}) with a, b
  // from four evaluations; K is then maximised over the three phases by coordinate ascent (each
  // step closed form: Re(A e^{i phi}) is largest at phi = -arg A) from 8 starts. The NSIT S
  // does not depend on phi_A (the unselective map has no phase) and is Re(s e^{i phi_B}).
  std::pair<std::vector<double>, double> inner_phases(const std::vector<double>& x,
                                                      const WeylEngineOptions& opt) const {
    constexpr double h = 1.5707963267948966;  // pi / 2
    if (test_ == ReachTest::nsit) {
      const Built b0 = build(x, {0.0, 0.0});
      const WeylEngine e0(b0.state, opt);
      const double re = nsit_signalling(e0, b0.seq, 0, 1);
      const double im = -nsit_signalling(e0, with_phases(b0.seq, {0.0, h}), 0, 1);
      return {{0.0, wrap(-std::atan2(im, re))}, std::hypot(re, im)};
    }
    const int pairs[3][2] = {{0, 1}, {1, 2}, {0, 2}};
    cplx a[3], bb[3];
    const Built ref = build(x, {0.0, 0.0, 0.0});
    const WeylEngine engine(ref.state, opt);
    for (int q = 0; q < 3; ++q) {
      double v[2][2];
      for (int si = 0; si < 2; ++si)
        for (int sj = 0; sj < 2; ++sj) {
          std::vector<double> ph(3, 0.0);
          ph[static_cast<std::size_t>(pairs[q][0])] = si * h;
          ph[static_cast<std::size_t>(pairs[q][1])] = sj * h;
          v[si][sj] = pair_correlator(engine, with_phases(ref.seq, ph), pairs[q][0], pairs[q][1]);
        }
      a[q] = cplx((v[0][0] - v[1][1]) / 2.0, -(v[1][0] + v[0][1]) / 2.0);
      bb[q] = cplx((v[0][0] + v[1][1]) / 2.0, (v[1][0] - v[0][1]) / 2.0);
    }
    // The ascent runs on the unit numbers u = e^{i phi} (no trigonometry in the loop: it was
    // most of a map's time): the best phi for a coefficient A is -arg A, i.e. u = conj(A)/|A|.
    auto unit_of = [](cplx z) {
      const double m = std::sqrt(std::norm(z));
      return m > 0.0 ? std::conj(z) / m : cplx(1.0, 0.0);  // arg 0 = 0 gives phi = 0
    };
    auto k_of = [&](cplx ua, cplx ub, cplx uc) {
      return (a[0] * ua * ub + bb[0] * ub * std::conj(ua)).real() +
             (a[1] * ub * uc + bb[1] * uc * std::conj(ub)).real() -
             (a[2] * ua * uc + bb[2] * uc * std::conj(ua)).real();
    };
    const double r = std::sqrt(0.5);
    double best = -kInf;
    std::vector<double> best_ph(3, 0.0);
    for (int s = 0; s < 8; ++s) {
      // Starts phi_A in {0, pi}, phi_B in {pi/4, 5 pi/4}, phi_C in {pi/2, 3 pi/2}.
      cplx ua = (s % 2) ? cplx(-1.0, 0.0) : cplx(1.0, 0.0);
      cplx ub = ((s / 2) % 2) ? cplx(-r, -r) : cplx(r, r);
      cplx uc = (s / 4) ? cplx(0.0, -1.0) : cplx(0.0, 1.0);
      double cur = k_of(ua, ub, uc);
      for (int it = 0; it < 100; ++it) {
        ua = unit_of(a[0] * ub - a[2] * uc + std::conj(bb[0] * ub - bb[2] * uc));
        ub = unit_of(a[0] * ua + bb[0] * std::conj(ua) + a[1] * uc + std::conj(bb[1] * uc));
        uc = unit_of(a[1] * ub + bb[1] * std::conj(ub) - a[2] * ua - bb[2] * std::conj(ua));
        const double nxt = k_of(ua, ub, uc);
        const bool done = nxt - cur <= 1e-14;
        cur = nxt;
        if (done) break;
      }
      if (cur > best + 1e-13) {
        best = cur;
        best_ph = {wrap(std::arg(ua)), wrap(std::arg(ub)), wrap(std::arg(uc))};
      }
    }
    return {best_ph, best};
  }

 private:
  static double wrap(double p) {
    double r = std::fmod(p, kTwoPi);
    if (r < 0.0) r += kTwoPi;
    return r;
  }
  const MappedDevice& dev_;
  ReachTest test_;
  bool prepared_;
  MappedDevice::Preparation prep_;
  std::vector<std::string> outer_;
};

// Layout of the run sequences the test needs, with the model's cell probabilities.
struct CellModel {
  CampaignCounts layout;
  CellCounts probabilities;
};

CellModel cell_model(const Built& b, ReachTest test, bool destructive,
                     const WeylEngineOptions& opt) {
  CellModel cm;
  cm.layout.readout = destructive ? Readout::destructive : Readout::nondestructive;
  std::vector<std::vector<int>> sets =
      test == ReachTest::leggett_garg ? std::vector<std::vector<int>>{{0, 1}, {1, 2}, {0, 2}}
                                      : std::vector<std::vector<int>>{{1}, {0, 1}};
  const WeylEngine engine(b.state, opt);
  for (const auto& idx : sets) {
    std::vector<std::vector<int>> darks;
    std::vector<int> plus(idx.size(), +1);
    darks.push_back(plus);
    if (destructive && idx.size() > 1) {
      std::vector<int> minus = plus;
      minus[0] = -1;
      darks.push_back(minus);
    }
    const MeasurementSequence sub = subsequence(b.seq, idx);
    for (const auto& dark : darks) {
      SequenceCounts sc;
      for (int i : idx) sc.steps.push_back(b.seq.steps[static_cast<std::size_t>(i)].label);
      sc.dark_is = dark;
      sc.name = generated_sequence_name(sc.steps, dark, cm.layout.readout);
      sc.cells = cell_layout(idx.size(), dark, cm.layout.readout);
      sc.counts.assign(sc.cells.size(), 0.0);
      std::vector<double> p;
      for (const auto& cell : sc.cells) p.push_back(engine.probability_value(sub, cell));
      cm.layout.sequences.push_back(std::move(sc));
      cm.probabilities.push_back(std::move(p));
    }
  }
  return cm;
}

// A warm start for one route's search: the start and the search options to use with it, and
// where to put the optimum found.
struct WarmStart {
  const std::vector<double>* start = nullptr;  // null: options.search from the default start
  const SearchOptions* search = nullptr;
  std::vector<double>* optimum = nullptr;      // null: not wanted
};

RouteResult solve_route(const MappedDevice& dev, const ReachOptions& opt, bool prepared,
                        double z_total, int prep_index = 0, WarmStart warm = {}) {
  const RouteProblem problem(dev, opt.test, prepared, prep_index);
  RouteResult r;
  r.preparation_multiple = prepared ? dev.preparations.at(static_cast<std::size_t>(prep_index)).multiple : 0;
  r.name = prepared ? "post-selected input" : "thermal input";
  r.input = prepared ? "the mode's state (nbar = " + number_text(dev.initial_nbar) +
                           ") post-selected on the + outcome of one extra modular measurement "
                           "at t = 0 with " + std::to_string(r.preparation_multiple) +
                           "x the measurement's interaction"
                     : "thermal state with nbar = " + number_text(dev.initial_nbar);
  r.bound = opt.test == ReachTest::leggett_garg ? 1.0 : 0.0;
  r.setting_names = problem.outer_names();
  const std::size_t d = r.setting_names.size();
  SearchProblem sp;
  sp.lower.assign(d, 0.0);
  sp.upper.assign(d, kTwoPi);
  // Start: rotations of 60 degrees, preparation phase 0 (an arbitrary start off the centre).
  sp.start.assign(d, 0.0);
  for (std::size_t i = 0; i < d; ++i)
    if (r.setting_names[i].rfind("theta", 0) == 0) sp.start[i] = kTwoPi / 6.0;
  sp.objective = [&](const std::vector<double>& x) {
    try {
      return problem.inner_phases(x, opt.engine).second;
    } catch (const DomainError&) {
      return std::numeric_limits<double>::quiet_NaN();
    } catch (const UnsupportedError&) {
      return std::numeric_limits<double>::quiet_NaN();
    }
  };
  const bool warm_started = warm.start && warm.search && warm.start->size() == d;
  if (warm_started) sp.start = *warm.start;
  const SearchResult sr = maximise(sp, warm_started ? *warm.search : opt.search);
  if (warm.optimum) *warm.optimum = sr.x;
  r.evaluations = sr.evaluations;
  r.search_method = sr.method + "; Ramsey phases by coordinate ascent on the exact phase form";
  const auto phases = problem.inner_phases(sr.x, opt.engine).first;
  r.settings = sr.x;
  const char* phase_names[3] = {"phi_A", "phi_B", "phi_C"};
  for (std::size_t i = 0; i < phases.size(); ++i) {
    r.setting_names.push_back(phase_names[i]);
    r.settings.push_back(phases[i]);
  }
  const Built b = problem.build(sr.x, phases);
  r.value = problem.value(b, opt.engine);  // recomputed directly by the engine
  r.effect = opt.test == ReachTest::leggett_garg ? r.value - 1.0 : std::abs(r.value);
  r.success_probability = b.p_success;
  for (const auto& s : b.seq.steps) r.start_times_s.push_back(s.time_s);
  r.seconds_per_shot = dev.cycle_s / b.p_success;
  if (!prepared && classical_model_applies(*b.state)) {
    const ClassicalModel model(b.state, ClassicalKind::non_invasive, opt.engine);
    r.value_classical = opt.test == ReachTest::leggett_garg ? leggett_garg3(model, b.seq).K
                                                            : nsit_signalling(model, b.seq, 0, 1);
    r.classical_available = true;
  }
  const double tol = 1e-6 * std::max(1.0, std::abs(r.value));
  const bool reproduced = r.classical_available && std::abs(r.value - r.value_classical) <= tol;
  r.can_be_conclusive = r.effect > 1e-9 && !reproduced;
  if (opt.test == ReachTest::leggett_garg) {
    if (!prepared)
      r.classical_note =
          "the device's interaction is the symmetric split; on a Gaussian input its correlators "
          "equal those of a non-invasive classical phase-space point (K_classical = " +
          number_text(r.value_classical) + "), so K <= 1: no conclusive Leggett-Garg test exists "
          "on this route";
    else
      r.classical_note =
          "the post-selected input is not Gaussian; no classical phase-space model of DESIGN.md "
          "applies, so K > 1 would not be explained by one (non-invasive measurability is still "
          "assumed)";
  } else {
    if (!prepared)
      r.classical_note =
          "the classical point models of the symmetric split give S = " +
          number_text(r.value_classical) +
          "; a nonzero S shows that measuring A disturbs B (quantum back-action of the "
          "geometric phase), which refutes non-invasiveness of this measurement, not "
          "macrorealism by itself";
    else
      r.classical_note = "non-Gaussian input: the classical point models do not apply";
  }
  if (r.can_be_conclusive) {
    try {
      const CellModel cm = cell_model(b, opt.test, dev.destructive, opt.engine);
      const LinearFunctional f = opt.test == ReachTest::leggett_garg
                                     ? lg_functional(cm.layout, {"A", "B", "C"})
                                     : nsit_functional(cm.layout, "A", "B");
      const std::vector<double> secs(cm.layout.sequences.size(), r.seconds_per_shot);
      const auto costs = sequence_costs(cm.layout, f, cm.probabilities, secs);
      const ShotAllocation alloc = allocate_for_time(costs, 1.0);
      r.variance_one_second = alloc.variance;
      r.seconds_needed = z_total * z_total * alloc.variance / (r.effect * r.effect);
      r.shots_needed = r.seconds_needed / r.seconds_per_shot;
    } catch (const DomainError&) {
      r.seconds_needed = kInf;
    }
  }
  return r;
}

struct Improvement {
  const char* field;
  const char* change;
};

}  // namespace

std::string to_string(ReachTest t) { return t == ReachTest::nsit ? "nsit" : "lg"; }

ReachTest parse_reach_test(const std::string& s) {
  if (s == "lg") return ReachTest::leggett_garg;
  if (s == "nsit") return ReachTest::nsit;
  throw DomainError("test = \"" + s + "\", but must be \"lg\" or \"nsit\"");
}

void ReachOptions::validate() const {
  if (!(sigma > 0.0) || !std::isfinite(sigma))
    throw DomainError("sigma = " + number_text(sigma) + ", but must be > 0");
  if (!(power > 0.0 && power < 1.0))
    throw DomainError("power = " + number_text(power) + ", but must be in (0, 1)");
}

namespace {

struct Routes {
  std::vector<RouteResult> routes;
  int best = -1;
  double seconds = kInf;
};

Routes solve_all(const DevicePoint& point, const ReachOptions& opt, double z_total,
                 RouteOptima* optima = nullptr, const SearchOptions* warm = nullptr) {
  const MappedDevice dev = map_device(point);
  Routes out;
  std::size_t searched = 0;  // position of the next route in `optima`
  const bool thermal = opt.evaluate_thermal_route || opt.test == ReachTest::nsit;
  // Sized once, so that the slots handed out below stay where they are.
  if (optima) optima->x.resize((thermal ? 1 : 0) + dev.preparations.size());
  auto warm_for = [&]() {
    WarmStart w;
    if (!optima) return w;
    std::vector<double>& slot = optima->x[searched++];
    if (!slot.empty()) {
      w.start = &slot;
      w.search = warm;
    }
    w.optimum = &slot;
    return w;
  };
  if (thermal) out.routes.push_back(solve_route(dev, opt, false, z_total, 0, warm_for()));
  // The post-selected route with each preparation interaction; the shortest time (else the
  // largest effect) is kept.
  RouteResult best;
  bool have = false;
  for (std::size_t k = 0; k < dev.preparations.size(); ++k) {
    RouteResult r = solve_route(dev, opt, true, z_total, static_cast<int>(k), warm_for());
    const bool better = !have || r.seconds_needed < best.seconds_needed ||
                        (r.seconds_needed == best.seconds_needed && r.effect > best.effect);
    if (better) {
      best = std::move(r);
      have = true;
    }
  }
  out.routes.push_back(std::move(best));
  for (std::size_t i = 0; i < out.routes.size(); ++i)
    if (out.routes[i].can_be_conclusive && out.routes[i].seconds_needed < out.seconds) {
      out.seconds = out.routes[i].seconds_needed;
      out.best = static_cast<int>(i);
    }
  return out;
}

double z_of(const ReachOptions& opt) {
  const boost::math::normal_distribution<double> normal;
  return opt.sigma + boost::math::quantile(normal, opt.power);
}

}  // namespace

double time_to_conclusive(const DevicePoint& point, const ReachOptions& options) {
  options.validate();
  return solve_all(point, options, z_of(options)).seconds;
}

double time_to_conclusive_from(const DevicePoint& point, const ReachOptions& options,
                               const SearchOptions& warm, RouteOptima& optima) {
  options.validate();
  return solve_all(point, options, z_of(options), &optima, &warm).seconds;
}

ReachResult reach(const DevicePoint& point, const ReachOptions& options) {
  options.validate();
  ReachResult res;
  res.point = point;
  res.mapped = map_device(point);
  res.options = options;
  res.z_total = z_of(options);
  Routes routes = solve_all(point, options, res.z_total);
  res.routes = std::move(routes.routes);
  res.best_route = routes.best;
  res.seconds_needed = routes.seconds;
  res.conclusive = res.seconds_needed <= res.mapped.available_s;
  const std::string what = options.test == ReachTest::leggett_garg ? "Leggett-Garg" : "NSIT";
  if (res.best_route < 0) {
    res.verdict = "No conclusive " + what + " test is reachable with this device and scheme: "
                  "no route gives an effect that a classical model of DESIGN.md does not "
                  "reproduce, or the effect is zero.";
  } else {
    const RouteResult& r = res.routes[static_cast<std::size_t>(res.best_route)];
    res.verdict = std::string(res.conclusive ? "Conclusive" : "Not conclusive") +
                  " within the available " + number_text(point.measurement_time_available_h) +
                  " h: the " + r.name + " route needs " + number_text(res.seconds_needed / 3600.0) +
                  " h of lab time for a " + number_text(options.sigma) + "-sigma " + what +
                  " test at power " + number_text(options.power) + ".";
  }
  if (options.elasticities) {
    ReachOptions inner = options;
    inner.elasticities = false;
    const Improvement list[] = {{"quality_factor", "x2"},
                                {"bath_temperature_k", "/2"},
                                {"occupation_after_cooling", "/2"},
                                {"coupling_g_over_2pi_hz", "x2"},
                                {"qubit_t2_s", "x2"},
                                {"readout_errors", "/2"},
                                {"shot_cycle_time_s", "/2"},
                                {"frequency_stability_fractional", "/2"}};
    for (const auto& imp : list) {
      DevicePoint q = point;
      const std::string f = imp.field;
      if (f == "occupation_after_cooling") {
        if (!q.occupation_after_cooling || *q.occupation_after_cooling == 0.0) continue;
        *q.occupation_after_cooling /= 2.0;
      } else if (f == "readout_errors") {
        if (q.readout_error_bright_read_dark == 0.0 && q.readout_error_dark_read_bright == 0.0)
          continue;
        q.readout_error_bright_read_dark /= 2.0;
        q.readout_error_dark_read_bright /= 2.0;
      } else {
        const double v = q.get(f);
        if (v == 0.0) continue;
        q.set(f, std::string(imp.change) == "x2" ? 2.0 * v : v / 2.0);
      }
      Elasticity e;
      e.parameter = f;
      e.change = imp.change;
      e.seconds_after = solve_all(q, inner, res.z_total).seconds;
      if (std::isfinite(res.seconds_needed) && std::isfinite(e.seconds_after)) {
        e.time_ratio = e.seconds_after / res.seconds_needed;
        e.elasticity = -std::log2(e.time_ratio);
      }
      res.elasticities.push_back(e);
    }
    std::stable_sort(res.elasticities.begin(), res.elasticities.end(),
                     [](const Elasticity& a, const Elasticity& b) {
                       return a.seconds_after < b.seconds_after;
                     });
    if (!res.elasticities.empty() && std::isfinite(res.elasticities.front().seconds_after)) {
      const auto& e = res.elasticities.front();
      res.limiting_factor = e.parameter + " (" + e.change + " gives " +
                            number_text(e.seconds_after / 3600.0) + " h)";
    } else {
      res.limiting_factor = "no single 2x improvement makes a conclusive test possible";
    }
  }
  res.assumptions = {
      "longitudinal coupling hbar g sigma_z (a + a^dag) only; no transverse or dispersive terms",
      "the interaction is treated as instantaneous at its start with the bath decoherence of "
      "its two branches as a contrast factor (first order in gamma tau = 2 pi x / Q)",
      "readout errors enter as the contrast 1 - e1 - e2 (their symmetric part)",
      "frequency noise is quasi-static (constant within a shot, independent between shots) and "
      "shifts only the rotation between interactions, not the displacement itself",
      "time to a conclusive test: normal approximation of the non-pooled estimator with the "
      "optimum allocation of lab time over the run sequences",
      "a conclusive Leggett-Garg test still assumes non-invasive measurability; NSIT controls "
      "must bound the invasiveness (DESIGN.md section 7)"};
  return res;
}

}  // namespace macroreal
