#include "report/prediction_report.hpp"
#include "report/text_layout.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include "core/types.hpp"
#include <sstream>

namespace macroreal {

namespace {

using ojson = nlohmann::ordered_json;

ojson opt(const std::optional<double>& x) { return x ? ojson(*x) : ojson(nullptr); }

ojson names(const std::vector<std::string>& v) {
  ojson a = ojson::array();
  for (const auto& s : v) a.push_back(s);
  return a;
}

std::string signs(const std::vector<int>& v) {
  std::string s;
  for (int x : v) s += x > 0 ? '+' : '-';
  return s;
}

std::string num(double x, int digits = 6) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", digits, x);
  std::string s = buf;
  if (s.find_first_not_of("-0.") == std::string::npos && s[0] == '-') s.erase(0, 1);
  return s;
}

std::string sci(double x) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.1e", x);
  return buf;
}

std::string opt_num(const std::optional<double>& x) { return x ? num(*x) : "n/a"; }

using detail::Table;
using detail::wrap;

ojson lg_json(const TestPrediction& t) {
  const auto& lg = *t.lg;
  ojson j;
  j["kind"] = "leggett-garg";
  j["label"] = t.spec.label();
  j["order"] = names(lg.order);
  j["K"] = lg.K;
  j["bound"] = lg.bound;
  ojson c = ojson::object();
  for (const auto& p : lg.correlators) c[p.pair] = p.quantum;
  j["correlators"] = c;
  j["K_classical"] = opt(lg.K_classical);
  j["K_classical_kicked"] = opt(lg.K_classical_kicked);
  j["explained_by_classical_model"] = lg.explained_by_classical_model;
  j["violation"] = lg.violation;
  j["split_in_use"] = lg.split_in_use;
  j["classical_model_in_use"] = to_string(lg.model_in_use);
  j["versus_classical"] = {{"non-invasive", to_string(lg.versus_non_invasive)},
                           {"kicked", to_string(lg.versus_kicked)}};
  ojson cc = ojson::object(), ck = ojson::object();
  for (const auto& p : lg.correlators) {
    cc[p.pair] = opt(p.classical);
    ck[p.pair] = opt(p.classical_kicked);
  }
  j["correlators_classical"] = lg.K_classical ? cc : ojson(nullptr);
  j["correlators_classical_kicked"] = lg.K_classical_kicked ? ck : ojson(nullptr);
  if (!lg.family.empty()) {
    ojson f = ojson::array();
    const char* s[4] = {"++", "+-", "-+", "--"};
    for (std::size_t k = 0; k < lg.family.size(); ++k)
      f.push_back({{"signs", s[k]}, {"value", lg.family[k]}, {"violated", lg.family[k] < 0.0}});
    j["family"] = f;
  }
  j["classical_unavailable"] =
      lg.classical_unavailable.empty() ? ojson(nullptr) : ojson(lg.classical_unavailable);
  j["engine_correlator_deviation"] = lg.engine_correlator_deviation;
  j["verdict"] = lg.verdict;
  return j;
}

ojson nsit_json(const TestPrediction& t) {
  const auto& n = *t.nsit;
  ojson j;
  j["kind"] = "nsit";
  j["label"] = t.spec.label();
  j["from"] = n.from;
  j["to"] = n.to;
  j["S"] = n.S;
  j["P_to_alone"] = n.p_to_alone;
  j["P_to_after_from"] = n.p_to_after;
  j["margin"] = opt(n.margin);
  j["S_classical"] = opt(n.S_classical);
  j["S_classical_kicked"] = opt(n.S_classical_kicked);
  j["classical_unavailable"] =
      n.classical_unavailable.empty() ? ojson(nullptr) : ojson(n.classical_unavailable);
  if (n.decomposition) {
    const auto& d = *n.decomposition;
    j["decomposition"] = {{"S", d.S},
                          {"overlap", {d.overlap.real(), d.overlap.imag()}},
                          {"geometric_phase_deg", d.geometric_phase_rad / kDegree},
                          {"kick_phase_deg", d.kick_phase_rad / kDegree},
                          {"f", {d.f.real(), d.f.imag()}}};
  } else {
    j["decomposition"] = nullptr;
  }
  j["decomposition_unavailable"] =
      n.decomposition_unavailable.empty() ? ojson(nullptr) : ojson(n.decomposition_unavailable);
  j["verdict"] = n.verdict;
  return j;
}

}  // namespace

