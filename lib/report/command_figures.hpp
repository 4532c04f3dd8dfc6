// The figures of one command run as named data: each `NamedFigure` is a Figure (figure.hpp)
// and the file stem it is written under, so `--figures DIR` on any command is one call to
// write_figures. The stems say what is drawn (e.g. "K_vs_beta_LG_ABC", "wigner_input").
#pragma once

#include <string>
#include <vector>

#include "report/figure.hpp"

namespace macroreal {

struct NamedFigure {
  std::string stem;  // file name without extension: letters, digits, '_' and '-'
  Figure figure;
};

// A file stem from a label: "->" reads " to ", then every character other than a letter,
// digit, '-' or '_' becomes '_' ("LG ABC" -> "LG_ABC", "NSIT A->B" -> "NSIT_A_to_B").
std::string figure_stem(const std::string& label);

// Sets the y range so that the data stay below the legend that figure.cpp draws in the top
// left corner (one row per labelled series, 6 % of the frame height each), with a 5 % margin
// at the bottom. Log axes are handled in log10 units.
void leave_room_for_legend(Figure& figure);

// Writes <dir>/<stem>.svg and .png of every figure (creating dir); returns the paths written,
// in order. Throws UnsupportedError when the cairo driver is missing (nothing is written).
std::vector<std::string> write_figures(const std::vector<NamedFigure>& figures,
                                       const std::string& dir, FigureSize size = {});

// One line for a text report: "Figures written to DIR: a.svg, a.png, ...".
std::string figures_written_line(const std::string& dir, const std::vector<std::string>& paths);

}  // namespace macroreal
