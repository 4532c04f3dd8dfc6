#include "design/global_search.hpp"

#include <algorithm>
#include <cmath>
#include <exception>
#include <limits>
#include <random>
#include <sstream>

#include <nlopt.hpp>

#include "core/error.hpp"

namespace macroreal {
namespace {

// Why a stage stopped, for the converged flag.
bool stopped_on_tolerance(nlopt::result r) {
  return r == nlopt::SUCCESS || r == nlopt::FTOL_REACHED || r == nlopt::XTOL_REACHED ||
         r == nlopt::STOPVAL_REACHED;
}

// The objective in scaled coordinates u in [0, 1]^d over the free parameters, with the
// bookkeeping shared by all stages: evaluation count, best feasible point, a penalty for
// infeasible points, and the first exception thrown by the user's objective.
class ScaledObjective {
 public:
  ScaledObjective(const SearchProblem& p, std::vector<std::size_t> free)
      : problem_(p), free_(std::move(free)), x_(p.lower) {
    for (std::size_t i = 0; i < x_.size(); ++i)
      if (p.lower[i] == p.upper[i]) x_[i] = p.lower[i];
  }

  std::vector<double> unscale(const std::vector<double>& u) const {
    std::vector<double> x = x_;
    for (std::size_t k = 0; k < free_.size(); ++k) {
      const std::size_t i = free_[k];
      const double v = problem_.lower[i] + std::clamp(u[k], 0.0, 1.0) *
                                               (problem_.upper[i] - problem_.lower[i]);
      x[i] = std::clamp(v, problem_.lower[i], problem_.upper[i]);
    }
    return x;
  }

  // Value for NLopt, which minimises: -f, or a penalty worse than any feasible value seen.
  double operator()(const std::vector<double>& u) {
    const std::vector<double> x = unscale(u);
    ++evaluations_;
    double f = std::numeric_limits<double>::quiet_NaN();
    try {
      f = problem_.objective(x);
    } catch (...) {
      if (!error_) error_ = std::current_exception();
      throw nlopt::forced_stop();
    }
    if (recording_) trace_.push_back({u, f});
    if (!std::isfinite(f)) {
      ++infeasible_;
      // Worse than every feasible value so far; comparison-based stages (DIRECT, CRS2,
      // Nelder-Mead) only need the order, and the best point is tracked here anyway.
      const double worst = have_feasible_ ? worst_ : 0.0;
      return -(worst - 1.0 - std::abs(worst));
    }
    if (!have_feasible_ || f > best_value_) {
      best_value_ = f;
      best_u_ = u;
      best_stage_ = stage_;
    }
    worst_ = have_feasible_ ? std::min(worst_, f) : f;
    have_feasible_ = true;
    return -f;
  }

  struct Sample {
    std::vector<double> u;
    double value;
  };

  long evaluations_ = 0;
  long infeasible_ = 0;
  bool have_feasible_ = false;
  double best_value_ = std::numeric_limits<double>::quiet_NaN();
  std::vector<double> best_u_;
  int best_stage_ = -1;
  int stage_ = 0;
  double worst_ = 0.0;
  bool recording_ = false;
  std::vector<Sample> trace_;
  std::exception_ptr error_;