nlohmann::ordered_json prediction_json(const PredictionResult& r) {
  ojson j;
  j["command"] = "predict";
  j["protocol"] = r.file;
  j["title"] = r.title;
  j["state"] = {{"description", r.state_description},
                {"wigner_nonnegative", r.wigner_nonnegative},
                {"classical_model_applies", r.classical_model_applies}};
  j["readout"] = to_string(r.readout);
  j["engine"] = {{"name", r.engine.name},
                 {"requested", r.engine.requested},
                 {"hermite_nodes", r.engine.max_hermite_nodes},
                 {"rotation_dimensions", r.engine.max_rotation_dimensions},
                 {"error_estimate", r.engine.max_error_estimate},
                 {"evaluations", r.engine.evaluations},
                 {"calls", r.engine.engine_calls},
                 {"choice_reason", r.engine.choice_reason.empty() ? ojson(nullptr)
                                                                  : ojson(r.engine.choice_reason)},
                 {"fallbacks", names(r.engine.fallbacks)}};
  ojson probs = ojson::array();
  for (const auto& s : r.sequences)
    for (const auto& o : s.outcomes)
      probs.push_back({{"sequence", s.name},
                       {"steps", names(s.steps)},
                       {"dark_is", signs(s.dark_is)},
                       {"generated", s.generated},
                       {"outcomes", to_string(o.outcomes)},
                       {"p", o.p},
                       {"error_estimate", o.error_estimate}});
  j["probabilities"] = probs;
  ojson tests = ojson::array();
  for (const auto& t : r.tests) tests.push_back(t.lg ? lg_json(t) : nsit_json(t));
  j["tests"] = tests;
  j["checks"] = {{"status", r.status}, {"max_sum_deviation", r.max_sum_deviation}};
  j["cautions"] = names(r.cautions);
  return j;
}

std::string prediction_json_text(const PredictionResult& r) {
  return prediction_json(r).dump(2) + "\n";
}

