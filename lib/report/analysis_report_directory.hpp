// The report directory of `macroreal analyse --report DIR`, for a paper's supplement:
//   DIR/report.md     Markdown: the command line exactly as run, version, seed, B, level, the
//                     SHA-256 (core/sha256.hpp) and size of every input file, rows read / used /
//                     rejected by reason, every estimate with its interval and method, every
//                     test's p-value and equivalent sigma with its method, the multiplicity
//                     adjustments, the NSIT bound on invasiveness, the model comparison, the
//                     cautions of DESIGN.md section 7, what the results do not establish, and
//                     the figures embedded by relative path;
//   DIR/results.tex   a LaTeX table (tabular with booktabs rules: \toprule, \midrule,
//                     \bottomrule; needs \usepackage{booktabs}) of the test quantities with
//                     interval, p, sigma and method, text escaped for LaTeX;
//   DIR/figures/      the figures of analysis_figures.hpp as SVG and PNG.
// Deterministic: no time stamps, fixed number formats, so the same inputs and seed give the
// same bytes of report.md and results.tex.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "report/analysis_figures.hpp"
#include "stats/analysis.hpp"

namespace macroreal {

struct ReportInput {
  std::string role;   // "runs table", "protocol", "calibration", ...
  std::string path;   // as given on the command line; "-" or "<stdin>": standard input
};

struct ReportProvenance {
  std::string command_line;   // the program's arguments joined by spaces, exactly as run
  std::string version;        // the program's version
  std::vector<ReportInput> inputs;
};

struct InputChecksum {
  std::string role, path;
  std::string sha256;         // empty when not computable (see note)
  std::uintmax_t bytes = 0;
  std::string note;
};

// SHA-256 and size of every input file; standard input gets a note instead (its bytes are
// gone once read). Throws InputError naming a file that cannot be read.
std::vector<InputChecksum> checksum_inputs(const std::vector<ReportInput>& inputs);

// `figure_dir` is the figures' directory relative to the report (embedded as
// <figure_dir>/<stem>.png, with a link to the .svg).
std::string analysis_report_markdown(const AnalysisResult& result, const AnalysisFigures& figures,
                                     const ReportProvenance& provenance,
                                     const std::vector<InputChecksum>& checksums,
                                     const std::string& figure_dir = "figures");
std::string analysis_results_latex(const AnalysisResult& result);

// LaTeX text mode: \ { } $ & # % _ ~ ^ < > | escaped, "->" written as an arrow.
std::string latex_escape(std::string_view text);

struct ReportFiles {
  std::string markdown, latex;
  std::vector<std::string> figures;  // every file written under DIR/figures
};

// Creates DIR and DIR/figures and writes everything; throws InputError naming a file that
// cannot be written.
ReportFiles write_analysis_report(const AnalysisResult& result, const AnalysisFigures& figures,
                                  const ReportProvenance& provenance, const std::string& dir);

}  // namespace macroreal
