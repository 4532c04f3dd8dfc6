#include "report/analysis_report_directory.hpp"

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>

#include "core/error.hpp"
#include "core/sha256.hpp"
#include "report/text_layout.hpp"

namespace macroreal {

namespace {

namespace fs = std::filesystem;

std::string sigma_text(const TestResult& t) {
  if (!std::isfinite(t.sigma)) return "n/a";
  return (t.sigma_capped ? ">= " : "") + detail::estimate_text(t.sigma, 2);
}

std::string interval_text(const IntervalEstimate& e) {
  if (!e.valid) return "n/a";
  std::string s(1, '[');
  s += detail::estimate_text(e.lo);
  s += ", ";
  s += detail::estimate_text(e.hi);
  s += ']';
  return s;
}

std::string level_text(double level) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%g", 100.0 * level);
  return std::string(buf) + " %";
}

// Markdown table cell: a '|' would end the cell, a newline the row.
std::string cell(const std::string& s) {
  std::string out;
  for (char c : s) {
    if (c == '|') out += "\\|";
    else if (c == '\n') out += ' ';
    else out += c;
  }
  return out;
}

std::string code(const std::string& s) { return "`" + s + "`"; }

const QuantityEstimate* estimate_of(const AnalysisResult& r, const std::string& name) {
  for (const auto& q : r.estimates)
    if (q.name == name) return &q;
  return nullptr;
}

void tests_table(std::string& md, const std::vector<TestResult>& tests, const std::string& primary) {
  md += "| method | statistic | p-value | sigma | note |\n|---|---|---|---|---|\n";
  for (const auto& t : tests)
    md += "| " + t.method + (t.method == primary ? " (primary)" : "") + " | " + detail::estimate_text(t.statistic) + " | " +
          detail::p_value_text(t.p_value) + " | " + sigma_text(t) + " | " + cell(t.note) + " |\n";
  md += "\n";
}

void all_intervals(std::string& md, const QuantityEstimate& q) {
  md += "Intervals of " + code(q.name) + " (" + level_text(q.level) + "; the first is the default):\n\n";
  md += "| method | interval | note |\n|---|---|---|\n";
  for (const auto& iv : q.intervals) md += "| " + iv.method + " | " + interval_text(iv) + " | " + cell(iv.note) + " |\n";
  md += "\n";
}

std::string corrected_interval_text(const CorrectedInterval& e) {
  if (!e.valid || !std::isfinite(e.lo) || !std::isfinite(e.hi)) return "n/a";
  std::string s(1, '[');
  s += detail::estimate_text(e.lo);
  s += ", ";
  s += detail::estimate_text(e.hi);
  s += ']';
  return s;
}

// The readout-correction section: the raw results above are always the recorded-results
// analysis; with --correct-readout the corrected estimates and tests come next to them.
std::string readout_section(const AnalysisResult& r) {
  std::string md = "## Readout correction\n\n";
  if (!r.readout_corrected) {
    md += "Not applied: every estimate, interval and p-value in this report is computed from the detector "
          "results as recorded (raw). " + r.detection_model + "\n\n";
    return md;
  }
  const ReadoutCorrectedAnalysis& c = *r.readout_corrected;
  md += "The estimates and tests above are raw (detector results as recorded). Misassignment-corrected values "
        "follow, with rates P(read bright | dark) = " + detail::estimate_text(c.dark_read_bright, 6) + " (uncertainty " +
        detail::estimate_text(c.dark_read_bright_se, 6) + ") and P(read dark | bright) = " + detail::estimate_text(c.bright_read_dark, 6) +
        " (uncertainty " + detail::estimate_text(c.bright_read_dark_se, 6) + ") from " + c.rates_source + "; " + c.uncertainty +
        ". Continuation after a misread bright: " + c.continuation + ". Default interval: " + c.default_interval +
        ", B = " + std::to_string(c.replicates) + ", seed " + std::to_string(c.seed) + ".\n\n";
  md += "| quantity | raw | corrected | standard error | interval | interval, rates fixed | status |\n"
        "|---|---|---|---|---|---|---|\n";
  for (const auto& e : c.estimates)
    md += "| " + code(e.name) + " | " + detail::estimate_text(e.raw) + " | " + detail::estimate_text(e.estimate) + " | " + detail::estimate_text(e.std_error) + " | " +
          corrected_interval_text(e.ci) + " (" + e.ci.method + ") | " + corrected_interval_text(e.ci_rates_fixed) + " | " +
          cell(e.status) + " |\n";
  md += "\n";
  for (const auto* group : {&c.leggett_garg, &c.nsit})
    for (const auto& t : *group) {
      md += "Corrected " + t.label + ": " + code(t.quantity) + " raw " + detail::estimate_text(t.raw) + ", corrected " + detail::estimate_text(t.estimate) +
            " (standard error " + detail::estimate_text(t.std_error) + ", bound " + detail::estimate_text(t.bound, 0) + ").\n\n";
      tests_table(md, t.tests, t.tests.empty() ? std::string() : t.tests.front().method);
      if (!t.verdict.empty()) md += t.verdict + "\n\n";
    }
  if (!c.tests_note.empty()) md += c.tests_note + "\n\n";
  if (!c.assumptions.empty()) {
    md += "Assumptions of the correction:\n\n";
    for (const auto& a : c.assumptions) md += "- " + a + "\n";
    md += "\n";
  }
  return md;
}

std::string latex_number(double x, int digits = 4) {
  if (!std::isfinite(x)) return "---";
  return "$" + detail::estimate_text(x, digits) + "$";
}

std::string latex_p(double p) {
  if (!std::isfinite(p)) return "---";
  if (p >= 1e-4) return "$" + detail::p_value_text(p) + "$";
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.2e", p);
  std::string s = buf;
  const auto e = s.find('e');
  const std::string mant = s.substr(0, e);
  const int ex = std::stoi(s.substr(e + 1));
  return "$" + mant + "\\times 10^{" + std::to_string(ex) + "}$";
}

std::string latex_interval(const IntervalEstimate& e) {
  if (!e.valid) return "---";
  return "$[" + detail::estimate_text(e.lo) + ", " + detail::estimate_text(e.hi) + "]$";
}

void write_file(const fs::path& p, const std::string& text) {
  std::ofstream out(p, std::ios::binary);
  if (!(out << text) || !out.flush()) throw InputError(p.string(), "", "cannot write the report file");
}

}  // namespace

