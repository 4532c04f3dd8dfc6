// Pooled tree MLE and the derived quantities (see estimator.hpp for the derivation).
//
// Plan built once: every step list gets the nodes of its outcome tree (one per prefix of
// length 0..n-1, two child counters each, prefixes numbered 2^L - 1 + bits with '-' = 1,
// first step in the most significant bit). Each cell of each sequence of that step list
// adds its count to the node of every prefix it passes, on the child of the sign it shows
// there. The joint probability of a full string is the product of the child fractions along
// its path. Derived quantities are linear combinations of earlier outputs.
#include "stats/estimator.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "core/error.hpp"

namespace macroreal {

std::string to_string(QuantityKind k) {
  switch (k) {
    case QuantityKind::joint_probability: return "joint-probability";
    case QuantityKind::single_average: return "single-average";
    case QuantityKind::correlator: return "correlator";
    case QuantityKind::lg_k: return "leggett-garg-K";
    case QuantityKind::lg_family: return "leggett-garg-family";
    case QuantityKind::nsit_s: return "nsit-S";
  }
  return "?";
}

std::string to_string(EstimateStatus s) {
  switch (s) {
    case EstimateStatus::ok: return "ok";
    case EstimateStatus::no_sequence: return "no-sequence";
    case EstimateStatus::unobserved_branch: return "unobserved-branch";
  }
  return "?";
}

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

const char* readout_name(Readout r) {
  return r == Readout::destructive ? "destructive" : "nondestructive";
}

// Step names joined: "AB" when every name is one character, else "M1,M2".
std::string join_steps(const std::vector<std::string>& steps) {
  const bool short_names =
      std::all_of(steps.begin(), steps.end(), [](const std::string& s) { return s.size() == 1; });
  std::string r;
  for (std::size_t i = 0; i < steps.size(); ++i) {
    if (i > 0 && !short_names) r += ",";
    r += steps[i];
  }
  return r;
}

std::string signs(const OutcomeString& o) {
  std::string r;
  for (int x : o) r += x > 0 ? '+' : '-';
  return r;
}

OutcomeString string_of_bits(std::size_t bits, std::size_t n) {
  OutcomeString o(n);
  for (std::size_t k = 0; k < n; ++k) o[k] = (bits >> (n - 1 - k)) & 1u ? -1 : +1;
  return o;
}

}  // namespace

