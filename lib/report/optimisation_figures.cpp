#include "report/optimisation_figures.hpp"

#include <cstdio>

namespace macroreal {

std::vector<NamedFigure> optimisation_figures(const OptimisationResult& result,
                                              const OptimiseOptions& options,
                                              const PredictionFigureOptions& figures) {
  const std::size_t index = options.objective.test_index;
  const TestSpec& t = result.protocol.tests.at(index);
  SettingScanOptions scan = figures.scan;
  if (!(scan.beta_max > 0)) scan.beta_max = 1.25 * options.max_beta;
  SettingScan s = scan_test_over_beta(result.protocol, index, scan);
  s.settings.front().label = "optimised setting";
  const std::string q = t.kind == TestSpec::Kind::nsit ? "S" : "K";
  Figure f = setting_scan_figure(s, q + " of " + t.label() + " against |#gb| through the optimised setting");
  FigureSeries limit;
  limit.kind = FigureSeries::Kind::vertical_line;
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.2f", options.max_beta);
  limit.label = std::string("search limit |#gb| <= ") + buf;
  limit.colour = PaletteColour::reddish_purple;
  limit.dashed = true;
  limit.x = {options.max_beta};
  f.series.push_back(limit);
  leave_room_for_legend(f);
  std::vector<NamedFigure> out;
  out.push_back({q + "_vs_beta_optimised_" + figure_stem(t.label()), f});
  for (auto& w : wigner_figures(result.protocol, figures.wigner)) out.push_back(std::move(w));
  return out;
}

}  // namespace macroreal