std::string latex_escape(std::string_view text) {
  std::string out;
  for (std::size_t i = 0; i < text.size(); ++i) {
    const char c = text[i];
    if (c == '-' && i + 1 < text.size() && text[i + 1] == '>') {
      out += "$\\rightarrow$";
      ++i;
      continue;
    }
    switch (c) {
      case '\\': out += "\\textbackslash{}"; break;
      case '{': out += "\\{"; break;
      case '}': out += "\\}"; break;
      case '$': out += "\\$"; break;
      case '&': out += "\\&"; break;
      case '#': out += "\\#"; break;
      case '%': out += "\\%"; break;
      case '_': out += "\\_"; break;
      case '~': out += "\\textasciitilde{}"; break;
      case '^': out += "\\textasciicircum{}"; break;
      case '<': out += "\\textless{}"; break;
      case '>': out += "\\textgreater{}"; break;
      case '|': out += "\\textbar{}"; break;
      default: out += c;
    }
  }
  return out;
}

std::vector<InputChecksum> checksum_inputs(const std::vector<ReportInput>& inputs) {
  std::vector<InputChecksum> out;
  for (const auto& in : inputs) {
    InputChecksum c;
    c.role = in.role;
    c.path = in.path;
    if (in.path == "-" || in.path == "<stdin>") {
      c.note = "read from standard input: no checksum (save the input to a file to record one)";
    } else {
      c.sha256 = sha256_file_hex(in.path);
      std::error_code ec;
      c.bytes = fs::file_size(in.path, ec);
      if (ec) throw InputError(in.path, "", "cannot read the file size: " + ec.message());
    }
    out.push_back(std::move(c));
  }
  return out;
}