std::string prediction_text(const PredictionResult& r) {
  std::string out = wrap(r.title.empty() ? r.file : r.title, "macroreal predict: ", "  ");
  std::vector<std::pair<std::string, std::string>> head;
  head.push_back({"protocol", r.file});
  head.push_back({"state", r.state_description + (r.wigner_nonnegative
                                                ? "; Wigner function non-negative"
                                                : "; Wigner function not known to be non-negative")});
  head.push_back({"readout", to_string(r.readout)});
  std::string eng = r.engine.name + (r.engine.name == "weyl" ? " (exact displacement sums), "
                                                               : " (truncated Fock basis), ");
  eng += r.engine.max_hermite_nodes == 0
             ? std::string("no rotation quadrature")
             : std::string(r.engine.name == "weyl" ? "Gauss-Hermite" : "trapezoidal") +
                   " rotation quadrature, " + std::to_string(r.engine.max_hermite_nodes) +
                   " nodes x " + std::to_string(r.engine.max_rotation_dimensions) +
                   " dimensions, error estimate <= " + sci(r.engine.max_error_estimate);
  eng += ", " + std::to_string(r.engine.engine_calls) + " engine calls";
  head.push_back({"engine", eng});
  if (!r.engine.choice_reason.empty())
    head.push_back({"", (r.engine.requested == "auto" ? "chosen automatically: "
                                                      : std::string("not automatic: ")) +
                            r.engine.choice_reason});
  for (const auto& f : r.engine.fallbacks) head.push_back({"", "fallback: " + f});
  head.push_back({"checks", r.status == "ok" ? "outcome probabilities of every sequence sum to 1 "
                                         "(max deviation " + sci(r.max_sum_deviation) + ")"
                                       : r.status});
  for (const auto& [label, value] : head) {
    const std::string pad(std::max<std::size_t>(10, label.size() + 2) - label.size(), ' ');
    out += wrap(value, "  " + label + pad, "  " + std::string(label.size() + pad.size(), ' '));
  }

  out += "\nOutcome probabilities (ideal +/-1 outcomes, before detection errors)\n";
  Table probs({false, false, false, false, false, true});
  probs.row({"sequence", "origin", "steps", "dark_is", "outcomes", "p"});
  for (const auto& s : r.sequences) {
    std::string steps;
    for (const auto& n : s.steps) steps += (steps.empty() ? "" : " ") + n;
    bool first = true;
    for (const auto& o : s.outcomes) {
      probs.row({first ? s.name : "", first ? (s.generated ? "generated" : "file") : "",
                 first ? steps : "", first ? signs(s.dark_is) : "", to_string(o.outcomes),
                 num(o.p)});
      first = false;
    }
    probs.row({"", "", "", "", "sum", num(s.total)});
  }
  out += probs.str();

  for (const auto& t : r.tests) {
    out += "\n";
    if (t.lg) {
      const auto& lg = *t.lg;
      std::string order;
      for (const auto& n : lg.order) order += (order.empty() ? "" : " ") + n;
      out += "Leggett-Garg " + order + " (macrorealist bound K <= " + num(lg.bound, 0) +
             "; split in use: " + lg.split_in_use + ")\n";
      Table tab({false, true, true, true});
      tab.row({"", "quantum", "classical", "classical kicked"});
      for (const auto& p : lg.correlators)
        tab.row({"C_" + p.pair, num(p.quantum), opt_num(p.classical), opt_num(p.classical_kicked)});
      tab.row({"K", num(lg.K), opt_num(lg.K_classical), opt_num(lg.K_classical_kicked)});
      out += tab.str();
      if (!lg.family.empty()) {
        const char* s[4] = {"++", "+-", "-+", "--"};
        std::string fam = "1 + s1 C12 + s2 C23 + s1 s2 C13 (each >= 0 under macrorealism):";
        for (std::size_t k = 0; k < lg.family.size(); ++k)
          fam += std::string(k ? "," : "") + " " + s[k] + " " + num(lg.family[k]);
        out += wrap(fam, "  family: ", "          ");
      }
      if (!lg.K_classical) out += wrap(lg.classical_unavailable, "  classical: ", "             ");
      out += wrap(lg.verdict, "  verdict: ", "           ");
    } else if (t.nsit) {
      const auto& n = *t.nsit;
      out += "NSIT " + n.from + " -> " + n.to + " (no signalling in time: S = 0)\n";
      Table tab({false, true});
      tab.row({"P_" + n.to + "(+), " + n.to + " alone", num(n.p_to_alone)});
      tab.row({"sum_a P_" + n.from + n.to + "(a, +)", num(n.p_to_after)});
      tab.row({"S", num(n.S)});
      tab.row({"S classical", opt_num(n.S_classical)});
      tab.row({"S classical kicked", opt_num(n.S_classical_kicked)});
      if (n.margin) tab.row({"margin", num(*n.margin)});
      out += tab.str();
      if (n.decomposition) {
        const auto& d = *n.decomposition;
        out += wrap("S = 1/2 c Re(e^{i phi} overlap (1 - f)) with overlap = " +
                        num(d.overlap.real()) + (d.overlap.imag() < 0 ? " - " : " + ") +
                        num(std::abs(d.overlap.imag())) + "i, geometric phase " +
                        num(d.geometric_phase_rad / kDegree, 3) + " deg, kick phase " +
                        num(d.kick_phase_rad / kDegree, 3) + " deg, f = " +
                        num(d.f.real()) + (d.f.imag() < 0 ? " - " : " + ") +
                        num(std::abs(d.f.imag())) + "i",
                    "  decomposition: ", "                 ");
      } else if (!n.decomposition_unavailable.empty()) {
        out += wrap(n.decomposition_unavailable, "  decomposition: ", "                 ");
      }
      out += wrap(n.verdict, "  verdict: ", "           ");
    }
  }

  out += "\nCautions\n";
  for (const auto& c : r.cautions) out += wrap(c, "  - ", "    ");
  return out;
}

}  // namespace macroreal
