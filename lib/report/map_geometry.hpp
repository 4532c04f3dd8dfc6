// Geometry of a colour map (FigureMap, figure.hpp) as render_figure draws it, kept apart from
// PLplot so that it can be tested directly:
//   cells: value z[i][j] fills the cell centred on its grid point (x_min + i dx, y_min + j dy),
//     reaching halfway to the neighbouring points, so the outer cells stand half a step beyond
//     the grid (as matplotlib's pcolormesh(shading="nearest") draws values on grid points);
//   boundary: the contour of the map at one level as line segments, by marching squares over
//     the grid points (linear interpolation along each edge of a square of four neighbouring
//     points; Lorensen & Cline, SIGGRAPH 1987, in two dimensions). A square with a missing
//     (non-finite) corner is left out, so no boundary is drawn around missing points.
#pragma once

#include <vector>

#include "report/figure.hpp"

namespace macroreal {

struct MapRect {
  double x0 = 0, x1 = 0, y0 = 0, y1 = 0;
};

struct MapSegment {
  double x0 = 0, y0 = 0, x1 = 0, y1 = 0;
};

// The cell of value (i, j). DomainError for fewer than 2 x 2 points, a ragged grid or an index
// outside it.
MapRect map_cell(const FigureMap& m, int i, int j);

// The union of all cells: the grid's range widened by half a step on each side.
MapRect map_extent(const FigureMap& m);

// The boundary at `level` in z units. With log_z the contour is of log10 z at log10(level),
// as the colours are (a non-positive z is missing). A saddle square (diagonal corners on the
// same side) is resolved by the mean of its four corners.
std::vector<MapSegment> map_contour(const FigureMap& m, double level);

}  // namespace macroreal