CampaignEstimator::CampaignEstimator(const Protocol& protocol, const CampaignCounts& layout)
    : readout_(layout.readout) {
  if (protocol.readout != layout.readout)
    throw DomainError(std::string("estimator: the counts say readout ") +
                      readout_name(layout.readout) + " but the protocol says " +
                      readout_name(protocol.readout));

  // Step lists: those of the run sequences (first appearance), then those the tests need.
  auto add_step_set = [this](const std::vector<std::string>& steps) {
    for (std::size_t i = 0; i < step_sets_.size(); ++i)
      if (step_sets_[i].steps == steps) return static_cast<int>(i);
    StepSet s;
    s.steps = steps;
    step_sets_.push_back(std::move(s));
    return static_cast<int>(step_sets_.size() - 1);
  };
  for (const auto& s : layout.sequences) {
    if (s.steps.empty()) throw DomainError("estimator: sequence " + s.name + " has no steps");
    add_step_set(s.steps);
  }
  for (const auto& t : protocol.tests) {
    if (t.kind == TestSpec::Kind::leggett_garg) {
      const auto& o = t.order;
      if (o.size() < 3)
        throw DomainError("estimator: Leggett-Garg test with " + std::to_string(o.size()) +
                          " times, but at least 3 are needed");
      for (std::size_t k = 0; k + 1 < o.size(); ++k) add_step_set({o[k], o[k + 1]});
      add_step_set({o.front(), o.back()});
    } else {
      if (t.from == t.to || t.from.empty() || t.to.empty())
        throw DomainError("estimator: NSIT test from '" + t.from + "' to '" + t.to +
                          "' needs two different measurements");
      add_step_set({t.to});
      add_step_set({t.from, t.to});
    }
  }

  // Joint probabilities per step list, and the tree nodes.
  for (auto& ss : step_sets_) {
    const std::size_t n = ss.steps.size();
    if (n > 20) throw DomainError("estimator: step list " + join_steps(ss.steps) + " too long");
    ss.node_offset = node_count_;
    node_count_ += static_cast<int>((std::size_t{1} << n) - 1);
    ss.first_quantity = static_cast<int>(info_.size());
    for (std::size_t b = 0; b < (std::size_t{1} << n); ++b) {
      QuantityInfo q;
      q.kind = QuantityKind::joint_probability;
      q.steps = ss.steps;
      q.outcomes = string_of_bits(b, n);
      q.name = "P[" + join_steps(ss.steps) + ":" + signs(q.outcomes) + "]";
      info_.push_back(std::move(q));
    }
  }

  // Contributions of the cells.
  for (std::size_t s = 0; s < layout.sequences.size(); ++s) {
    const auto& seq = layout.sequences[s];
    if (seq.counts.size() != seq.cells.size())
      throw DomainError("estimator: sequence " + seq.name + " has " +
                        std::to_string(seq.counts.size()) + " counts for " +
                        std::to_string(seq.cells.size()) + " cells");
    shape_.push_back(seq.cells.size());
    int set_index = -1;
    for (std::size_t i = 0; i < step_sets_.size(); ++i)
      if (step_sets_[i].steps == seq.steps) set_index = static_cast<int>(i);
    auto& ss = step_sets_[static_cast<std::size_t>(set_index)];
    ss.has_sequence = true;
    const std::size_t n = seq.steps.size();
    for (std::size_t j = 0; j < seq.cells.size(); ++j) {
      const auto& cell = seq.cells[j];
      if (cell.empty() || cell.size() > n)
        throw DomainError("estimator: sequence " + seq.name + " has a cell of length " +
                          std::to_string(cell.size()) + " for " + std::to_string(n) + " steps");
      if (readout_ == Readout::nondestructive && cell.size() != n)
        throw DomainError("estimator: sequence " + seq.name +
                          " has a partial outcome string under non-destructive readout");
      std::size_t bits = 0;
      for (std::size_t k = 0; k < cell.size(); ++k) {
        if (cell[k] != 1 && cell[k] != -1)
          throw DomainError("estimator: sequence " + seq.name + " has an outcome " +
                            std::to_string(cell[k]) + ", but outcomes are +1 or -1");
        const int node = ss.node_offset + static_cast<int>((std::size_t{1} << k) - 1 + bits);
        const int child = cell[k] > 0 ? 0 : 1;
        contributions_.push_back({static_cast<int>(s), static_cast<int>(j), node, child});
        bits = (bits << 1) | static_cast<std::size_t>(child);
      }
    }
  }

  auto joint_index = [this](const std::vector<std::string>& steps, const OutcomeString& o) {
    for (const auto& ss : step_sets_)
      if (ss.steps == steps) {
        std::size_t b = 0;
        for (int x : o) b = (b << 1) | (x > 0 ? 0u : 1u);
        return ss.first_quantity + static_cast<int>(b);
      }
    throw InvariantError("estimator: step list missing from the plan");
  };
  auto add_combination = [this](QuantityInfo q, double constant,
                                std::vector<std::pair<int, double>> terms) {
    combinations_.push_back({static_cast<int>(info_.size()), constant, std::move(terms)});
    info_.push_back(std::move(q));
    return static_cast<int>(info_.size() - 1);
  };

  // Single-time averages and correlators of every one- and two-step list.
  for (const auto& ss : step_sets_) {
    if (ss.steps.size() == 1) {
      QuantityInfo q;
      q.kind = QuantityKind::single_average;
      q.steps = ss.steps;
      q.name = "Q[" + join_steps(ss.steps) + "]";
      add_combination(std::move(q), 0.0,
                      {{joint_index(ss.steps, {+1}), 1.0}, {joint_index(ss.steps, {-1}), -1.0}});
    }
  }
  auto correlator_index = [this](const std::string& a, const std::string& b) {
    const std::string name = "C[" + join_steps({a, b}) + "]";
    return index_of(name);
  };
  for (const auto& ss : step_sets_) {
    if (ss.steps.size() == 2) {
      QuantityInfo q;
      q.kind = QuantityKind::correlator;
      q.steps = ss.steps;
      q.name = "C[" + join_steps(ss.steps) + "]";
      std::vector<std::pair<int, double>> terms;
      for (int x : {+1, -1})
        for (int y : {+1, -1}) terms.push_back({joint_index(ss.steps, {x, y}), double(x * y)});
      add_combination(std::move(q), 0.0, std::move(terms));
    }
  }

  // Test statistics.
  for (std::size_t t = 0; t < protocol.tests.size(); ++t) {
    const auto& test = protocol.tests[t];
    if (test.kind == TestSpec::Kind::leggett_garg) {
      const auto& o = test.order;
      const std::size_t n = o.size();
      std::vector<std::pair<int, double>> terms;
      for (std::size_t k = 0; k + 1 < n; ++k) terms.push_back({correlator_index(o[k], o[k + 1]), 1.0});
      terms.push_back({correlator_index(o.front(), o.back()), -1.0});
      QuantityInfo q;
      q.kind = QuantityKind::lg_k;
      q.steps = o;
      q.name = "K[" + join_steps(o) + "]";
      q.bound = static_cast<double>(n) - 2.0;
      q.bound_side = BoundSide::upper;
      q.test_index = static_cast<int>(t);
      if (index_of(q.name) >= 0) continue;  // the same test listed twice
      add_combination(q, 0.0, terms);
      if (n == 3) {
        const int c12 = correlator_index(o[0], o[1]), c23 = correlator_index(o[1], o[2]),
                  c13 = correlator_index(o[0], o[2]);
        for (int s1 : {+1, -1})
          for (int s2 : {+1, -1}) {
            QuantityInfo f;
            f.kind = QuantityKind::lg_family;
            f.steps = o;
            f.outcomes = {s1, s2};
            f.name = "LGfamily[" + join_steps(o) + ":" + signs(f.outcomes) + "]";
            f.bound = 0.0;
            f.bound_side = BoundSide::lower;
            f.test_index = static_cast<int>(t);
            add_combination(std::move(f), 1.0,
                            {{c12, double(s1)}, {c23, double(s2)}, {c13, double(s1 * s2)}});
          }
      }
    } else {
      QuantityInfo q;
      q.kind = QuantityKind::nsit_s;
      q.steps = {test.from, test.to};
      q.name = "S[" + test.from + "->" + test.to + "]";
      q.bound = 0.0;
      q.bound_side = BoundSide::equality;
      q.test_index = static_cast<int>(t);
      if (index_of(q.name) >= 0) continue;
      add_combination(std::move(q), 0.0,
                      {{joint_index({test.to}, {+1}), 1.0},
                       {joint_index({test.from, test.to}, {+1, +1}), -1.0},
                       {joint_index({test.from, test.to}, {-1, +1}), -1.0}});
    }
  }
}

