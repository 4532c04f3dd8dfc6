#include "stats/runs_input.hpp"

#include <fstream>
#include <sstream>

#include "core/error.hpp"

namespace macroreal {

namespace {

nlohmann::json parse_json_text(const std::string& text, const std::string& label) {
  try {
    return nlohmann::json::parse(text);
  } catch (const nlohmann::json::parse_error& e) {
    // Line and column of the byte where parsing stopped.
    std::size_t line = 1, col = 1;
    for (std::size_t i = 0; i + 1 < e.byte && i < text.size(); ++i) {
      if (text[i] == '\n') {
        ++line;
        col = 1;
      } else {
        ++col;
      }
    }
    throw InputError(label, "line " + std::to_string(line) + ", column " + std::to_string(col),
                     "not valid JSON (a counts file must be one JSON object)");
  }
}

std::string slurp(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path, "", "cannot open the runs file");
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

}  // namespace

std::string to_string(RunsFormat f) { return f == RunsFormat::counts ? "counts JSON" : "outcome table"; }

RunsFormat detect_runs_format(const std::string& name, const std::string& head, bool force_counts) {
  if (force_counts) return RunsFormat::counts;
  if (name.size() >= 5 && name.compare(name.size() - 5, 5, ".json") == 0) return RunsFormat::counts;
  for (char ch : head) {
    if (ch == ' ' || ch == '\t' || ch == '\r' || ch == '\n') continue;
    return ch == '{' ? RunsFormat::counts : RunsFormat::table;
  }
  return RunsFormat::table;
}

RunsInput read_runs_file(const std::string& path, const Protocol& protocol,
                         const OutcomeTableOptions& options, bool force_counts) {
  std::string head;
  {
    std::ifstream in(path, std::ios::binary);
    if (!in) throw InputError(path, "", "cannot open the runs file");
    head.resize(4096);
    in.read(head.data(), static_cast<std::streamsize>(head.size()));
    head.resize(static_cast<std::size_t>(in.gcount()));
  }
  RunsInput r;
  r.format = detect_runs_format(path, head, force_counts);
  if (r.format == RunsFormat::counts) {
    r.read = parse_counts_json(parse_json_text(slurp(path), path), path, protocol, options);
    r.drift = drift_not_checked("counts JSON carries no per-shot times");
  } else {
    r.read = read_outcome_table(path, protocol, options);
    r.drift = drift_check_file(path, protocol, options, r.read);
  }
  return r;
}

RunsInput parse_runs_text(const std::string& text, const std::string& label, const Protocol& protocol,
                          const OutcomeTableOptions& options, bool force_counts) {
  RunsInput r;
  r.format = detect_runs_format(label, text.substr(0, 4096), force_counts);
  if (r.format == RunsFormat::counts) {
    r.read = parse_counts_json(parse_json_text(text, label), label, protocol, options);
    r.drift = drift_not_checked("counts JSON carries no per-shot times");
  } else {
    r.read = parse_outcome_table(text, label, protocol, options);
    r.drift = drift_check_text(text, label, protocol, options, r.read);
  }
  return r;
}

}  // namespace macroreal