std::string analysis_report_markdown(const AnalysisResult& r, const AnalysisFigures& figures,
                                     const ReportProvenance& prov, const std::vector<InputChecksum>& sums,
                                     const std::string& figure_dir) {
  std::string md = "# Analysis report: " + r.title + "\n\n";
  md += "Written by `macroreal analyse` version " + prov.version +
        ". The report carries no time stamp: the same inputs, options and seed give the same bytes.\n\n";

  md += "## Reproduction\n\nThe command, exactly as run:\n\n```\n" + prov.command_line + "\n```\n\n";
  md += "| setting | value |\n|---|---|\n";
  md += "| seed | " + std::to_string(r.seed) + " |\n";
  md += "| bootstrap replicates B | " + std::to_string(r.replicates) + " |\n";
  md += "| confidence level | " + detail::estimate_text(r.level, 4) + " (two-sided intervals; tests use alpha = " + detail::estimate_text(1.0 - r.level, 4) + ") |\n";
  md += "| default interval | " + cell(r.default_interval) + " |\n";
  md += "| readout | " + to_string(r.readout) + " |\n\n";

  md += "## Input files\n\n| role | path | bytes | SHA-256 |\n|---|---|---|---|\n";
  for (const auto& c : sums)
    md += "| " + c.role + " | " + code(c.path) + " | " + (c.sha256.empty() ? "n/a" : std::to_string(c.bytes)) + " | " +
          (c.sha256.empty() ? cell(c.note) : code(c.sha256)) + " |\n";
  md += "\n";

  md += "## Rows\n\n| rows | count |\n|---|---|\n";
  md += "| read | " + std::to_string(r.rows.read) + " |\n";
  md += "| used | " + std::to_string(r.rows.used) + " |\n";
  md += "| rejected | " + std::to_string(r.rows.rejected) + " |\n\n";
  if (r.rows.reasons.empty()) {
    md += "No row was rejected.\n\n";
  } else {
    md += "| reason for rejection | rows |\n|---|---|\n";
    for (const auto& [reason, n] : r.rows.reasons) md += "| " + cell(reason) + " | " + std::to_string(n) + " |\n";
    md += "\n";
  }
  md += "| sequence | shots | in the protocol file |\n|---|---|---|\n";
  for (const auto& s : r.sequences)
    md += "| " + code(s.name) + " | " + detail::estimate_text(s.shots, 0) + " | " + (s.listed ? "listed" : "generated name") + " |\n";
  md += "\n";
  if (!r.unobserved.empty()) {
    md += "Listed sequences without any shot:";
    for (const auto& s : r.unobserved) md += " " + code(s);
    md += ".\n\n";
  }

  md += "## Estimates\n\nPooled maximum-likelihood estimates with delta-method standard errors; the interval is "
        "the default one (" + cell(r.default_interval) + ") at " + level_text(r.level) + ".\n\n";
  md += "| quantity | estimate | standard error | interval | method | status |\n|---|---|---|---|---|---|\n";
  for (const auto& q : r.estimates)
    md += "| " + code(q.name) + " | " + detail::estimate_text(q.estimate) + " | " + detail::estimate_text(q.std_error) + " | " + interval_text(q.ci) + " | " +
          q.ci.method + " | " + cell(q.status + (q.note.empty() ? "" : ": " + q.note)) + " |\n";
  md += "\n";
  for (const auto& a : r.leggett_garg)
    if (const auto* q = estimate_of(r, a.quantity)) all_intervals(md, *q);
  for (const auto& a : r.nsit)
    if (const auto* q = estimate_of(r, a.quantity)) all_intervals(md, *q);

  md += "## Tests\n\nsigma is the Gaussian significance of each p-value: Phi^-1(1 - p) for a one-sided test (0 when "
        "p >= 0.5), Phi^-1(1 - p/2) for a two-sided one. LG tests are "
        "one-sided (H0: K <= bound), NSIT tests two-sided (H0: S = 0) unless marked otherwise.\n\n";
  for (const auto& a : r.leggett_garg) {
    md += "### " + a.label + "\n\n";
    md += code(a.quantity) + " = " + detail::estimate_text(a.K) + " (standard error " + detail::estimate_text(a.std_error) + "; non-pooled estimate " +
          detail::estimate_text(a.K_linear) + " used by the finite-sample and bootstrap tests), macrorealist bound " + detail::estimate_text(a.bound, 0) + ".\n\n";
    tests_table(md, a.tests, a.primary_method);
    md += a.verdict + "\n\n";
    if (a.invasiveness) {
      const auto& b = *a.invasiveness;
      md += "Invasiveness bound (NSIT controls): K <= " + detail::estimate_text(b.bound) + " from the estimates, K <= " + detail::estimate_text(b.bound_upper) +
            " at the upper confidence limits of |S| (pairs";
      for (std::size_t i = 0; i < b.pairs.size(); ++i)
        md += (i ? ", " : " ") + b.pairs[i] + " |S| <= " + detail::estimate_text(b.s_upper[i]);
      md += "); lower confidence limit of K " + detail::estimate_text(b.k_lower) + (b.exceeds ? " exceeds" : " does not exceed") +
            " it. Assumption: " + b.assumption + "\n\n";
    } else {
      md += "Invasiveness bound: not available (" + a.invasiveness_unavailable + ").\n\n";
    }
    if (a.model) {
      const auto& m = *a.model;
      md += "Model comparison: the protocol's model gives K = " + detail::estimate_text(m.K_model) + "; classical non-invasive K = " +
            (m.K_classical ? detail::estimate_text(*m.K_classical) : std::string("n/a")) + ", kicked classical K = " +
            (m.K_classical_kicked ? detail::estimate_text(*m.K_classical_kicked) : std::string("n/a")) + ".";
      if (m.versus_kicked)
        md += " Test against the kicked classical K (" + m.versus_kicked->method + "): p = " + detail::p_value_text(m.versus_kicked->p_value) +
              ", sigma = " + sigma_text(*m.versus_kicked) + ".";
      md += " " + m.verdict + "\n\n";
    }
  }
  for (const auto& a : r.nsit) {
    md += "### " + a.label + "\n\n";
    md += code(a.quantity) + " = " + detail::estimate_text(a.S) + " (standard error " + detail::estimate_text(a.std_error) + ")";
    if (a.S_model) md += "; the model gives S = " + detail::estimate_text(*a.S_model);
    if (a.margin) md += "; equivalence margin " + detail::estimate_text(*a.margin) + " (from " + a.margin_source + ")";
    md += ".\n\n";
    tests_table(md, a.tests, a.primary_method);
    md += a.verdict + "\n\n";
  }

  md += "## Multiplicity\n\n" + r.multiplicity.which + ".\n\n";
  if (!r.multiplicity.entries.empty()) {
    md += "| test | method | p-value | Holm | Benjamini-Hochberg |\n|---|---|---|---|---|\n";
    for (const auto& e : r.multiplicity.entries)
      md += "| " + e.label + " | " + e.method + " | " + detail::p_value_text(e.p_value) + " | " + detail::p_value_text(e.holm) + " | " +
            detail::p_value_text(e.benjamini_hochberg) + " |\n";
    md += "\n";
  }
  if (r.multiplicity.max_statistic) {
    const auto& m = *r.multiplicity.max_statistic;
    md += "Max-statistic calibration over the LG tests (" + r.multiplicity.max_statistic_note + "; B = " +
          std::to_string(m.replicates) + ", seed " + std::to_string(m.seed) + "):\n\n";
    md += "| test | statistic | adjusted p |\n|---|---|---|\n";
    for (std::size_t i = 0; i < m.statistic.size(); ++i)
      md += "| " + (i < r.multiplicity.max_statistic_labels.size() ? r.multiplicity.max_statistic_labels[i] : std::to_string(i + 1)) +
            " | " + detail::estimate_text(m.statistic[i]) + " | " + detail::p_value_text(m.adjusted_p[i]) + " |\n";
    md += "\n";
  } else {
    md += "Max-statistic calibration: " + r.multiplicity.max_statistic_note + ".\n\n";
  }

  md += readout_section(r);

  md += "## Assumptions and cautions\n\nThe conclusions above rest on these assumptions:\n\n";
  for (const auto& c : r.cautions) md += "- " + c + "\n";
  md += "\n## What these results do not establish\n\n";
  for (const auto& s : r.not_established) md += "- " + s + "\n";
  md += "- The intervals and p-values describe sampling error only: they do not cover a wrong detection model, "
        "drifts the drift check cannot see, or errors in the protocol's settings.\n\n";

  md += "## Figures\n\n";
  if (figures.figures.empty()) md += "No figure was drawn.\n\n";
  for (const auto& f : figures.figures) {
    md += "### " + f.stem + "\n\n";
    md += "![" + f.figure.title + "](" + figure_dir + "/" + f.stem + ".png)\n\n";
    md += f.caption + " Vector version: [" + f.stem + ".svg](" + figure_dir + "/" + f.stem + ".svg).\n\n";
  }
  if (!figures.omitted.empty()) {
    md += "Figures not drawn:\n\n";
    for (const auto& o : figures.omitted) md += "- " + o + "\n";
    md += "\n";
  }
  return md;
}