std::vector<std::string> CampaignEstimator::quantity_names() const {
  std::vector<std::string> r;
  r.reserve(info_.size());
  for (const auto& q : info_) r.push_back(q.name);
  return r;
}

int CampaignEstimator::index_of(const std::string& name) const {
  for (std::size_t i = 0; i < info_.size(); ++i)
    if (info_[i].name == name) return static_cast<int>(i);
  return -1;
}

void CampaignEstimator::evaluate_into(const std::vector<std::vector<double>>& counts, double* out,
                                      double* nodes) const {
  std::fill(nodes, nodes + 2 * node_count_, 0.0);
  for (const auto& c : contributions_)
    nodes[2 * c.node + c.child] += counts[static_cast<std::size_t>(c.seq)][static_cast<std::size_t>(c.cell)];
  for (const auto& ss : step_sets_) {
    const std::size_t n = ss.steps.size();
    const double* tree = nodes + 2 * ss.node_offset;
    for (std::size_t b = 0; b < (std::size_t{1} << n); ++b) {
      double p = 1.0;
      for (std::size_t k = 0; k < n && p != 0.0; ++k) {
        const std::size_t prefix = b >> (n - k);
        const std::size_t child = (b >> (n - 1 - k)) & 1u;
        const double* node = tree + 2 * ((std::size_t{1} << k) - 1 + prefix);
        const double total = node[0] + node[1];
        p = total > 0.0 ? p * (node[child] / total) : kNaN;
      }
      out[ss.first_quantity + static_cast<int>(b)] = p;
    }
  }
  for (const auto& c : combinations_) {
    double v = c.constant;
    for (const auto& [i, w] : c.terms) v += w * out[i];
    out[c.target] = v;
  }
}

void CampaignEstimator::evaluate(const std::vector<std::vector<double>>& counts,
                                 std::vector<double>& out) const {
  if (counts.size() != shape_.size())
    throw DomainError("estimator: " + std::to_string(counts.size()) + " count vectors for " +
                      std::to_string(shape_.size()) + " sequences");
  for (std::size_t s = 0; s < shape_.size(); ++s)
    if (counts[s].size() != shape_[s])
      throw DomainError("estimator: sequence " + std::to_string(s) + " has " +
                        std::to_string(counts[s].size()) + " counts for " +
                        std::to_string(shape_[s]) + " cells");
  thread_local std::vector<double> scratch;
  if (scratch.size() < static_cast<std::size_t>(2 * node_count_))
    scratch.resize(static_cast<std::size_t>(2 * node_count_));
  out.resize(info_.size());
  evaluate_into(counts, out.data(), scratch.data());
}

