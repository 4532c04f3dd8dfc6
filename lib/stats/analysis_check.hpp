// The pass/fail check of a finished analysis that `analyse --check` turns into exit code 1:
// each selected Leggett-Garg or NSIT test must reject its null hypothesis (LG: K at or below
// the bound; NSIT: S = 0) at alpha = 1 - level with the p-value of its primary method after
// Holm's adjustment over all the protocol's tests (MultiplicityAnalysis), so the check keeps
// the family-wise error rate (Holm, Scand. J. Stat. 6, 65 (1979)). It judges nothing new: it
// reads the p-values analyse_campaign already computed. An NSIT test used as a control of
// invasiveness is not selected: there a rejection is the bad outcome.
#pragma once

#include <string>
#include <vector>

#include "stats/analysis.hpp"

namespace macroreal {

struct AnalysisCheckItem {
  std::string label;        // "LG ABC", "NSIT A->B"
  std::string method;       // the primary method whose p-value entered ("" when none)
  double p_holm = 1.0;      // Holm-adjusted p-value
  bool passed = false;      // p_holm < alpha
};

struct AnalysisCheck {
  double alpha = 0.05;
  std::vector<AnalysisCheckItem> items;  // the selected tests, LG then NSIT, in the result's order
  bool passed = false;                   // at least one test selected, and every one passed
  std::string summary;                   // one sentence, e.g. "check failed: NSIT A->B ..."
};

// `selection`: each entry "lg" (every LG test), "nsit" (every NSIT test), "all", or a test
// label ("LG ABC", "NSIT A->B"). An entry that matches no test throws DomainError naming it.
AnalysisCheck check_analysis(const AnalysisResult& result, const std::vector<std::string>& selection);

}  // namespace macroreal
