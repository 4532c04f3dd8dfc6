#include "protocol/prediction.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>

#include "core/error.hpp"

namespace macroreal {

namespace {

// Fixed-point text for sentences; never "-0.0000".
std::string fixed(double x, int digits = 4) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", digits, x);
  std::string s = buf;
  if (s.find_first_not_of("-0.") == std::string::npos && s[0] == '-') s.erase(0, 1);
  return s;
}

class Collector {
 public:
  explicit Collector(EngineSummary& s) : s_(s) {}
  double take(const EngineValue& v) {
    s_.max_hermite_nodes = std::max(s_.max_hermite_nodes, v.hermite_nodes);
    s_.max_rotation_dimensions = std::max(s_.max_rotation_dimensions, v.rotation_dimensions);
    s_.max_error_estimate = std::max(s_.max_error_estimate, v.error_estimate);
    s_.evaluations += v.evaluations;
    s_.engine_calls += 1;
    return v.value;
  }

 private:
  EngineSummary& s_;
};

// The outcome strings a sequence records (see SequencePrediction::outcomes).
std::vector<OutcomeString> recorded_outcomes(const SequenceSpec& seq, Readout readout) {
  const std::size_t n = seq.steps.size();
  std::vector<OutcomeString> out;
  if (readout == Readout::destructive) {
    // The non-dark sign ends the shot. Strings ending in "+" are listed before those that
    // continue; strings ending in "-" after them (lexicographic with "+" first).
    OutcomeString prefix;
    std::vector<OutcomeString> after;  // ended strings whose sign is "-", emitted last-first
    for (std::size_t k = 0; k + 1 < n; ++k) {
      OutcomeString ended = prefix;
      ended.push_back(-seq.dark_is[k]);
      if (seq.dark_is[k] < 0)
        out.push_back(ended);
      else
        after.push_back(ended);
      prefix.push_back(seq.dark_is[k]);
    }
    OutcomeString plus = prefix, minus = prefix;
    plus.push_back(+1);
    minus.push_back(-1);
    out.push_back(plus);
    out.push_back(minus);
    for (auto it = after.rbegin(); it != after.rend(); ++it) out.push_back(*it);
    return out;
  }
  for (std::size_t code = 0; code < (std::size_t{1} << n); ++code) {
    OutcomeString o(n, +1);
    for (std::size_t k = 0; k < n; ++k)
      if ((code >> (n - 1 - k)) & 1u) o[k] = -1;
    out.push_back(o);
  }
  return out;
}

// Joint probabilities of full outcome strings, by (steps, outcomes), from the sequences.
using JointTable = std::map<std::pair<std::vector<std::string>, OutcomeString>, double>;

class JointLookup {
 public:
  JointLookup(const JointTable& t, const Protocol& p, const ModelEngine& e, Collector& c)
      : table_(t), proto_(p), engine_(e), collect_(c) {}
  // From the sequences when they record it (every configuration of a destructive readout
  // contributes its own full strings), else directly from the engine.
  double p(const std::vector<std::string>& steps, const OutcomeString& o) const {
    const auto it = table_.find({steps, o});
    if (it != table_.end()) return it->second;
    return collect_.take(engine_.probability(proto_.sequence_of(steps), o));
  }
  double correlator(const std::string& a, const std::string& b) const {
    double c = 0.0;
    for (int x : {+1, -1})
      for (int y : {+1, -1}) c += x * y * p({a, b}, {x, y});
    return c;
  }

