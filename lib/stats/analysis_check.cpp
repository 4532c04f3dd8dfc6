#include "stats/analysis_check.hpp"

#include <cstdio>

#include "core/error.hpp"

namespace macroreal {

namespace {
std::string p_text(double p) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.3g", p);
  return buf;
}
}  // namespace

AnalysisCheck check_analysis(const AnalysisResult& result, const std::vector<std::string>& selection) {
  struct Test {
    std::string label, kind;
  };
  std::vector<Test> tests;
  for (const auto& a : result.leggett_garg) tests.push_back({a.label, "lg"});
  for (const auto& a : result.nsit) tests.push_back({a.label, "nsit"});
  std::vector<bool> chosen(tests.size(), false);
  for (const auto& s : selection) {
    bool matched = false;
    for (std::size_t i = 0; i < tests.size(); ++i)
      if (s == "all" || s == tests[i].kind || s == tests[i].label) chosen[i] = matched = true;
    if (!matched) {
      std::string known;
      for (const auto& t : tests) known += (known.empty() ? "" : ", ") + t.label;
      throw DomainError("--check " + s + ", but the protocol has no such test (its tests: " +
                        (known.empty() ? "none" : known) + "; or give lg, nsit or all)");
    }
  }

  AnalysisCheck c;
  c.alpha = 1.0 - result.level;
  std::string failed;
  for (std::size_t i = 0; i < tests.size(); ++i) {
    if (!chosen[i]) continue;
    const std::string& label = tests[i].label;
    const MultiplicityEntry* entry = nullptr;
    for (const auto& e : result.multiplicity.entries)
      if (e.label == label) entry = &e;
    if (!entry) {  // no computable p-value: the test cannot have reached the level
      c.items.push_back({label, "", 1.0, false});
      failed += (failed.empty() ? "" : "; ") + label + " (no p-value could be computed)";
      continue;
    }
    AnalysisCheckItem item{label, entry->method, entry->holm, entry->holm < c.alpha};
    if (!item.passed)
      failed += (failed.empty() ? "" : "; ") + label + " (Holm p = " + p_text(entry->holm) + ")";
    c.items.push_back(item);
  }
  c.passed = !c.items.empty() && failed.empty();
  const std::string level = "alpha = " + p_text(c.alpha) + " after Holm's adjustment";
  if (c.items.empty()) {
    c.summary = "check failed: no test selected";
  } else if (c.passed) {
    std::string names;
    for (const auto& it : c.items) names += (names.empty() ? "" : ", ") + it.label;
    c.summary = "check passed: " + names + " reject" + (c.items.size() == 1 ? "s" : "") +
                " the null hypothesis at " + level;
  } else {
    c.summary = "check failed at " + level + ": " + failed;
  }
  return c;
}

}  // namespace macroreal
