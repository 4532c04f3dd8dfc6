#include "detection/sequence_readout_model.hpp"

#include <cmath>
#include <cstdlib>

#include "core/error.hpp"
#include "phase_space/number_text.hpp"

namespace macroreal {

namespace {

using detail::number_text;

// The detector results of a cell: first_bright = step of the first bright result (n: none),
// plus the bright mask for non-destructive readout.
struct DetectorPattern {
  std::size_t first_bright = 0;
  std::uint32_t bright_mask = 0;
};

DetectorPattern pattern_of(const OutcomeString& o, const std::vector<int>& dark_is, std::size_t n) {
  DetectorPattern p;
  p.first_bright = n;
  for (std::size_t k = 0; k < o.size(); ++k)
    if (o[k] != dark_is[k]) {
      p.bright_mask |= std::uint32_t{1} << k;
      if (p.first_bright == n) p.first_bright = k;
    }
  return p;
}

void check_sequence(const SequenceCounts& s) {
  const std::size_t n = s.steps.size();
  if (n == 0) throw DomainError("readout model: sequence '" + s.name + "' has no steps");
  if (s.dark_is.size() < n)
    throw DomainError("readout model: sequence '" + s.name + "' has " + std::to_string(s.dark_is.size()) +
                      " dark_is entries for " + std::to_string(n) +
                      " steps; the correction needs the dark sign of every step");
  if (n > 12) throw DomainError("readout model: sequence '" + s.name + "' has more than 12 steps");
}

}  // namespace

void validate_rates(const MisassignmentRates& r) {
  const double e1 = r.dark_read_bright, e2 = r.bright_read_dark;
  if (!(e1 >= 0 && e1 < 1)) throw DomainError("dark_read_bright = " + number_text(e1) + ", but must be in [0, 1)");
  if (!(e2 >= 0 && e2 < 1)) throw DomainError("bright_read_dark = " + number_text(e2) + ", but must be in [0, 1)");
  if (!(e1 + e2 < 1))
    throw DomainError("dark_read_bright + bright_read_dark = " + number_text(e1 + e2) +
                      ", but must be below 1 (otherwise the readout carries no information)");
}

MisreadContinuation parse_misread_continuation(const std::string& text) {
  if (text == "fair") return {};
  if (text.rfind("dark=", 0) == 0) {
    const std::string v = text.substr(5);
    char* end = nullptr;
    const double r = std::strtod(v.c_str(), &end);
    if (!v.empty() && end && *end == '\0' && r >= 0.0 && r <= 1.0) return {r};
  }
  throw DomainError("misread continuation '" + text +
                    "', but must be 'fair' or 'dark=P' with P in [0, 1] (the probability that a "
                    "later result of a shot with a misread bright is truly dark)");
}

std::string to_string(const MisreadContinuation& c) {
  if (c.dark_probability == 0.5) return "fair";
  return "dark=" + number_text(c.dark_probability);
}

Eigen::MatrixXd readout_map(const SequenceCounts& s, Readout readout, const MisassignmentRates& rates,
                            const MisreadContinuation& continuation) {
  validate_rates(rates);
  check_sequence(s);
  const double r = continuation.dark_probability;
  if (!(r >= 0.0 && r <= 1.0))
    throw DomainError("misread continuation dark probability = " + number_text(r) + ", but must be in [0, 1]");
  const double e1 = rates.dark_read_bright, e2 = rates.bright_read_dark;
  const std::size_t n = s.steps.size(), m = s.cells.size();
  std::vector<DetectorPattern> pat;
  pat.reserve(m);
  for (const auto& o : s.cells) pat.push_back(pattern_of(o, s.dark_is, n));
  Eigen::MatrixXd M = Eigen::MatrixXd::Zero(static_cast<Eigen::Index>(m), static_cast<Eigen::Index>(m));

  if (readout == Readout::nondestructive) {
    for (std::size_t i = 0; i < m; ++i)
      for (std::size_t j = 0; j < m; ++j) {
        double v = 1.0;
        for (std::size_t k = 0; k < n; ++k) {
          const bool read_bright = (pat[i].bright_mask >> k) & 1u, true_bright = (pat[j].bright_mask >> k) & 1u;
          v *= true_bright ? (read_bright ? 1 - e2 : e2) : (read_bright ? e1 : 1 - e1);
        }
        M(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) = v;
      }
    return M;
  }

  const double d = r * (1 - e1) + (1 - r) * e2;  // a step after a misread bright reads dark
  for (std::size_t i = 0; i < m; ++i) {
    const std::size_t k = pat[i].first_bright;
    for (std::size_t j = 0; j < m; ++j) {
      const std::size_t b = pat[j].first_bright;
      double v = 0.0;
      if (k < b)
        v = std::pow(1 - e1, static_cast<double>(k)) * e1;
      else if (k == b && b < n)
        v = std::pow(1 - e1, static_cast<double>(b)) * (1 - e2);
      else if (k == n && b == n)
        v = std::pow(1 - e1, static_cast<double>(n));
      else if (k == n)
        v = std::pow(1 - e1, static_cast<double>(b)) * e2 * std::pow(d, static_cast<double>(n - 1 - b));
      else  // b < k < n
        v = std::pow(1 - e1, static_cast<double>(b)) * e2 * std::pow(d, static_cast<double>(k - b - 1)) * (1 - d);
      M(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j)) = v;
    }
  }
  return M;
}

std::vector<double> recorded_from_true(const SequenceCounts& s, Readout readout, const std::vector<double>& p,
                                       const MisassignmentRates& rates, const MisreadContinuation& continuation) {
  const Eigen::MatrixXd M = readout_map(s, readout, rates, continuation);
  if (p.size() != s.cells.size())
    throw DomainError("readout model: " + std::to_string(p.size()) + " values for " +
                      std::to_string(s.cells.size()) + " cells of '" + s.name + "'");
  const Eigen::VectorXd q = M * Eigen::Map<const Eigen::VectorXd>(p.data(), static_cast<Eigen::Index>(p.size()));
  return {q.data(), q.data() + q.size()};
}

std::vector<double> true_from_recorded(const SequenceCounts& s, Readout readout, const std::vector<double>& q,
                                       const MisassignmentRates& rates, const MisreadContinuation& continuation) {
  const Eigen::MatrixXd M = readout_map(s, readout, rates, continuation);
  if (q.size() != s.cells.size())
    throw DomainError("readout model: " + std::to_string(q.size()) + " values for " +
                      std::to_string(s.cells.size()) + " cells of '" + s.name + "'");
  const Eigen::VectorXd p =
      M.partialPivLu().solve(Eigen::Map<const Eigen::VectorXd>(q.data(), static_cast<Eigen::Index>(q.size())));
  return {p.data(), p.data() + p.size()};
}

CellCounts corrected_counts(const CampaignCounts& layout, const CellCounts& counts, const MisassignmentRates& rates,
                            const MisreadContinuation& continuation) {
  if (counts.size() != layout.sequences.size())
    throw DomainError("readout correction: " + std::to_string(counts.size()) + " count vectors for " +
                      std::to_string(layout.sequences.size()) + " sequences");
  CellCounts out(counts.size());
  for (std::size_t s = 0; s < counts.size(); ++s)
    out[s] = true_from_recorded(layout.sequences[s], layout.readout, counts[s], rates, continuation);
  return out;
}

}  // namespace macroreal