 private:
  const JointTable& table_;
  const Protocol& proto_;
  const ModelEngine& engine_;
  Collector& collect_;
};

std::string split_in_use(const Protocol& proto, const std::vector<std::string>& names) {
  bool sym = false, one = false;
  for (const auto& n : names)
    (proto.measurement(n).measurement.split == Split::symmetric ? sym : one) = true;
  return sym && one ? "mixed" : (one ? "one-sided" : "symmetric");
}

ClassicalVerdict classical_verdict(bool violation, const std::optional<double>& k_cl, double K,
                                   double tol) {
  if (!k_cl) return ClassicalVerdict::unavailable;
  if (!violation) return ClassicalVerdict::no_violation;
  return *k_cl >= K - tol ? ClassicalVerdict::reproduces : ClassicalVerdict::beaten;
}

// sequence_refused: the classical models exist for the state but refused this sequence (e.g. a
// finite-duration measurement), so the prediction cannot say whether they explain K.
std::string lg_verdict(const LeggettGargPrediction& lg, bool sequence_refused) {
  const std::string k = "K = " + fixed(lg.K);
  const std::string b = fixed(lg.bound, 0);
  if (!lg.violation) {
    return k + " does not exceed the macrorealist bound " + b + ": no violation is predicted.";
  }
  const std::string head = k + " exceeds the macrorealist bound " + b;
  if (!lg.K_classical && !sequence_refused) {
    return head +
           "; the classical phase-space models cannot be built for this input (its Wigner "
           "function is not non-negative), so no classical model of this kind explains it; "
           "the test still assumes non-invasive measurability, which NSIT controls must bound.";
  }
  if (!lg.K_classical) {
    return head + "; the classical phase-space models give no value here (" +
           lg.classical_unavailable +
           "), so this prediction does not say whether a classical model of this kind explains "
           "it; the test still assumes non-invasive measurability, which NSIT controls must "
           "bound.";
  }
  const std::string model = to_string(lg.model_in_use);
  const double kc = lg.model_in_use == ClassicalKind::kicked ? *lg.K_classical_kicked
                                                             : *lg.K_classical;
  const std::string name =
      lg.model_in_use == ClassicalKind::kicked ? "K_classical_kicked" : "K_classical";
  if (lg.explained_by_classical_model) {
    return head + ", but the " + model + " classical model of the " + lg.split_in_use +
           " split reproduces it (" + name + " = " + fixed(kc) +
           "): explained by measurement back-action on a classical point, not evidence "
           "against macrorealism.";
  }
  return head + " and beats the " + model + " classical model of the " + lg.split_in_use +
         " split (" + name + " = " + fixed(kc) + ").";
}

std::string nsit_verdict(const NsitPrediction& n) {
  const double a = std::abs(n.S);
  std::string s = "S = " + fixed(n.S) + ": ";
  if (n.margin) {
    s += a <= *n.margin ? "|S| is within the margin " + fixed(*n.margin) +
                              ", measuring " + n.from + " is predicted not to signal to " + n.to
                        : "|S| exceeds the margin " + fixed(*n.margin) + ", measuring " +
                              n.from + " is predicted to signal to " + n.to;
  } else {
    s += a <= 1e-9 ? "measuring " + n.from + " is predicted not to change the statistics of " +
                         n.to
                   : "measuring " + n.from + " changes the statistics of " + n.to +
                         " (signalling in time)";
  }
  if (n.S_classical_kicked && a > 1e-9) {
    const bool kick_explains = std::abs(*n.S_classical_kicked - n.S) <= 1e-9;
    s += kick_explains ? "; the kicked classical model gives the same S, so the signalling is "
                         "explained by the split's deterministic kick"
                       : "; the kicked classical model gives S = " +
                             fixed(*n.S_classical_kicked);
  }
  return s + ".";
}

}  // namespace

std::string to_string(ClassicalVerdict v) {
  switch (v) {
    case ClassicalVerdict::no_violation: return "no violation";
    case ClassicalVerdict::beaten: return "beaten";
    case ClassicalVerdict::reproduces: return "reproduces";
    case ClassicalVerdict::unavailable: return "unavailable";
  }
  return "unavailable";
}

std::string PredictionResult::brief() const {
  std::string s;
  for (const auto& t : tests) {
    if (!s.empty()) s += "; ";
    if (t.lg) {
      s += t.spec.label() + ": K = " + fixed(t.lg->K) + " (bound " + fixed(t.lg->bound, 0) + ")";
    } else if (t.nsit) {
      s += t.spec.label() + ": S = " + fixed(t.nsit->S);
    }
  }
  return s.empty() ? "no tests" : s;
}

