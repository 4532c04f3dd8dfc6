#include "design/simulated_table_writer.hpp"

#include <cstring>
#include <iomanip>
#include <sstream>

#include "core/error.hpp"

namespace macroreal {

namespace {

// Decimal digits of v written backwards ending at `end`; returns the first character.
inline char* digits_backwards(char* end, std::uint64_t v) {
  do {
    *--end = static_cast<char>('0' + v % 10);
    v /= 10;
  } while (v != 0);
  return end;
}

constexpr std::size_t kRowReserve = 96 + 12 * kMaxSimulatedSteps;  // longest counts row tail

}  // namespace

std::uint64_t fnv1a64(std::string_view bytes) {
  std::uint64_t h = 14695981039346656037ULL;
  for (unsigned char c : bytes) {
    h ^= c;
    h *= 1099511628211ULL;
  }
  return h;
}

std::vector<std::string> simulated_table_comments(const SimulationPlan& plan,
                                                  const SimulatedTableContext& context) {
  std::vector<std::string> c;
  c.push_back("invented data: simulated by macroreal from the model of " +
              context.protocol_label);
  if (!context.command.empty()) c.push_back("command: " + context.command);
  std::ostringstream sum;
  sum << std::hex << std::setw(16) << std::setfill('0') << context.protocol_checksum;
  c.push_back("protocol: " + context.protocol_label + " (FNV-1a 64 of its bytes: " + sum.str() +
              ")");
  c.push_back("seed: " + std::to_string(plan.seed) + " (row r uses mt19937_64 seeded with "
              "derive_seed(seed, r / " + std::to_string(kRowsPerStream) + "))");
  std::string shots = "shots:";
  for (const auto& s : plan.sequences) shots += " " + s.name + "=" + std::to_string(s.shots);
  c.push_back(shots + " (total " + std::to_string(plan.total_shots) + ")");
  if (!context.detection_source.empty())
    c.push_back("detection model from: " + context.detection_source);
  for (const auto& a : simulation_assumptions(plan)) c.push_back("assumption: " + a);
  if (plan.counts) {
    std::ostringstream t;
    t << plan.counts->threshold;
    c.push_back("to analyse: counts <= " + t.str() +
                " read dark (give the threshold if the protocol has none)");
  }
  return c;
}

SimulatedTableWriter::SimulatedTableWriter(std::FILE* out, std::string label,
                                           const SimulationPlan& plan,
                                           const std::vector<std::string>& comments,
                                           std::size_t buffer_bytes)
    : out_(out), label_(std::move(label)) {
  buffer_.resize(std::max(buffer_bytes, std::size_t{4096}));
  start(plan, comments);
}

SimulatedTableWriter::SimulatedTableWriter(std::string* text, const SimulationPlan& plan,
                                           const std::vector<std::string>& comments)
    : text_(text), label_("<text>") {
  buffer_.resize(std::size_t{1} << 16);
  start(plan, comments);
}

void SimulatedTableWriter::start(const SimulationPlan& plan,
                                 const std::vector<std::string>& comments) {
  max_steps_ = plan.max_steps;
  for (const auto& line : comments) {
    put("# ");
    put(line);
    put("\n");
  }
  put("sequence,shot,time_s");
  for (int k = 1; k <= max_steps_; ++k) put(",r" + std::to_string(k));
  put("\n");
  for (const auto& s : plan.sequences) {
    prefix_.push_back(s.name + ",");
    std::vector<std::string> tails;
    for (const auto& p : s.patterns) {
      std::string t;
      for (int k = 0; k < max_steps_; ++k) {
        t += ',';
        if (k < p.length) t += ((p.bright_mask >> k) & 1u) ? "bright" : "dark";
      }
      t += '\n';
      tails.push_back(std::move(t));
    }
    tails_.push_back(std::move(tails));
  }
}

void SimulatedTableWriter::put(std::string_view s) {
  while (!s.empty()) {
    if (used_ == buffer_.size()) flush();
    const std::size_t n = std::min(s.size(), buffer_.size() - used_);
    std::memcpy(buffer_.data() + used_, s.data(), n);
    used_ += n;
    s.remove_prefix(n);
  }
}

void SimulatedTableWriter::flush() {
  if (used_ == 0) return;
  if (text_) {
    text_->append(buffer_.data(), used_);
  } else if (std::fwrite(buffer_.data(), 1, used_, out_) != used_) {
    used_ = 0;
    throw InputError(label_, "", "cannot write the outcome table");
  }
  used_ = 0;
}

void SimulatedTableWriter::shot(const SimulatedShot& s) {
  const std::string& prefix = prefix_[s.sequence];
  if (buffer_.size() - used_ < kRowReserve + prefix.size()) flush();
  char* w = buffer_.data() + used_;
  std::memcpy(w, prefix.data(), prefix.size());
  w += prefix.size();
  char tmp[24];
  char* end = tmp + sizeof tmp;
  char* b = digits_backwards(end, s.shot);
  std::memcpy(w, b, static_cast<std::size_t>(end - b));
  w += end - b;
  *w++ = ',';
  // time_s from nanoseconds: integer seconds, '.', fraction with trailing zeros trimmed to 3.
  b = digits_backwards(end, s.time_ns / 1000000000u);
  std::memcpy(w, b, static_cast<std::size_t>(end - b));
  w += end - b;
  *w++ = '.';
  std::uint64_t frac = s.time_ns % 1000000000u;
  char f[9];
  for (int i = 8; i >= 0; --i) {
    f[i] = static_cast<char>('0' + frac % 10);
    frac /= 10;
  }
  int keep = 9;
  while (keep > 3 && f[keep - 1] == '0') --keep;
  std::memcpy(w, f, static_cast<std::size_t>(keep));
  w += keep;
  if (s.pattern >= 0) {
    const std::string& tail = tails_[s.sequence][static_cast<std::size_t>(s.pattern)];
    std::memcpy(w, tail.data(), tail.size());
    w += tail.size();
  } else {
    for (int k = 0; k < max_steps_; ++k) {
      *w++ = ',';
      if (k < s.length) {
        b = digits_backwards(end, s.counts[static_cast<std::size_t>(k)]);
        std::memcpy(w, b, static_cast<std::size_t>(end - b));
        w += end - b;
      }
    }
    *w++ = '\n';
  }
  used_ = static_cast<std::size_t>(w - buffer_.data());
}

void SimulatedTableWriter::finish() {
  flush();
  if (out_ && std::fflush(out_) != 0)
    throw InputError(label_, "", "cannot write the outcome table");
}

std::string simulated_table_text(const SimulationPlan& plan,
                                 const std::vector<std::string>& comments) {
  std::string text;
  SimulatedTableWriter w(&text, plan, comments);
  simulate_campaign(plan, w);
  return text;
}

}  // namespace macroreal
