// The figure of a `macroreal reach --map`: the time to a conclusive test over the two mapped
// device parameters as a colour map (hours on a log10 colour scale; cells with no conclusive
// test are left blank), the feasibility boundary as a line along the cell edges between
// feasible and infeasible grid points (hours <= available), and the
// boundary grid points marked with the same rule as the map's CSV (a feasible point with an
// infeasible 4-neighbour, report/reach_report.hpp). A log-spaced scan is drawn against
// log10 of the parameter, a linear one against the parameter itself; the axis labels say
// which and carry the units of the device field.
#pragma once

#include <string>
#include <utility>
#include <vector>

#include "device/reach_map.hpp"
#include "report/figure.hpp"

namespace macroreal {

struct ReachMapFigure {
  Figure figure;
  bool log_x = false, log_y = false;  // axes in log10 of the parameter
  // The boundary points in the parameters' own units, in CSV row order (i fastest); the
  // figure's marker series holds the same points in plotted coordinates.
  std::vector<std::pair<double, double>> boundary;
};

// Throws DomainError when the map is incomplete or smaller than 2 x 2, or when no point has
// a finite time (nothing to colour).
ReachMapFigure reach_map_figure(const ReachMap& map, const ReachOptions& options);

// True when some point has a finite time to a conclusive test (else there is nothing to colour).
bool reach_map_has_conclusive_point(const ReachMap& map);

// Writes <dir>/reach_map.svg and .png; returns the paths written.
std::vector<std::string> write_reach_figures(const ReachMap& map, const ReachOptions& options,
                                             const std::string& dir);

}  // namespace macroreal
