#include "report/analysis_report.hpp"
#include "report/text_layout.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>

namespace macroreal {

namespace {

using ojson = nlohmann::ordered_json;

ojson number(double x) { return std::isfinite(x) ? ojson(x) : ojson(nullptr); }

std::string interval(const IntervalEstimate& e) {
  if (!e.valid) return "n/a";
  // Appended piecewise: `"[" + std::string` trips GCC 12's false -Wrestrict (GCC PR 105329).
  std::string s(1, '[');
  s += detail::estimate_text(e.lo);
  s += ", ";
  s += detail::estimate_text(e.hi);
  s += ']';
  return s;
}

std::string corrected_interval_text(const CorrectedInterval& e) {
  IntervalEstimate x;
  x.valid = e.valid;
  x.lo = e.lo;
  x.hi = e.hi;
  return interval(x);
}

std::string join(const std::vector<std::string>& v, const std::string& sep = "") {
  std::string s;
  for (std::size_t i = 0; i < v.size(); ++i) s += (i ? sep : "") + v[i];
  return s;
}

using detail::Table;
using detail::wrap;

ojson interval_json(const IntervalEstimate& e) {
  ojson j;
  j["method"] = e.method;
  j["ci"] = e.valid ? ojson::array({number(e.lo), number(e.hi)}) : ojson(nullptr);
  if (!e.note.empty()) j["note"] = e.note;
  return j;
}

ojson estimate_json(const QuantityEstimate& q) {
  ojson j;
  j["estimate"] = number(q.estimate);
  j["ci"] = q.ci.valid ? ojson::array({number(q.ci.lo), number(q.ci.hi)}) : ojson(nullptr);
  j["level"] = q.level;
  j["method"] = q.ci.method;
  j["std_error"] = number(q.std_error);
  j["status"] = q.status;
  if (!q.note.empty()) j["note"] = q.note;
  ojson all = ojson::array();
  for (const auto& iv : q.intervals) all.push_back(interval_json(iv));
  j["intervals"] = all;
  return j;
}

const QuantityEstimate* find_estimate(const AnalysisResult& r, const std::string& name) {
  for (const auto& q : r.estimates)
    if (q.name == name) return &q;
  return nullptr;
}

ojson test_json(const TestResult& t) {
  ojson j;
  j["method"] = t.method;
  j["statistic"] = number(t.statistic);
  j["p_value"] = number(t.p_value);
  j["sigma"] = number(t.sigma);
  j["sigma_capped"] = t.sigma_capped;
  if (!t.note.empty()) j["note"] = t.note;
  return j;
}

void primary_fields(ojson& j, const std::vector<TestResult>& tests, const std::string& primary) {
  const TestResult* p = nullptr;
  for (const auto& t : tests)
    if (t.method == primary) p = &t;
  j["p_value"] = p ? number(p->p_value) : ojson(nullptr);
  j["sigma"] = p ? number(p->sigma) : ojson(nullptr);
  j["method"] = primary;
  ojson all = ojson::array();
  for (const auto& t : tests) all.push_back(test_json(t));
  j["methods"] = all;
}

ojson opt(const std::optional<double>& x) { return x ? number(*x) : ojson(nullptr); }

ojson names(const std::vector<std::string>& v) {
  ojson a = ojson::array();
  for (const auto& s : v) a.push_back(s);
  return a;
}

ojson corrected_interval_json(const CorrectedInterval& c) {
  return c.valid ? ojson::array({number(c.lo), number(c.hi)}) : ojson(nullptr);
}

// The `--correct-readout` extension of the JSON (DESIGN.md section 8: extended, not renamed).
ojson readout_corrected_json(const ReadoutCorrectedAnalysis& c, double level) {
  ojson j;
  j["rates"] = {{"dark_read_bright", {{"estimate", c.dark_read_bright}, {"se", c.dark_read_bright_se},
                                      {"effective_calibration_shots", c.dark_read_bright_shots}}},
                {"bright_read_dark", {{"estimate", c.bright_read_dark}, {"se", c.bright_read_dark_se},
                                      {"effective_calibration_shots", c.bright_read_dark_shots}}}};
  j["rates_source"] = c.rates_source;
  j["rates_uncertainty"] = c.uncertainty;
  j["misread_continuation"] = c.continuation;
  j["default_interval"] = c.default_interval;
  j["bootstrap_replicates"] = c.replicates;
  j["seed"] = c.seed;
  ojson est = ojson::object();
  for (const auto& e : c.estimates) {
    ojson x;
    x["estimate"] = number(e.estimate);
    x["ci"] = corrected_interval_json(e.ci);
    x["level"] = level;
    x["method"] = e.ci.method;
    x["raw"] = number(e.raw);
    x["std_error"] = number(e.std_error);
    x["std_error_shots_only"] = number(e.std_error_shots);
    x["ci_rates_fixed"] = corrected_interval_json(e.ci_rates_fixed);
    ojson all = ojson::array();
    for (const auto& iv : e.intervals) all.push_back({{"method", iv.method}, {"ci", corrected_interval_json(iv)}});
    x["intervals"] = all;
    x["status"] = e.status;
    est[e.name] = x;
  }
  j["estimates"] = est;
  ojson tests = ojson::array();
  for (const auto* group : {&c.leggett_garg, &c.nsit})
    for (const auto& t : *group) {
      ojson x;
      x["kind"] = group == &c.leggett_garg ? "leggett-garg" : "nsit";
      x["label"] = t.label;
      x["quantity"] = t.quantity;
      x["estimate"] = number(t.estimate);
      x["raw"] = number(t.raw);
      x["std_error"] = number(t.std_error);
      x["bound"] = t.bound;
      primary_fields(x, t.tests, "z-asymptotic");
      x["verdict"] = t.verdict;
      tests.push_back(x);
    }
  j["tests"] = tests;
  j["tests_note"] = c.tests_note;
  j["assumptions"] = names(c.assumptions);
  return j;
}

}  // namespace

nlohmann::ordered_json analysis_json(const AnalysisResult& r) {
  ojson j;
  j["format"] = "macroreal-analysis/1";
  j["protocol"] = r.protocol_file;
  j["title"] = r.title;
  j["runs"] = r.runs_file;
  j["readout"] = to_string(r.readout);
  j["level"] = r.level;
  j["seed"] = r.seed;
  j["bootstrap_replicates"] = r.replicates;
  j["default_interval"] = r.default_interval;
  ojson reasons = ojson::object();
  for (const auto& [k, v] : r.rows.reasons) reasons[k] = v;
  j["rows"] = {{"read", r.rows.read}, {"used", r.rows.used}, {"rejected", r.rows.rejected},
               {"reasons", reasons}};
  ojson seqs = ojson::array();
  for (const auto& s : r.sequences)
    seqs.push_back({{"name", s.name}, {"shots", s.shots}, {"listed", s.listed}});
  j["sequences"] = seqs;
  j["unobserved_sequences"] = names(r.unobserved);
  ojson est = ojson::object();
  for (const auto& q : r.estimates) est[q.name] = estimate_json(q);
  j["estimates"] = est;

  ojson tests = ojson::array();
  for (const auto& a : r.leggett_garg) {
    ojson t;
    t["kind"] = "leggett-garg";
    t["label"] = a.label;
    t["order"] = names(a.order);
    const QuantityEstimate* q = find_estimate(r, a.quantity);
    t["K"] = q ? estimate_json(*q) : ojson(nullptr);
    t["bound"] = a.bound;
    t["K_linear"] = number(a.K_linear);
    primary_fields(t, a.tests, a.primary_method);
    if (a.invasiveness) {
      const auto& b = *a.invasiveness;
      t["invasiveness"] = {{"pairs", names(b.pairs)}, {"bound", b.bound}, {"bound_upper", b.bound_upper},
                           {"k_lower", b.k_lower}, {"level", b.level}, {"exceeds", b.exceeds},
                           {"assumption", b.assumption}};
    } else {
      t["invasiveness"] = nullptr;
      t["invasiveness_unavailable"] = a.invasiveness_unavailable;
      t["invasiveness_assumption"] = kInvasivenessAssumption;  // what a bound would assume
    }
    if (a.model) {
      const auto& m = *a.model;
      ojson mj;
      mj["K_model"] = m.K_model;
      mj["K_classical"] = opt(m.K_classical);
      mj["K_classical_kicked"] = opt(m.K_classical_kicked);
      mj["versus_kicked"] = m.versus_kicked ? test_json(*m.versus_kicked) : ojson(nullptr);
      mj["exceeds_kicked_classical"] =
          m.versus_kicked && std::isfinite(m.versus_kicked->p_value)
              ? ojson(m.versus_kicked->p_value < 1.0 - r.level) : ojson(nullptr);
      if (!m.classical_unavailable.empty()) mj["classical_unavailable"] = m.classical_unavailable;
      mj["verdict"] = m.verdict;
      t["model"] = mj;
    } else {
      t["model"] = nullptr;
    }
    t["verdict"] = a.verdict;
    tests.push_back(t);
  }
  for (const auto& a : r.nsit) {
    ojson t;
    t["kind"] = "nsit";
    t["label"] = a.label;
    t["from"] = a.from;
    t["to"] = a.to;
    const QuantityEstimate* q = find_estimate(r, a.quantity);
    t["S"] = q ? estimate_json(*q) : ojson(nullptr);
    t["margin"] = opt(a.margin);
    if (a.margin) t["margin_source"] = a.margin_source;
    primary_fields(t, a.tests, a.primary_method);
    t["S_model"] = opt(a.S_model);
    t["verdict"] = a.verdict;
    tests.push_back(t);
  }
  j["tests"] = tests;

  ojson mult;
  mult["p_values_entering"] = r.multiplicity.which;
  ojson fam = ojson::array();
  for (const auto& e : r.multiplicity.entries)
    fam.push_back({{"label", e.label}, {"method", e.method}, {"p_value", number(e.p_value)},
                   {"holm", number(e.holm)}, {"benjamini_hochberg", number(e.benjamini_hochberg)}});
  mult["tests"] = fam;
  if (r.multiplicity.max_statistic) {
    const auto& m = *r.multiplicity.max_statistic;
    ojson a = ojson::array();
    for (std::size_t k = 0; k < m.adjusted_p.size(); ++k)
      a.push_back({{"label", k < r.multiplicity.max_statistic_labels.size() ? r.multiplicity.max_statistic_labels[k] : ""},
                   {"statistic", number(m.statistic[k])}, {"adjusted_p", number(m.adjusted_p[k])}});
    mult["max_statistic"] = {{"settings", a}, {"p_largest", number(m.p_largest)},
                             {"sigma_largest", number(m.sigma_largest)}, {"replicates", m.replicates}};
  } else {
    mult["max_statistic"] = nullptr;
  }
  mult["max_statistic_note"] = r.multiplicity.max_statistic_note;
  j["multiplicity"] = mult;

  ojson drift;
  drift["checked"] = r.drift.checked;
  drift["method"] = r.drift.method;
  if (r.drift.checked) {
    drift["chi_square"] = number(r.drift.chi_square);
    drift["df"] = r.drift.df;
    drift["p_value"] = number(r.drift.p_value);
    ojson per = ojson::array();
    for (const auto& s : r.drift.sequences) {
      ojson x = {{"sequence", s.name}, {"split_time_s", s.split_time_s},
                 {"shots", ojson::array({s.first_half, s.second_half})},
                 {"chi_square", number(s.chi_square)}, {"df", s.df}, {"p_value", number(s.p_value)},
                 {"small_expected", s.small_expected}};
      if (!s.note.empty()) x["note"] = s.note;
      per.push_back(x);
    }
    drift["sequences"] = per;
  } else {
    drift["not_checked"] = r.drift.not_checked;
  }
  j["drift"] = drift;
  j["detection_model"] = r.detection_model;
  if (!r.threshold_note.empty()) j["count_threshold"] = r.threshold_note;
  if (r.readout_corrected) j["readout_corrected"] = readout_corrected_json(*r.readout_corrected, r.level);
  j["cautions"] = names(r.cautions);
  j["not_established"] = names(r.not_established);
  return j;
}

std::string analysis_json_text(const AnalysisResult& r) { return analysis_json(r).dump(2) + "\n"; }

std::string analysis_text(const AnalysisResult& r) {
  std::string out;
  const std::string lvl = detail::estimate_text(100.0 * r.level, 1) + " %";
  out += "macroreal analyse\n";
  out += wrap(r.title, "  protocol  " + r.protocol_file + ": ", "            ");
  out += "  runs      " + r.runs_file + "\n";
  out += "  readout   " + to_string(r.readout) + "\n";
  out += "  level     " + lvl + "   seed " + std::to_string(r.seed) + "   bootstrap B = " +
         std::to_string(r.replicates) + "\n";
  out += "  interval  default " + r.default_interval + "\n";
  if (!r.threshold_note.empty()) out += wrap(r.threshold_note, "  counts    ", "            ");
  out += "\n";

  out += "Rows\n";
  out += "  read " + std::to_string(r.rows.read) + ", used " + std::to_string(r.rows.used) +
         ", rejected " + std::to_string(r.rows.rejected) + "\n";
  for (const auto& [k, v] : r.rows.reasons) out += "    " + std::to_string(v) + " rejected: " + k + "\n";
  {
    Table t({false, true, false});
    t.row({"sequence", "shots", ""});
    for (const auto& s : r.sequences) t.row({s.name, detail::estimate_text(s.shots, 0), s.listed ? "" : "(generated name)"});
    out += t.str();
  }
  if (!r.unobserved.empty()) out += "  listed but without shots: " + join(r.unobserved, ", ") + "\n";
  out += "\n";

  out += "Estimates (pooled MLE, delta-method SE, " + lvl + " intervals)\n";
  {
    Table t({false, true, true, false, false, false, false});
    t.row({"quantity", "estimate", "se", r.estimates.empty() ? "" : r.estimates.front().ci.method + " (default)",
           "percentile", "basic", "studentized"});
    for (const auto& q : r.estimates) {
      std::vector<std::string> row = {q.name, detail::estimate_text(q.estimate), detail::estimate_text(q.std_error), interval(q.ci)};
      for (const char* m : {"percentile", "basic", "studentized"})
        for (const auto& iv : q.intervals)
          if (iv.method == m) row.push_back(interval(iv));
      t.row(row);
    }
    out += t.str();
  }
  {
    Table t({false, false, false, false});
    bool any = false;
    for (const auto& q : r.estimates)
      for (const auto& iv : q.intervals)
        if (iv.method == "wilson" || iv.method == "clopper-pearson" || iv.method == "newcombe-hybrid-score") {
          if (!any) t.row({"quantity", "interval", "method", "of"});
          any = true;
          t.row({q.name, interval(iv), iv.method, iv.note});
        }
    if (any) out += "  binomial intervals:\n" + t.str();
  }
  for (const auto& q : r.estimates)
    if (q.status != "ok") out += wrap(q.name + ": " + q.status + (q.note.empty() ? "" : " (" + q.note + ")"), "  note: ", "        ");
  out += "\n";

  out += "Tests (one-sided for LG, H0: K <= bound; two-sided for NSIT, H0: S = 0)\n";
  {
    Table t({false, false, true, true, true, false});
    t.row({"test", "method", "statistic", "p-value", "sigma", "note"});
    for (const auto& a : r.leggett_garg)
      for (const auto& tr : a.tests)
        t.row({a.label, tr.method + (tr.method == a.primary_method ? " *" : ""), detail::estimate_text(tr.statistic),
               detail::p_value_text(tr.p_value), detail::estimate_text(tr.sigma, 2), tr.note});
    for (const auto& a : r.nsit)
      for (const auto& tr : a.tests)
        t.row({a.label, tr.method + (tr.method == a.primary_method ? " *" : ""), detail::estimate_text(tr.statistic),
               detail::p_value_text(tr.p_value), detail::estimate_text(tr.sigma, 2), tr.note});
    out += t.str();
    out += "  * the p-value that enters the multiplicity adjustment; sigma = Phi^-1(1 - p) one-sided (0 for p >= 0.5),\n"
           "    Phi^-1(1 - p/2) two-sided\n";
  }
  out += "\n";

  out += "Multiplicity\n";
  out += wrap(r.multiplicity.which, "  entering: ", "            ");
  {
    Table t({false, false, true, true, true});
    t.row({"test", "method", "p-value", "Holm", "BH"});
    for (const auto& e : r.multiplicity.entries)
      t.row({e.label, e.method, detail::p_value_text(e.p_value), detail::p_value_text(e.holm), detail::p_value_text(e.benjamini_hochberg)});
    out += t.str();
  }
  if (r.multiplicity.max_statistic) {
    const auto& m = *r.multiplicity.max_statistic;
    for (std::size_t k = 0; k < m.adjusted_p.size(); ++k)
      out += "  max-statistic " +
             (k < r.multiplicity.max_statistic_labels.size() ? r.multiplicity.max_statistic_labels[k] : "") +
             ": T = " + detail::estimate_text(m.statistic[k]) + ", adjusted p = " + detail::p_value_text(m.adjusted_p[k]) + "\n";
  }
  out += wrap(r.multiplicity.max_statistic_note, "  max-statistic: ", "    ");
  out += "\n";

  bool any_extra = false;
  for (const auto& a : r.leggett_garg) {
    if (!any_extra) out += "Invasiveness and model\n";
    any_extra = true;
    if (a.invasiveness) {
      const auto& b = *a.invasiveness;
      out += "  " + a.label + ": NSIT bound on K " + detail::estimate_text(b.bound) + " (upper limit " + detail::estimate_text(b.bound_upper) +
             ", pairs " + join(b.pairs, ", ") + "); K lower limit " + detail::estimate_text(b.k_lower) + " -> " +
             (b.exceeds ? "exceeds" : "does not exceed") + "\n";
      out += wrap("assumes " + b.assumption, "    ", "    ");
    } else {
      out += wrap(a.label + ": no invasiveness bound: " + a.invasiveness_unavailable, "  ", "    ");
    }
    if (a.model) {
      const auto& m = *a.model;
      out += "  " + a.label + ": model K = " + detail::estimate_text(m.K_model) + ", classical K = " +
             (m.K_classical ? detail::estimate_text(*m.K_classical) : "n/a") + ", kicked classical K = " +
             (m.K_classical_kicked ? detail::estimate_text(*m.K_classical_kicked) : "n/a") + "\n";
    }
  }
  if (any_extra) out += "\n";

  out += "Verdicts\n";
  for (const auto& a : r.leggett_garg) {
    out += wrap(a.verdict, "  " + a.label + ": ", "    ");
    if (a.model) out += wrap(a.model->verdict, "    ", "    ");
  }
  for (const auto& a : r.nsit) out += wrap(a.verdict, "  " + a.label + ": ", "    ");
  out += "\n";

  out += "Drift\n";
  if (r.drift.checked) {
    Table t({false, true, true, true, true, true, false});
    t.row({"sequence", "split time_s", "shots 1st", "shots 2nd", "chi-square", "p-value", "note"});
    for (const auto& s : r.drift.sequences)
      t.row({s.name, detail::estimate_text(s.split_time_s, 3), detail::estimate_text(s.first_half, 0), detail::estimate_text(s.second_half, 0),
             s.df > 0 ? detail::estimate_text(s.chi_square, 2) + " (" + std::to_string(s.df) + " df)" : "n/a",
             s.df > 0 ? detail::p_value_text(s.p_value) : "n/a",
             s.note.empty() ? (s.small_expected ? "expected count < 5" : "") : s.note});
    out += t.str();
    out += "  all: chi-square " + detail::estimate_text(r.drift.chi_square, 2) + " on " + std::to_string(r.drift.df) +
           " df, p = " + detail::p_value_text(r.drift.p_value) + "\n";
  } else {
    out += "  not checked: " + r.drift.not_checked + "\n";
  }
  out += "\n";

  if (r.readout_corrected) {
    const auto& c = *r.readout_corrected;
    out += "Readout-corrected estimates (misassignment inverted; " + lvl + " intervals)\n";
    out += wrap("P(read bright | dark) = " + detail::estimate_text(c.dark_read_bright, 6) + " (se " + detail::estimate_text(c.dark_read_bright_se, 6) +
                    "), P(read dark | bright) = " + detail::estimate_text(c.bright_read_dark, 6) + " (se " +
                    detail::estimate_text(c.bright_read_dark_se, 6) + ") from " + c.rates_source,
                "  rates     ", "            ");
    out += wrap(c.uncertainty, "  spread    ", "            ");
    if (r.readout == Readout::destructive)
      out += "  misread   continuation " + c.continuation + " (a bright read as dark: later results " +
             (c.continuation == "fair" ? std::string("fair coin flips") : "true dark with probability " + c.continuation.substr(5)) +
             ")\n";
    out += wrap(c.default_interval + ", B = " + std::to_string(c.replicates), "  interval  ", "            ");
    Table t({false, true, true, true, false, false});
    t.row({"quantity", "raw", "corrected", "se", c.estimates.empty() ? "" : c.estimates.front().ci.method + " (rates redrawn)",
           "rates fixed"});
    for (const auto& e : c.estimates)
      t.row({e.name, detail::estimate_text(e.raw), detail::estimate_text(e.estimate), detail::estimate_text(e.std_error), corrected_interval_text(e.ci),
             corrected_interval_text(e.ci_rates_fixed)});
    out += t.str();
    Table tt({false, false, true, true, true});
    tt.row({"test", "method", "statistic", "p-value", "sigma"});
    for (const auto* group : {&c.leggett_garg, &c.nsit})
      for (const auto& g : *group)
        for (const auto& tr : g.tests) tt.row({g.label, tr.method, detail::estimate_text(tr.statistic), detail::p_value_text(tr.p_value), detail::estimate_text(tr.sigma, 2)});
    out += tt.str();
    for (const auto* group : {&c.leggett_garg, &c.nsit})
      for (const auto& g : *group) out += wrap(g.verdict, "  " + g.label + ": ", "    ");
    out += wrap(c.tests_note, "  tests: ", "    ");
    out += "  assumptions:\n";
    for (const auto& a : c.assumptions) out += wrap(a, "  - ", "    ");
    out += "\n";
  }

  out += "Cautions\n";
  for (const auto& c : r.cautions) out += wrap(c, "  - ", "    ");
  out += "\nWhat this analysis does not establish\n";
  for (const auto& c : r.not_established) out += wrap(c, "  - ", "    ");
  return out;
}

}  // namespace macroreal