PredictionResult predict(const Protocol& proto, const PredictOptions& options) {
  if (!proto.state)
    throw DomainError("protocol " + proto.file + " has no \"state\"; predictions need one");
  PredictionResult res;
  res.file = proto.file;
  res.title = proto.title;
  res.readout = proto.readout;
  res.state_description = proto.state->describe();
  res.wigner_nonnegative = proto.state->wigner_nonnegative();
  res.classical_model_applies =
      options.classical_models &&
      classical_model_applies(*proto.state, &res.classical_unavailable);
  if (!options.classical_models) res.classical_unavailable = "classical models switched off";

  // Every sequence the prediction evaluates, for the engine choice.
  std::vector<MeasurementSequence> all_sequences;
  for (const auto& spec : proto.sequences) all_sequences.push_back(proto.sequence_of(spec.steps));
  for (const auto& steps : proto.step_sets_needed())
    all_sequences.push_back(proto.sequence_of(steps));
  const ModelEngine engine(proto.state, options.engine_kind, all_sequences, options.engine,
                           options.fock);
  Collector collect(res.engine);

  // 1. Every outcome string of every sequence.
  JointTable joint;
  for (const auto& spec : proto.sequences) {
    SequencePrediction sp;
    sp.name = spec.name;
    sp.steps = spec.steps;
    sp.dark_is = spec.dark_is;
    sp.generated = spec.generated;
    const MeasurementSequence seq = proto.sequence_of(spec.steps);
    for (const auto& o : recorded_outcomes(spec, proto.readout)) {
      const EngineValue v = engine.probability(seq, o);
      collect.take(v);
      sp.outcomes.push_back({o, v.value, v.error_estimate});
      sp.total += v.value;
      if (o.size() == spec.steps.size()) joint.emplace(std::make_pair(spec.steps, o), v.value);
    }
    res.max_sum_deviation = std::max(res.max_sum_deviation, std::abs(sp.total - 1.0));
    res.sequences.push_back(std::move(sp));
  }
  if (res.max_sum_deviation > options.sum_tolerance)
    res.status = "outcome probabilities of a sequence sum to 1 only within " +
                 fixed(res.max_sum_deviation, 12) + " (tolerance " +
                 fixed(options.sum_tolerance, 12) + ")";

  std::optional<ClassicalModel> non_invasive, kicked;
  if (res.classical_model_applies) {
    non_invasive.emplace(proto.state, ClassicalKind::non_invasive, options.engine);
    kicked.emplace(proto.state, ClassicalKind::kicked, options.engine);
  }

  const JointLookup lookup(joint, proto, engine, collect);
  const double tol = options.match_tolerance;

  // 2. The tests.
  for (const auto& spec : proto.tests) {
    TestPrediction tp;
    tp.spec = spec;
    if (spec.kind == TestSpec::Kind::leggett_garg) {
      LeggettGargPrediction lg;
      lg.order = spec.order;
      const int n = static_cast<int>(spec.order.size());
      lg.bound = n - 2;
      const MeasurementSequence all = proto.sequence_of(spec.order);
      std::map<std::pair<int, int>, double> c, c_cl, c_kick;
      std::string lg_classical_reason;  // set when a classical model refuses this test
      // Pairs in reading order: neighbours, then first-last, then the others (i < j).
      std::vector<std::pair<int, int>> pairs;
      for (int i = 0; i + 1 < n; ++i) pairs.emplace_back(i, i + 1);
      pairs.emplace_back(0, n - 1);
      for (int i = 0; i < n; ++i)
        for (int j = i + 2; j < n; ++j)
          if (!(i == 0 && j == n - 1)) pairs.emplace_back(i, j);
      for (const auto& [i, j] : pairs) {
        {
          PairCorrelator pc;
          pc.first = spec.order[i];
          pc.second = spec.order[j];
          pc.pair = pc.first + pc.second;
          pc.quantum = lookup.correlator(pc.first, pc.second);
          const double direct = collect.take(engine.correlator(subsequence(all, {i, j})));
          lg.engine_correlator_deviation =
              std::max(lg.engine_correlator_deviation, std::abs(direct - pc.quantum));
          c[{i, j}] = pc.quantum;
          if (non_invasive && lg_classical_reason.empty()) {
            try {
              pc.classical = non_invasive->correlator_value(subsequence(all, {i, j}));
              pc.classical_kicked = kicked->correlator_value(subsequence(all, {i, j}));
              c_cl[{i, j}] = *pc.classical;
              c_kick[{i, j}] = *pc.classical_kicked;
            } catch (const UnsupportedError& e) {
              // e.g. a finite-duration measurement: no classical value rather than a wrong one
              lg_classical_reason = e.what();
            }
          }
          lg.correlators.push_back(std::move(pc));
        }
      }
      const auto k_of = [n](std::map<std::pair<int, int>, double>& m) {
        double k = -m[{0, n - 1}];
        for (int i = 0; i + 1 < n; ++i) k += m[{i, i + 1}];
        return k;
      };
      lg.K = k_of(c);
      if (n == 3) {
        const int s[4][2] = {{1, 1}, {1, -1}, {-1, 1}, {-1, -1}};
        for (const auto& sk : s)
          lg.family.push_back(1.0 + sk[0] * c[{0, 1}] + sk[1] * c[{1, 2}] +
                              sk[0] * sk[1] * c[{0, 2}]);
      }
      if (non_invasive && lg_classical_reason.empty()) {
        lg.K_classical = k_of(c_cl);
        lg.K_classical_kicked = k_of(c_kick);
      } else {
        for (auto& pc : lg.correlators) pc.classical = pc.classical_kicked = std::nullopt;
        lg.classical_unavailable =
            lg_classical_reason.empty() ? res.classical_unavailable : lg_classical_reason;
      }
      lg.split_in_use = split_in_use(proto, spec.order);
      lg.model_in_use =
          lg.split_in_use == "symmetric" ? ClassicalKind::non_invasive : ClassicalKind::kicked;
      lg.violation = lg.K > lg.bound + tol;
      lg.versus_non_invasive = classical_verdict(lg.violation, lg.K_classical, lg.K, tol);
      lg.versus_kicked = classical_verdict(lg.violation, lg.K_classical_kicked, lg.K, tol);
      const ClassicalVerdict relevant = lg.model_in_use == ClassicalKind::kicked
                                            ? lg.versus_kicked
                                            : lg.versus_non_invasive;
      lg.explained_by_classical_model = relevant == ClassicalVerdict::reproduces;
      lg.verdict = lg_verdict(lg, !lg_classical_reason.empty());
      tp.lg = std::move(lg);
    } else {
      NsitPrediction ns;
      ns.from = spec.from;
      ns.to = spec.to;
      ns.margin = spec.margin;
      ns.p_to_alone = lookup.p({spec.to}, {+1});
      ns.p_to_after = lookup.p({spec.from, spec.to}, {+1, +1}) +
                      lookup.p({spec.from, spec.to}, {-1, +1});
      ns.S = ns.p_to_alone - ns.p_to_after;
      const MeasurementSequence pair = proto.sequence_of({spec.from, spec.to});
      if (non_invasive) {
        try {
          ns.S_classical = nsit_signalling(*non_invasive, pair, 0, 1);
          ns.S_classical_kicked = nsit_signalling(*kicked, pair, 0, 1);
        } catch (const UnsupportedError& e) {
          ns.S_classical = ns.S_classical_kicked = std::nullopt;
          ns.classical_unavailable = e.what();
        }
      } else {
        ns.classical_unavailable = res.classical_unavailable;
      }
      try {
        ns.decomposition = nsit_decomposition(*proto.state, pair, 0, 1);
      } catch (const UnsupportedError& e) {
        ns.decomposition_unavailable = e.what();
      }
      ns.verdict = nsit_verdict(ns);
      tp.nsit = std::move(ns);
    }
    res.tests.push_back(std::move(tp));
  }

  res.engine.name = engine.name();
  res.engine.requested = to_string(options.engine_kind);
  res.engine.choice_reason = engine.choice().reason;
  res.engine.fallbacks = engine.fallbacks();

  // 3. Cautions (DESIGN.md section 7): what the numbers rest on and do not establish.
  auto& cau = res.cautions;
  cau.push_back(
      "Probabilities are those of the ideal +/-1 outcomes; detection errors (dark_read_bright = " +
      fixed(proto.detection.dark_read_bright, 6) + ", bright_read_dark = " +
      fixed(proto.detection.bright_read_dark, 6) + ") are not applied.");
  if (proto.readout == Readout::destructive)
    cau.push_back(
        "Destructive readout: each configuration continues only on the dark outcome, so the "
        "joint statistics of a pair are assembled from several configurations (dark_is "
        "patterns) that must be run under the same conditions (stationarity).");
  for (const auto& t : res.tests) {
    if (!t.lg || !t.lg->violation) continue;
    const auto& lg = *t.lg;
    std::string s = t.spec.label() + ": the violation ";
    if (!lg.K_classical && !res.classical_model_applies) {
      s += "is not reproduced by a classical phase-space model, because none can be built "
           "for this input (Wigner function not non-negative); it is conclusive only as far "
           "as invasiveness is bounded independently, e.g. by NSIT controls.";
    } else if (!lg.K_classical) {
      s += "is not compared with a classical phase-space model, because none gives a value "
           "here (" + lg.classical_unavailable + "); whether back-action on a classical point "
           "explains it is not established by this prediction.";
    } else {
      s += std::string(lg.versus_non_invasive == ClassicalVerdict::beaten ? "beats" : "does not beat") +
           " the non-invasive classical model (K_classical = " + fixed(*lg.K_classical) +
           ") and " +
           (lg.versus_kicked == ClassicalVerdict::beaten ? "beats" : "does not beat") +
           " the kicked classical model (K_classical_kicked = " + fixed(*lg.K_classical_kicked) +
           ").";
    }
    cau.push_back(s);
  }
  if (res.wigner_nonnegative)
    cau.push_back(
        "The input's Wigner function is non-negative: correlators of modular measurements are "
        "then those of a classical phase-space point (with the one-sided split's kick), so no "
        "violation from this input is conclusive; a conclusive test needs a Wigner-negative "
        "input (a Fock state, a cat prepared by a post-selected modular measurement) or a "
        "model-free bound on invasiveness from NSIT controls.");
  else
    cau.push_back(
        "The input's Wigner function is negative or not known to be non-negative: the classical "
        "phase-space models do not apply; a violation still assumes non-invasive "
        "measurability, which NSIT controls can bound but not prove.");
  cau.push_back(
      "A prediction states what the model gives; it does not establish that an experiment "
      "violates the bound (finite shots, drift and detection errors are not included).");
  return res;
}

}  // namespace macroreal