std::string analysis_results_latex(const AnalysisResult& r) {
  std::string t;
  t += "% Results of macroreal analyse: " + latex_escape(r.title) + "\n";
  t += "% Seed " + std::to_string(r.seed) + ", B = " + std::to_string(r.replicates) + ", level " + detail::estimate_text(r.level, 4) + ".\n";
  t += "% Needs \\usepackage{booktabs}. Generated; the tests check its structure, they do not compile it.\n";
  t += "\\begin{table}\n\\centering\n";
  t += "\\caption{Estimates with " + latex_escape(level_text(r.level)) + " intervals (default: " +
       latex_escape(r.default_interval) + "), p-values and their one-sided Gaussian equivalents $\\sigma$.}\n";
  t += "\\begin{tabular}{llllrrl}\n\\toprule\n";
  t += "Quantity & Estimate & Interval & Interval method & $p$ & $\\sigma$ & Test method \\\\\n\\midrule\n";
  auto rows_of = [&](const std::string& quantity, double value, const std::vector<TestResult>& tests,
                     const std::string& primary) {
    const QuantityEstimate* q = estimate_of(r, quantity);
    bool first = true;
    // The primary test first, then the others, each on its own row.
    std::vector<const TestResult*> order;
    for (const auto& x : tests)
      if (x.method == primary) order.push_back(&x);
    for (const auto& x : tests)
      if (x.method != primary) order.push_back(&x);
    for (const auto* x : order) {
      if (first) {
        t += latex_escape(quantity) + " & " + latex_number(value) + " & " + (q ? latex_interval(q->ci) : "---") + " & " +
             (q ? latex_escape(q->ci.method) : "---");
      } else {
        t += " & & & ";
      }
      first = false;
      t += " & " + latex_p(x->p_value) + " & " + latex_number(x->sigma, 2) + " & " + latex_escape(x->method) +
           (x->method == primary ? " (primary)" : "") + " \\\\\n";
    }
    if (first)
      t += latex_escape(quantity) + " & " + latex_number(value) + " & " + (q ? latex_interval(q->ci) : "---") + " & " +
           (q ? latex_escape(q->ci.method) : "---") + " & --- & --- & --- \\\\\n";
  };
  for (const auto& a : r.leggett_garg) rows_of(a.quantity, a.K, a.tests, a.primary_method);
  if (!r.leggett_garg.empty() && !r.nsit.empty()) t += "\\midrule\n";
  for (const auto& a : r.nsit) rows_of(a.quantity, a.S, a.tests, a.primary_method);
  bool any_correlator = false;
  for (const auto& q : r.estimates) {
    if (q.kind != QuantityKind::correlator && q.kind != QuantityKind::single_average) continue;
    if (!any_correlator && (!r.leggett_garg.empty() || !r.nsit.empty())) t += "\\midrule\n";
    any_correlator = true;
    t += latex_escape(q.name) + " & " + latex_number(q.estimate) + " & " + latex_interval(q.ci) + " & " +
         latex_escape(q.ci.method) + " & --- & --- & --- \\\\\n";
  }
  if (r.readout_corrected) {
    t += "\\midrule\n";
    for (const auto* group : {&r.readout_corrected->leggett_garg, &r.readout_corrected->nsit})
      for (const auto& c : *group) {
        const CorrectedEstimate* e = nullptr;
        for (const auto& x : r.readout_corrected->estimates)
          if (x.name == c.quantity) e = &x;
        const std::string iv = e && e->ci.valid && std::isfinite(e->ci.lo) && std::isfinite(e->ci.hi)
                                   ? "$[" + detail::estimate_text(e->ci.lo) + ", " + detail::estimate_text(e->ci.hi) + "]$"
                                   : std::string("---");
        bool first = true;
        for (const auto& x : c.tests) {
          t += first ? latex_escape(c.quantity) + " (readout-corrected) & " + latex_number(c.estimate) + " & " + iv + " & " +
                           (e ? latex_escape(e->ci.method) : std::string("---"))
                     : std::string(" & & & ");
          first = false;
          t += " & " + latex_p(x.p_value) + " & " + latex_number(x.sigma, 2) + " & " + latex_escape(x.method) + " \\\\\n";
        }
        if (first)
          t += latex_escape(c.quantity) + " (readout-corrected) & " + latex_number(c.estimate) + " & " + iv +
               " & --- & --- & --- & --- \\\\\n";
      }
  }
  t += "\\bottomrule\n\\end{tabular}\n\\end{table}\n";
  return t;
}

ReportFiles write_analysis_report(const AnalysisResult& result, const AnalysisFigures& figures,
                                  const ReportProvenance& provenance, const std::string& dir) {
  const fs::path root(dir), fig = root / "figures";
  std::error_code ec;
  fs::create_directories(fig, ec);
  if (ec) throw InputError(fig.string(), "", "cannot create the report directory: " + ec.message());
  ReportFiles files;
  files.figures = write_analysis_figures(figures, fig.string());
  const auto sums = checksum_inputs(provenance.inputs);
  files.markdown = (root / "report.md").string();
  files.latex = (root / "results.tex").string();
  write_file(files.markdown, analysis_report_markdown(result, figures, provenance, sums, "figures"));
  write_file(files.latex, analysis_results_latex(result));
  return files;
}

}  // namespace macroreal