 private:
  const SearchProblem& problem_;
  std::vector<std::size_t> free_;
  std::vector<double> x_;
};

double nlopt_callback(const std::vector<double>& u, std::vector<double>&, void* data) {
  return (*static_cast<ScaledObjective*>(data))(u);
}

// Runs one NLopt stage; returns the result code (roundoff_limited and forced stops caught).
nlopt::result run_stage(nlopt::algorithm algorithm, ScaledObjective& f, std::vector<double> u,
                        long max_evaluations, double xtol_rel, bool local,
                        double first_step = 0.1) {
  const unsigned d = static_cast<unsigned>(u.size());
  nlopt::opt opt(algorithm, d);
  opt.set_lower_bounds(std::vector<double>(d, 0.0));
  opt.set_upper_bounds(std::vector<double>(d, 1.0));
  opt.set_min_objective(nlopt_callback, &f);
  opt.set_maxeval(static_cast<int>(std::min<long>(max_evaluations, 2000000000L)));
  if (local) {
    opt.set_xtol_rel(xtol_rel);
    opt.set_xtol_abs(std::vector<double>(d, xtol_rel));  // u near 0 needs an absolute floor
    std::vector<double> step(d);
    for (unsigned k = 0; k < d; ++k)  // BOBYQA wants the first trust region inside the box
      step[k] = std::max(1e-6, std::min(first_step, 0.5 * std::max(u[k], 1.0 - u[k])));
    opt.set_initial_step(step);
  } else {
    opt.set_xtol_rel(0.0);
    opt.set_ftol_abs(0.0);
  }
  double value = 0.0;
  try {
    return opt.optimize(u, value);
  } catch (const nlopt::roundoff_limited&) {
    return nlopt::ROUNDOFF_LIMITED;  // the best point so far stands (NLopt documentation)
  } catch (const nlopt::forced_stop&) {
    if (f.error_) std::rethrow_exception(f.error_);
    return nlopt::FORCED_STOP;
  }
}

double uniform01(std::mt19937_64& rng) {
  return static_cast<double>(rng() >> 11) * 0x1.0p-53;  // 53 random bits, portable
}

void validate(const SearchProblem& p, const SearchOptions& o) {
  if (p.lower.empty() || p.lower.size() != p.upper.size())
    throw DomainError("search bounds: lower and upper must be non-empty and of equal length (" +
                      std::to_string(p.lower.size()) + " vs " + std::to_string(p.upper.size()) +
                      ")");
  for (std::size_t i = 0; i < p.lower.size(); ++i) {
    if (!std::isfinite(p.lower[i]) || !std::isfinite(p.upper[i]) || p.lower[i] > p.upper[i]) {
      std::ostringstream os;
      os << "search bounds of parameter " << i << ": [" << p.lower[i] << ", " << p.upper[i]
         << "], but must be finite with lower <= upper";
      throw DomainError(os.str());
    }
  }
  if (!p.start.empty() && p.start.size() != p.lower.size())
    throw DomainError("search start has " + std::to_string(p.start.size()) +
                      " parameters, but the bounds have " + std::to_string(p.lower.size()));
  if (!p.objective) throw DomainError("search objective is empty");
  if (o.starts < 1) throw DomainError("search starts = " + std::to_string(o.starts) +
                                      ", but must be >= 1");
  if (o.max_evaluations < 1)
    throw DomainError("search max_evaluations = " + std::to_string(o.max_evaluations) +
                      ", but must be >= 1");
  if (!(o.xtol_rel > 0.0)) throw DomainError("search xtol_rel must be > 0");
  if (!(o.global_fraction >= 0.0 && o.global_fraction < 1.0))
    throw DomainError("search global_fraction must be in [0, 1)");
}

}  // namespace

SearchResult maximise(const SearchProblem& problem, const SearchOptions& options) {
  validate(problem, options);
  const std::size_t n = problem.lower.size();
  std::vector<std::size_t> free;
  for (std::size_t i = 0; i < n; ++i)
    if (problem.lower[i] < problem.upper[i]) free.push_back(i);
  const std::size_t d = free.size();

  ScaledObjective f(problem, free);
  SearchResult result;

  // Start in scaled coordinates (box centre by default).
  std::vector<double> u_start(d, 0.5);
  if (!problem.start.empty())
    for (std::size_t k = 0; k < d; ++k) {
      const std::size_t i = free[k];
      u_start[k] = std::clamp((problem.start[i] - problem.lower[i]) /
                                  (problem.upper[i] - problem.lower[i]), 0.0, 1.0);
    }

  if (d == 0) {  // everything fixed: one evaluation
    f(u_start);
    result.x = f.unscale(u_start);
    result.value = f.have_feasible_ ? f.best_value_ : std::numeric_limits<double>::quiet_NaN();
    result.evaluations = f.evaluations_;
    result.method = "all parameters fixed (one evaluation)";
    result.converged = true;
    return result;
  }

  nlopt::srand(static_cast<unsigned long>(options.seed));
  std::ostringstream method;

  // Global stage. Its evaluations are recorded so the polishes can start from its best
  // distinct points rather than from blind random ones.
  long global_budget = static_cast<long>(options.global_fraction *
                                         static_cast<double>(options.max_evaluations));
  if (options.global == GlobalStage::none) global_budget = 0;
  if (global_budget >= 2) {
    const nlopt::algorithm a = options.global == GlobalStage::crs2 ? nlopt::GN_CRS2_LM
                                                                   : nlopt::GN_DIRECT_L;
    f.stage_ = 0;
    f.recording_ = true;
    run_stage(a, f, u_start, global_budget, options.xtol_rel, false);
    f.recording_ = false;
    method << (options.global == GlobalStage::crs2 ? "CRS2-LM" : "DIRECT-L") << " ("
           << f.evaluations_ << " evaluations) + ";
  }

  // Starting points: global best, the user's start, distinct good global points, random.
  std::vector<std::vector<double>> starts;
  auto distinct = [&](const std::vector<double>& u) {
    for (const auto& s : starts) {
      double dist = 0.0;
      for (std::size_t k = 0; k < d; ++k) dist = std::max(dist, std::abs(s[k] - u[k]));
      if (dist < 0.05) return false;
    }
    return true;
  };
  if (f.have_feasible_) starts.push_back(f.best_u_);
  if (distinct(u_start)) starts.push_back(u_start);
  std::vector<ScaledObjective::Sample> trace = std::move(f.trace_);
  std::stable_sort(trace.begin(), trace.end(), [](const auto& a, const auto& b) {
    const bool fa = std::isfinite(a.value), fb = std::isfinite(b.value);
    if (fa != fb) return fa;
    return fa && a.value > b.value;
  });
  for (const auto& s : trace) {
    if (static_cast<int>(starts.size()) >= options.starts) break;
    if (!std::isfinite(s.value)) break;
    if (distinct(s.u)) starts.push_back(s.u);
  }
  std::mt19937_64 rng(options.seed);
  while (static_cast<int>(starts.size()) < options.starts) {
    std::vector<double> u(d);
    for (auto& v : u) v = uniform01(rng);
    starts.push_back(u);
  }
  if (static_cast<int>(starts.size()) > options.starts) starts.resize(options.starts);

  // Local polishes, the remaining budget shared among them (unused budget carries forward).
  // NLopt's BOBYQA needs at least two parameters; one parameter is polished by Nelder-Mead.
  const bool bobyqa = options.local == LocalPolish::bobyqa && d >= 2;
  const nlopt::algorithm local = bobyqa ? nlopt::LN_BOBYQA : nlopt::LN_NELDERMEAD;
  std::vector<nlopt::result> codes;
  int polished = 0;
  // A reserve for one last polish from the best point: with Subplex (Rowan's Nelder-Mead on
  // subspaces) when infeasible points were met (BOBYQA's quadratic model is misled by the
  // penalty near a boundary of the feasible region; a comparison-based method is not; plain
  // Nelder-Mead stalls against a curved boundary), else with BOBYQA again.
  const long reserve = static_cast<long>(0.15 * static_cast<double>(options.max_evaluations));
  for (std::size_t s = 0; s < starts.size(); ++s) {
    const long remaining = options.max_evaluations - reserve - f.evaluations_;
    const long share = remaining / static_cast<long>(starts.size() - s);
    if (share < static_cast<long>(2 * d + 2)) break;
    f.stage_ = static_cast<int>(s) + 1;
    codes.push_back(run_stage(local, f, starts[s], share, options.xtol_rel, true));
    ++polished;
  }
  method << (bobyqa ? "BOBYQA" : "Nelder-Mead") << " polish from " << polished << " start"
         << (polished == 1 ? "" : "s");
  const long last = options.max_evaluations - f.evaluations_;
  if (f.have_feasible_ && last >= static_cast<long>(2 * d + 2)) {
    const bool simplex = f.infeasible_ > 0 || !bobyqa;
    f.stage_ = static_cast<int>(codes.size()) + 1;
    if (!simplex) {
      codes.push_back(run_stage(nlopt::LN_BOBYQA, f, f.best_u_, last, options.xtol_rel, true));
      method << " + final BOBYQA polish";
    } else {
      // Restarts with shrinking first steps: a simplex pressed against the edge of the
      // feasible region collapses early, and a fresh one from the best point moves on.
      int restarts = 0;
      for (double step = 0.1; step >= 1e-5; step *= 0.25) {
        const long left = options.max_evaluations - f.evaluations_;
        if (left < static_cast<long>(2 * d + 2)) break;
        const double before = f.best_value_;
        codes.push_back(run_stage(nlopt::LN_SBPLX, f, f.best_u_, left / 2 + 1,
                                  options.xtol_rel, true, step));
        f.stage_ = static_cast<int>(codes.size()) + 1;
        ++restarts;
        if (restarts >= 3 && f.best_value_ - before <= 1e-14 * (1.0 + std::abs(before))) break;
      }
      method << " + final Subplex polish (" << restarts << " runs)";
    }
  }

  result.x = f.have_feasible_ ? f.unscale(f.best_u_) : f.unscale(u_start);
  result.value = f.have_feasible_ ? f.best_value_ : std::numeric_limits<double>::quiet_NaN();
  result.evaluations = f.evaluations_;
  // Converged: the best point came from a polish that stopped on its tolerance (or was
  // roundoff-limited, which NLopt reports as a usable optimum), or the global best was the
  // start of a polish that stopped on its tolerance without improving on it.
  result.converged = false;
  if (f.have_feasible_) {
    if (f.best_stage_ >= 1) {
      const nlopt::result r = codes[static_cast<std::size_t>(f.best_stage_ - 1)];
      result.converged = stopped_on_tolerance(r) || r == nlopt::ROUNDOFF_LIMITED;
    } else if (!codes.empty()) {
      result.converged = stopped_on_tolerance(codes[0]) || codes[0] == nlopt::ROUNDOFF_LIMITED;
    }
  }
  if (!result.converged) method << " (stopped on the evaluation budget)";
  result.method = method.str();
  return result;
}

}  // namespace macroreal
