#include "stats/drift_check.hpp"

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <fstream>
#include <istream>
#include <map>
#include <sstream>

#include <boost/math/distributions/chi_squared.hpp>

#include "core/error.hpp"

namespace macroreal {

namespace {

std::vector<std::string> split_commas(const std::string& line) {
  std::vector<std::string> f;
  std::string cur;
  for (char ch : line) {
    if (ch == ',') {
      f.push_back(cur);
      cur.clear();
    } else if (ch != '\r') {
      cur += ch;
    }
  }
  f.push_back(cur);
  return f;
}

// Accumulates the two halves chunk by chunk through the table parser itself, so that the
// rows are interpreted exactly as in the first pass.
class HalfSplitter {
 public:
  HalfSplitter(const std::string& label, const Protocol& protocol,
               const OutcomeTableOptions& options, const OutcomeTableRead& first)
      : label_(label), protocol_(protocol), options_(options) {
    options_.bad_rows = BadRowPolicy::skip;
    for (std::size_t s = 0; s < first.counts.sequences.size(); ++s) {
      const auto& r = first.time_ranges[s];
      if (r.any) mid_[first.counts.sequences[s].name] = 0.5 * (r.first + r.last);
    }
    for (auto& h : halves_) h = empty_counts(protocol);
  }

  bool has_times() const { return !mid_.empty(); }

  void line(const std::string& l) {
    if (l.empty() || l[0] == '#') return;
    if (header_.empty()) {
      header_ = l;
      const auto f = split_commas(l);
      for (std::size_t i = 0; i < f.size(); ++i) {
        if (f[i] == "sequence") seq_col_ = static_cast<long>(i);
        if (f[i] == "time_s") time_col_ = static_cast<long>(i);
      }
      return;
    }
    if (seq_col_ < 0 || time_col_ < 0) return;
    const auto f = split_commas(l);
    if (static_cast<long>(f.size()) <= std::max(seq_col_, time_col_)) return;
    const auto m = mid_.find(f[static_cast<std::size_t>(seq_col_)]);
    if (m == mid_.end()) return;
    const std::string& t = f[static_cast<std::size_t>(time_col_)];
    if (t.empty()) return;
    char* end = nullptr;
    const double x = std::strtod(t.c_str(), &end);
    if (end == t.c_str() || *end != '\0' || !std::isfinite(x)) return;
    std::string& buf = buffer_[x <= m->second ? 0 : 1];
    buf += l;
    buf += '\n';
    if (buf.size() > (std::size_t{4} << 20)) flush(x <= m->second ? 0 : 1);
  }

  void finish() {
    flush(0);
    flush(1);
  }

  DriftCheck result() const {
    DriftCheck d;
    d.checked = true;
    for (std::size_t s = 0; s < halves_[0].sequences.size(); ++s) {
      const auto& a = halves_[0].sequences[s];
      const auto& b = halves_[1].sequences[s];
      const auto m = mid_.find(a.name);
      if (m == mid_.end()) continue;
      SequenceDrift sd;
      sd.name = a.name;
      sd.split_time_s = m->second;
      sd.first_half = a.total();
      sd.second_half = b.total();
      if (sd.first_half <= 0.0 || sd.second_half <= 0.0) {
        sd.note = "one half has no shots";
        d.sequences.push_back(sd);
        continue;
      }
      const double n = sd.first_half + sd.second_half;
      int cols = 0;
      double chi = 0.0;
      for (std::size_t j = 0; j < a.counts.size(); ++j) {
        const double col = a.counts[j] + b.counts[j];
        if (col <= 0.0) continue;
        ++cols;
        const double ea = sd.first_half * col / n, eb = sd.second_half * col / n;
        if (ea < 5.0 || eb < 5.0) sd.small_expected = true;
        chi += (a.counts[j] - ea) * (a.counts[j] - ea) / ea +
               (b.counts[j] - eb) * (b.counts[j] - eb) / eb;
      }
      if (cols < 2) {
        sd.note = "a single outcome cell occurs";
        d.sequences.push_back(sd);
        continue;
      }
      sd.chi_square = chi;
      sd.df = cols - 1;
      sd.p_value = boost::math::cdf(
          boost::math::complement(boost::math::chi_squared_distribution<double>(sd.df), chi));
      d.chi_square += chi;
      d.df += sd.df;
      d.sequences.push_back(sd);
    }
    if (d.df > 0) {
      d.p_value = boost::math::cdf(boost::math::complement(
          boost::math::chi_squared_distribution<double>(d.df), d.chi_square));
    } else {
      d.checked = false;
      d.not_checked = "no sequence has outcomes in both halves of its time span";
    }
    return d;
  }

 private:
  void flush(int h) {
    if (buffer_[h].empty()) return;
    const OutcomeTableRead part =
        parse_outcome_table(header_ + "\n" + buffer_[h], label_, protocol_, options_);
    for (std::size_t s = 0; s < part.counts.sequences.size(); ++s)
      for (std::size_t j = 0; j < part.counts.sequences[s].counts.size(); ++j)
        halves_[h].sequences[s].counts[j] += part.counts.sequences[s].counts[j];
    buffer_[h].clear();
  }

  std::string label_;
  const Protocol& protocol_;
  OutcomeTableOptions options_;
  std::map<std::string, double> mid_;
  std::string header_;
  long seq_col_ = -1, time_col_ = -1;
  std::string buffer_[2];
  CampaignCounts halves_[2];
};

DriftCheck run(std::istream& in, const std::string& label, const Protocol& protocol,
               const OutcomeTableOptions& options, const OutcomeTableRead& first) {
  HalfSplitter split(label, protocol, options, first);
  if (!split.has_times()) return drift_not_checked("the table has no time_s values");
  std::string l;
  while (std::getline(in, l)) split.line(l);
  split.finish();
  return split.result();
}

}  // namespace

DriftCheck drift_not_checked(const std::string& reason) {
  DriftCheck d;
  d.checked = false;
  d.not_checked = reason;
  return d;
}

DriftCheck drift_check_text(const std::string& text, const std::string& file_label,
                            const Protocol& protocol, const OutcomeTableOptions& options,
                            const OutcomeTableRead& first) {
  std::istringstream in(text);
  return run(in, file_label, protocol, options, first);
}

DriftCheck drift_check_file(const std::string& path, const Protocol& protocol,
                            const OutcomeTableOptions& options, const OutcomeTableRead& first) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path, "", "cannot open the outcome table");
  return run(in, path, protocol, options, first);
}

}  // namespace macroreal
