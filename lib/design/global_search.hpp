// A generic bounded maximiser for small design problems (a few to a dozen real parameters in a
// box): a deterministic global stage over the whole box, then derivative-free local polishes
// from several starts, the best evaluated point kept throughout. The setting optimiser and the
// feasibility search use it; nothing here knows about physics.
//
// Method (NLopt, Johnson, "The NLopt nonlinear-optimization package"): global stage DIRECT-L
// (Gablonsky & Kelley, J. Global Optim. 21, 27 (2001)) or CRS2 with local mutation (Kaelo &
// Ali, J. Optim. Theory Appl. 130, 253 (2006)); polish with BOBYQA (Powell, Cambridge report
// DAMTP 2009/NA06) or Nelder-Mead, and a last polish from the best point (Subplex, Rowan,
// PhD thesis, U. Texas 1990, when infeasible points were met: it follows the edge of the
// feasible region where BOBYQA's quadratic model is misled by the penalty). Infeasible points
// get a value worse than any feasible one seen, so a feasible region that is not a box is
// handled, but constraints that are bounds belong in lower/upper. The search runs in coordinates scaled to [0, 1] per
// parameter; parameters whose lower and upper bounds are equal are held fixed and removed.
// NLopt's roundoff_limited is caught: the best point found so far is still the answer
// (DESIGN.md section 4).
#pragma once

#include <cstdint>
#include <functional>
#include <string>
#include <vector>

namespace macroreal {

struct SearchProblem {
  std::vector<double> lower, upper;  // bounds, same length; lower[i] <= upper[i]
  std::vector<double> start;         // optional (empty = box centre); clamped into the box
  // Maximised. A NaN or infinite value marks the point infeasible (never chosen).
  std::function<double(const std::vector<double>&)> objective;
};

enum class GlobalStage { direct_l, crs2, none };
enum class LocalPolish { bobyqa, nelder_mead };

struct SearchOptions {
  int starts = 8;                  // local polishes: global best, user start, then the best
                                   // distinct points of the global stage, then seeded random
  long max_evaluations = 20000;    // total objective calls, all stages
  double xtol_rel = 1e-8;          // local stopping tolerance in scaled coordinates
  std::uint64_t seed = 1;          // random starts and CRS2 (nlopt::srand); same seed => same x
  GlobalStage global = GlobalStage::direct_l;
  LocalPolish local = LocalPolish::bobyqa;
  double global_fraction = 0.4;    // share of max_evaluations given to the global stage
};

struct SearchResult {
  std::vector<double> x;   // best feasible point evaluated (unscaled); start if none feasible
  double value = 0.0;      // objective at x (NaN when no evaluated point was feasible)
  long evaluations = 0;    // objective calls made
  std::string method;      // e.g. "DIRECT-L (8000 evaluations) + BOBYQA polish from 8 starts"
  bool converged = false;  // the polish that found x stopped on its tolerance, not the budget
};

// Throws DomainError when the bounds are missing, of unequal length, not finite, reversed,
// when start has the wrong length, when objective is empty, or when starts < 1 or
// max_evaluations < 1.
SearchResult maximise(const SearchProblem& problem, const SearchOptions& options = {});

}  // namespace macroreal