EstimateReport CampaignEstimator::estimate(const std::vector<std::vector<double>>& counts) const {
  EstimateReport r;
  evaluate(counts, r.values);
  r.status.assign(info_.size(), EstimateStatus::ok);
  r.messages.assign(info_.size(), "");
  // Joint probabilities: name the first unobserved branch on the path.
  std::vector<double> nodes(static_cast<std::size_t>(2 * node_count_), 0.0);
  for (const auto& c : contributions_)
    nodes[static_cast<std::size_t>(2 * c.node + c.child)] +=
        counts[static_cast<std::size_t>(c.seq)][static_cast<std::size_t>(c.cell)];
  for (const auto& ss : step_sets_) {
    const std::size_t n = ss.steps.size();
    for (std::size_t b = 0; b < (std::size_t{1} << n); ++b) {
      const auto qi = static_cast<std::size_t>(ss.first_quantity) + b;
      if (!ss.has_sequence) {
        r.status[qi] = EstimateStatus::no_sequence;
        r.messages[qi] = "no run sequence has the steps " + join_steps(ss.steps);
        continue;
      }
      if (!std::isnan(r.values[qi])) continue;
      for (std::size_t k = 0; k < n; ++k) {
        const std::size_t prefix = b >> (n - k);
        const auto node = static_cast<std::size_t>(ss.node_offset) + (std::size_t{1} << k) - 1 + prefix;
        if (nodes[2 * node] + nodes[2 * node + 1] <= 0.0) {
          r.status[qi] = EstimateStatus::unobserved_branch;
          const auto o = string_of_bits(b, n);
          r.messages[qi] = "no shot of " + join_steps(ss.steps) + " reached step " +
                           std::to_string(k + 1) +
                           (k == 0 ? std::string()
                                   : " after " + signs(OutcomeString(o.begin(), o.begin() + static_cast<long>(k))));
          break;
        }
      }
    }
  }
  for (const auto& c : combinations_) {
    const auto t = static_cast<std::size_t>(c.target);
    for (const auto& [i, w] : c.terms) {
      const auto si = static_cast<std::size_t>(i);
      if (r.status[si] != EstimateStatus::ok) {
        r.status[t] = r.status[si];
        r.messages[t] = info_[si].name + ": " + r.messages[si];
        break;
      }
    }
  }
  return r;
}

std::vector<double> CampaignEstimator::delta_method_se(
    const std::vector<std::vector<double>>& counts) const {
  std::vector<double> base;
  evaluate(counts, base);
  const std::size_t m = info_.size();
  std::vector<double> var(m, 0.0), plus(m), minus(m), d(m), sum_cd(m);
  auto work = counts;
  for (std::size_t s = 0; s < work.size(); ++s) {
    double n_s = 0.0;
    for (double c : counts[s]) n_s += c;
    if (n_s <= 0.0) continue;  // no shots: the sequence does not enter the estimate
    std::fill(sum_cd.begin(), sum_cd.end(), 0.0);
    for (std::size_t j = 0; j < counts[s].size(); ++j) {
      const double c = counts[s][j];
      if (c <= 0.0) continue;  // weight p_j = 0 in the multinomial covariance
      const double h = 1e-4 * c;
      work[s][j] = c + h;
      evaluate(work, plus);
      work[s][j] = c - h;
      evaluate(work, minus);
      work[s][j] = c;
      for (std::size_t q = 0; q < m; ++q) {
        const double dq = (plus[q] - minus[q]) / (2.0 * h);
        var[q] += c * dq * dq;  // sum_j c_j d_j^2
        sum_cd[q] += c * dq;
      }
    }
    for (std::size_t q = 0; q < m; ++q) var[q] -= sum_cd[q] * sum_cd[q] / n_s;
  }
  std::vector<double> se(m);
  for (std::size_t q = 0; q < m; ++q)
    se[q] = std::isnan(base[q]) || std::isnan(var[q]) ? kNaN : std::sqrt(std::max(var[q], 0.0));
  return se;
}

std::vector<std::vector<double>> CampaignEstimator::counts_of(const CampaignCounts& c) {
  std::vector<std::vector<double>> r;
  r.reserve(c.sequences.size());
  for (const auto& s : c.sequences) r.push_back(s.counts);
  return r;
}

}  // namespace macroreal
