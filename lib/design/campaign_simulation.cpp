#include "design/campaign_simulation.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <sstream>

#include "core/error.hpp"
#include "design/simulation_variates.hpp"
#include "stats/random_variates.hpp"

namespace macroreal {

namespace {

std::string num(double x) {
  std::ostringstream s;
  s.precision(6);
  s << x;
  return s.str();
}

// The NoiseModel member named by its protocol JSON field (DESIGN.md section 8 "noise").
double* drift_target(NoiseModel& noise, const std::string& field) {
  if (field == "heating_quanta_per_s") return &noise.heating_quanta_per_s;
  if (field == "damping_rate_per_s") return &noise.damping_rate_per_s;
  if (field == "bath_nbar") return &noise.bath_nbar;
  if (field == "dephasing_rate_per_s") return &noise.dephasing_rate_per_s;
  if (field == "frequency_noise_sd_rad_per_s") return &noise.frequency_noise_sd_rad_per_s;
  if (field == "force_noise_quanta_per_s") return &noise.force_noise_quanta_per_s;
  return nullptr;
}

const char* kDriftFields =
    "heating_quanta_per_s, damping_rate_per_s, bath_nbar, dephasing_rate_per_s, "
    "frequency_noise_sd_rad_per_s, force_noise_quanta_per_s";

void check_rate(double x, const char* name) {
  if (!(x >= 0.0 && x <= 1.0))
    throw DomainError(std::string(name) + " = " + num(x) + ", but must be in [0, 1]");
}

// Destructive readout: P(true dark at step k | dark at steps 0..k-1, state intact), from
// the prefix probabilities of the model's outcome strings.
std::vector<double> dark_conditionals(const SequenceCounts& layout, const std::vector<double>& p) {
  const std::size_t n = layout.steps.size();
  std::vector<double> prefix(n + 1, 0.0);  // prefix[k] = P(first k signs are the dark ones)
  for (std::size_t j = 0; j < layout.cells.size(); ++j) {
    const OutcomeString& o = layout.cells[j];
    prefix[0] += p[j];
    for (std::size_t k = 0; k < o.size() && k < n; ++k) {
      if (o[k] != layout.dark_is[k]) break;
      prefix[k + 1] += p[j];
    }
  }
  std::vector<double> q(n, 0.0);
  for (std::size_t k = 0; k < n; ++k)
    q[k] = prefix[k] > 0.0 ? std::clamp(prefix[k + 1] / prefix[k], 0.0, 1.0) : 0.0;
  return q;
}

// Non-destructive readout: probability of each true string as a bit mask (bit k: step k+1
// true bright).
std::vector<double> true_string_probabilities(const SequenceCounts& layout,
                                              const std::vector<double>& p) {
  const std::size_t n = layout.steps.size();
  std::vector<double> out(std::size_t{1} << n, 0.0);
  for (std::size_t j = 0; j < layout.cells.size(); ++j) {
    const OutcomeString& o = layout.cells[j];
    MACROREAL_CHECK(o.size() == n);
    std::uint32_t mask = 0;
    for (std::size_t k = 0; k < n; ++k)
      if (o[k] != layout.dark_is[k]) mask |= std::uint32_t{1} << k;
    out[mask] += p[j];
  }
  return out;
}

// Cumulative table whose entries from the last positive one on are 2 (see SequenceTables).
std::vector<double> cumulative_of(const std::vector<double>& p) {
  std::vector<double> c(p.size(), 2.0);
  std::size_t last = 0;
  for (std::size_t j = 0; j < p.size(); ++j)
    if (p[j] > 0.0) last = j;
  double run = 0.0;
  for (std::size_t j = 0; j < last; ++j) {
    run += p[j];
    c[j] = run;
  }
  return c;
}

SequenceTables tables_of(const SequenceCounts& layout, const std::vector<double>& p,
                         Readout readout, const ReadoutErrorRates& errors, bool counts) {
  SequenceTables t;
  t.pattern_probability = recorded_pattern_probabilities(layout, p, readout, errors);
  t.cumulative = cumulative_of(t.pattern_probability);
  if (counts) {
    if (readout == Readout::destructive)
      t.dark_given_intact = dark_conditionals(layout, p);
    else
      t.true_cumulative = cumulative_of(true_string_probabilities(layout, p));
  }
  return t;
}

inline int pick(const std::vector<double>& c, double u) {
  if (c.size() <= 16) {
    int j = 0;
    while (u >= c[static_cast<std::size_t>(j)]) ++j;
    return j;
  }
  return static_cast<int>(std::upper_bound(c.begin(), c.end(), u) - c.begin());
}

}  // namespace

std::vector<double> recorded_pattern_probabilities(const SequenceCounts& layout,
                                                   const std::vector<double>& p,
                                                   Readout readout,
                                                   const ReadoutErrorRates& errors,
                                                   std::vector<ReadPattern>* patterns) {
  MACROREAL_CHECK(p.size() == layout.cells.size());
  const std::size_t n = layout.steps.size();
  const double e1 = errors.dark_read_bright, e2 = errors.bright_read_dark;
  std::vector<double> out;
  if (patterns) patterns->clear();
  if (readout == Readout::destructive) {
    const std::vector<double> q = dark_conditionals(layout, p);
    double total = 0.0;
    for (double x : p) total += x;
    // Forward recursion over the hidden state, restricted to shots read dark so far.
    double intact = total, ruined = 0.0;
    const double ruined_bright = 0.5 * e1 + 0.5 * (1.0 - e2);  // fair coin, then errors
    for (std::size_t k = 0; k < n; ++k) {
      const double read_bright = intact * (q[k] * e1 + (1.0 - q[k]) * (1.0 - e2)) +
                                 ruined * ruined_bright;
      out.push_back(read_bright);
      if (patterns) patterns->push_back({static_cast<int>(k + 1), std::uint32_t{1} << k});
      const double next_intact = intact * q[k] * (1.0 - e1);
      ruined = intact * (1.0 - q[k]) * e2 + ruined * (1.0 - ruined_bright);
      intact = next_intact;
    }
    out.push_back(intact + ruined);
    if (patterns) patterns->push_back({static_cast<int>(n), 0});
    return out;
  }
  // Non-destructive: mix each step's bit independently, O(n 2^n).
  out = true_string_probabilities(layout, p);
  for (std::size_t k = 0; k < n; ++k) {
    const std::size_t bit = std::size_t{1} << k;
    for (std::size_t m = 0; m < out.size(); ++m) {
      if (m & bit) continue;
      const double dark = out[m], bright = out[m | bit];  // true dark / true bright at k
      out[m] = dark * (1.0 - e1) + bright * e2;             // read dark
      out[m | bit] = dark * e1 + bright * (1.0 - e2);       // read bright
    }
  }
  if (patterns)
    for (std::size_t m = 0; m < out.size(); ++m)
      patterns->push_back({static_cast<int>(n), static_cast<std::uint32_t>(m)});
  return out;
}

SimulationPlan plan_simulation(const Protocol& protocol, const SimulationOptions& options) {
  if (!(options.cycle_time_s > 0.0) || !std::isfinite(options.cycle_time_s))
    throw DomainError("cycle time = " + num(options.cycle_time_s) + " s, but must be > 0");
  if (!(options.step_time_s >= 0.0) || !std::isfinite(options.step_time_s))
    throw DomainError("step time = " + num(options.step_time_s) + " s, but must be >= 0");
  if (options.shots_per_sequence < 0)
    throw DomainError("shots = " + std::to_string(options.shots_per_sequence) +
                      ", but must be >= 0");
  if (options.shots_per_sequence >= (long{1} << 31))
    throw DomainError("shots = " + std::to_string(options.shots_per_sequence) +
                      ", but must be below 2^31 per sequence");
  for (const auto& [name, n] : options.allocation) {
    if (!protocol.find_sequence(name))
      throw DomainError("allocation: unknown sequence '" + name + "'");
    if (n < 0 || n >= (long{1} << 31))
      throw DomainError("allocation: shots of '" + name + "' = " + std::to_string(n) +
                        ", but must be in [0, 2^31)");
  }
  SimulationPlan plan;
  plan.readout = protocol.readout;
  plan.seed = options.seed;
  plan.cycle_time_s = options.cycle_time_s;
  plan.step_time_s = options.step_time_s;
  plan.counts = options.counts;
  plan.drift = options.drift;
  if (options.counts) {
    const PhotonCountModel& c = *options.counts;
    for (const auto& [x, what] : {std::pair{c.dark_rate, "dark count rate"},
                                  std::pair{c.bright_rate, "bright count rate"}})
      if (!(x >= 0.0 && x <= 1e6))
        throw DomainError(std::string(what) + " = " + num(x) +
                          " counts per window, but must be in [0, 1e6]");
    if (!(c.threshold >= 0.0) || !std::isfinite(c.threshold))
      throw DomainError("count threshold = " + num(c.threshold) + ", but must be >= 0");
    const long t = static_cast<long>(std::floor(c.threshold));
    plan.errors.dark_read_bright = 1.0 - poisson_cdf(t, c.dark_rate);
    plan.errors.bright_read_dark = poisson_cdf(t, c.bright_rate);
  } else {
    check_rate(options.errors.dark_read_bright, "dark_read_bright");
    check_rate(options.errors.bright_read_dark, "bright_read_dark");
    plan.errors = options.errors;
  }
  if (options.drift) {
    NoiseModel probe;
    if (!drift_target(probe, options.drift->field))
      throw DomainError("drift: unknown noise parameter '" + options.drift->field +
                        "' (one of " + kDriftFields + ")");
    for (double x : {options.drift->start, options.drift->end})
      if (!(x >= 0.0) || !std::isfinite(x))
        throw DomainError("drift: " + options.drift->field + " = " + num(x) +
                          ", but must be finite and >= 0");
    if (options.drift_blocks < 1 || options.drift_blocks > 10000)
      throw DomainError("drift blocks = " + std::to_string(options.drift_blocks) +
                        ", but must be in [1, 10000]");
  }

  plan.model = model_cells(protocol, options.predict);
  plan.engine = plan.model.prediction.engine.name;
  const CampaignCounts& layout = plan.model.layout;
  for (std::size_t si = 0; si < layout.sequences.size(); ++si) {
    const SequenceCounts& seq = layout.sequences[si];
    if (seq.steps.size() > static_cast<std::size_t>(kMaxSimulatedSteps))
      throw DomainError("sequence '" + seq.name + "' has " + std::to_string(seq.steps.size()) +
                        " steps; simulation handles at most " +
                        std::to_string(kMaxSimulatedSteps));
    SimulatedSequence s;
    s.name = seq.name;
    s.steps = static_cast<int>(seq.steps.size());
    s.dark_is = seq.dark_is;
    const auto it = options.allocation.find(seq.name);
    s.shots = it != options.allocation.end() ? it->second
              : options.allocation_only      ? 0
                                             : options.shots_per_sequence;
    const double d = std::round((options.cycle_time_s + s.steps * options.step_time_s) * 1e9);
    if (!(d >= 1.0 && d < 1e15))
      throw DomainError("shot duration of '" + seq.name + "' = " + num(d * 1e-9) +
                        " s, but must be between 1 ns and 1e6 s");
    s.duration_ns = static_cast<std::uint64_t>(d);
    recorded_pattern_probabilities(seq, plan.model.probabilities[si],
                                   plan.readout, plan.errors, &s.patterns);
    plan.total_shots += static_cast<std::uint64_t>(s.shots);
    if (s.shots > 0 && static_cast<double>(s.shots) * static_cast<double>(s.duration_ns) +
                               static_cast<double>(plan.total_ns) >= 9.0e18)
      throw DomainError("the campaign lasts longer than 2^63 ns");
    plan.total_ns += static_cast<std::uint64_t>(s.shots) * s.duration_ns;
    if (s.shots > 0) plan.max_steps = std::max(plan.max_steps, s.steps);
    plan.sequences.push_back(std::move(s));
  }
  if (plan.max_steps == 0)
    for (const auto& s : plan.sequences) plan.max_steps = std::max(plan.max_steps, s.steps);
  plan.max_steps = std::max(plan.max_steps, 1);

  const bool counts = options.counts.has_value();
  auto block_tables = [&](const ModelCells& cells) {
    std::vector<SequenceTables> t;
    for (std::size_t s = 0; s < cells.layout.sequences.size(); ++s)
      t.push_back(tables_of(cells.layout.sequences[s], cells.probabilities[s], plan.readout,
                            plan.errors, counts));
    return t;
  };
  if (!options.drift) {
    DriftBlock b;
    b.end_ns = std::numeric_limits<std::uint64_t>::max();
    b.tables = block_tables(plan.model);
    plan.blocks.push_back(std::move(b));
    return plan;
  }
  PredictOptions block_predict = options.predict;
  block_predict.classical_models = false;  // only the probabilities are needed per block
  const int B = options.drift_blocks;
  for (int b = 0; b < B; ++b) {
    DriftBlock block;
    block.end_ns = (b + 1 == B) ? std::numeric_limits<std::uint64_t>::max()
                                : static_cast<std::uint64_t>(std::llround(
                                      static_cast<double>(plan.total_ns) * (b + 1.0) / B));
    block.value = options.drift->start +
                  (options.drift->end - options.drift->start) * (b + 0.5) / B;
    Protocol drifted = protocol;
    *drift_target(drifted.noise, options.drift->field) = block.value;
    const ModelCells cells = model_cells(drifted, block_predict);
    MACROREAL_CHECK(cells.layout.sequences.size() == layout.sequences.size());
    block.tables = block_tables(cells);
    plan.blocks.push_back(std::move(block));
  }
  return plan;
}

SimulationSummary simulate_campaign(const SimulationPlan& plan, ShotSink& sink) {
  const std::size_t S = plan.sequences.size();
  SimulationSummary summary;
  summary.rows_per_sequence.assign(S, 0);
  std::vector<std::uint64_t> next(S, 0), n(S, 0), duration(S, 0);
  for (std::size_t s = 0; s < S; ++s) {
    n[s] = static_cast<std::uint64_t>(plan.sequences[s].shots);
    duration[s] = plan.sequences[s].duration_ns;
  }
  const bool counts = plan.counts.has_value();
  const double dark_rate = counts ? plan.counts->dark_rate : 0.0;
  const double bright_rate = counts ? plan.counts->bright_rate : 0.0;
  const double threshold = counts ? plan.counts->threshold : 0.0;
  const bool destructive = plan.readout == Readout::destructive;

  RandomEngine g;
  std::size_t block = 0;
  std::uint64_t time = 0;
  SimulatedShot shot;
  for (std::uint64_t row = 0; row < plan.total_shots; ++row) {
    if (row % kRowsPerStream == 0) g.seed(derive_seed(plan.seed, row / kRowsPerStream));
    // Next sequence: the smallest campaign fraction (2k+1) / (2 n_s), compared exactly.
    std::size_t best = S;
    for (std::size_t s = 0; s < S; ++s) {
      if (next[s] >= n[s]) continue;
      if (best == S || (2 * next[s] + 1) * n[best] < (2 * next[best] + 1) * n[s]) best = s;
    }
    MACROREAL_CHECK(best < S);
    while (time >= plan.blocks[block].end_ns) ++block;
    const SequenceTables& t = plan.blocks[block].tables[best];
    shot.sequence = best;
    shot.shot = next[best];
    shot.time_ns = time;
    if (!counts) {
      shot.pattern = pick(t.cumulative, uniform01(g));
      shot.length = plan.sequences[best].patterns[static_cast<std::size_t>(shot.pattern)].length;
    } else {
      const int steps = plan.sequences[best].steps;
      shot.pattern = -1;
      if (destructive) {
        bool intact = true;
        shot.length = steps;
        for (int k = 0; k < steps; ++k) {
          const double pd = intact ? t.dark_given_intact[static_cast<std::size_t>(k)] : 0.5;
          const bool true_dark = uniform01(g) < pd;
          const long c = poisson(g, true_dark ? dark_rate : bright_rate);
          shot.counts[static_cast<std::size_t>(k)] = static_cast<std::uint32_t>(c);
          if (static_cast<double>(c) > threshold) {  // read bright: the shot ends
            shot.length = k + 1;
            break;
          }
          if (!true_dark) intact = false;  // bright misread as dark: the state is ruined
        }
      } else {
        const int m = pick(t.true_cumulative, uniform01(g));
        shot.length = steps;
        for (int k = 0; k < steps; ++k)
          shot.counts[static_cast<std::size_t>(k)] = static_cast<std::uint32_t>(
              poisson(g, ((m >> k) & 1) ? bright_rate : dark_rate));
      }
    }
    sink.shot(shot);
    time += duration[best];
    ++next[best];
    ++summary.rows_per_sequence[best];
    ++summary.rows;
  }
  sink.finish();
  return summary;
}

std::vector<std::string> simulation_assumptions(const SimulationPlan& plan) {
  std::vector<std::string> a;
  a.push_back("invented data: every result is drawn from the model's own outcome probabilities "
              "(engine " + plan.engine + "), so the table agrees with the model by construction");
  if (plan.readout == Readout::destructive)
    a.push_back("destructive readout: a shot goes on only while the detector reads dark; a true "
                "dark misread as bright ends the shot; a true bright misread as dark goes on "
                "with a ruined oscillator state, and every later result of that shot is taken "
                "as a fair coin flip (dark or bright with probability 1/2, then subject to "
                "detection errors)");
  else
    a.push_back("non-destructive readout: every step is recorded; a misread does not change "
                "the oscillator state");
  if (plan.counts)
    a.push_back("photon counts: Poisson with mean " + num(plan.counts->dark_rate) +
                " (dark) or " + num(plan.counts->bright_rate) +
                " (bright) per detection window, independent between steps and shots; a "
                "count <= " + num(plan.counts->threshold) + " reads dark (implied "
                "dark_read_bright " + num(plan.errors.dark_read_bright) +
                ", bright_read_dark " + num(plan.errors.bright_read_dark) + ")");
  else
    a.push_back("detection errors: dark read bright with probability " +
                num(plan.errors.dark_read_bright) + ", bright read dark with probability " +
                num(plan.errors.bright_read_dark) + ", independent between steps and shots");
  a.push_back("schedule: sequences interleaved evenly (the k-th of a sequence's n shots at "
              "campaign fraction (k + 1/2)/n); a shot lasts " + num(plan.cycle_time_s) +
              " s + " + num(plan.step_time_s) + " s per step, rounded to 1 ns; time_s is the "
              "start of the shot");
  if (plan.drift)
    a.push_back("drift: " + plan.drift->field + " linear from " + num(plan.drift->start) +
                " to " + num(plan.drift->end) + " over the campaign, approximated piecewise "
                "constant in " + std::to_string(plan.blocks.size()) + " equal time blocks (model "
                "re-evaluated at each block's midpoint value, at most " +
                num(std::fabs(plan.drift->end - plan.drift->start) /
                    (2.0 * static_cast<double>(plan.blocks.size()))) +
                " off the linear value)");
  else
    a.push_back("stationary: the model does not change over the campaign");
  a.push_back("shots are independent of each other (no correlation between shots beyond the "
              "drift)");
  return a;
}

}  // namespace macroreal
