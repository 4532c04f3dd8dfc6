#include "detection/calibration_file.hpp"

#include <cmath>
#include <fstream>
#include <iterator>
#include <sstream>

#include <nlohmann/json.hpp>

#include "core/error.hpp"
#include "phase_space/number_text.hpp"

namespace macroreal {

namespace {

using json = nlohmann::json;
using ordered_json = nlohmann::ordered_json;
using detail::number_text;

constexpr const char* kFormat = "macroreal-calibration/1";

class Reader {
 public:
  explicit Reader(std::string file) : file_(std::move(file)) {}

  [[noreturn]] void fail(const std::string& path, const std::string& message) const {
    throw InputError(file_, path, message);
  }

  double number(const json& j, const std::string& path) const {
    if (!j.is_number()) fail(path, "must be a number");
    const double v = j.get<double>();
    if (!std::isfinite(v)) fail(path, "must be finite");
    return v;
  }

  // A bare number or {"estimate": x, "ci": [lo, hi], "level": c}.
  double estimate(const json& j, const std::string& path,
                  std::optional<std::pair<double, double>>* ci, double* level) const {
    if (j.is_number()) return number(j, path);
    if (!j.is_object()) fail(path, "must be a number or an {\"estimate\", \"ci\", \"level\"} object");
    if (!j.contains("estimate")) fail(path + ".estimate", "missing");
    const double x = number(j["estimate"], path + ".estimate");
    if (j.contains("ci") && !j["ci"].is_null()) {
      const json& c = j["ci"];
      if (!c.is_array() || c.size() != 2) fail(path + ".ci", "must be [lower, upper]");
      const double lo = number(c[0], path + ".ci[0]"), hi = number(c[1], path + ".ci[1]");
      if (lo > x) fail(path + ".ci", "lower bound " + number_text(lo) + " above the estimate " + number_text(x));
      if (hi < x) fail(path + ".ci", "upper bound " + number_text(hi) + " below the estimate " + number_text(x));
      if (ci) *ci = std::make_pair(lo, hi);
    }
    if (j.contains("level")) {
      const double c = number(j["level"], path + ".level");
      if (!(c > 0 && c < 1)) fail(path + ".level", "= " + number_text(c) + ", but must be in (0, 1)");
      if (level) *level = c;
    }
    return x;
  }

  const std::string& file() const { return file_; }

 private:
  std::string file_;
};

void check_probability(const Reader& r, double v, const std::string& path) {
  if (!(v >= 0 && v <= 1)) r.fail(path, "= " + number_text(v) + ", but must be in [0, 1]");
}

ordered_json estimate_json(double x, const std::optional<std::pair<double, double>>& ci, double level) {
  ordered_json o;
  o["estimate"] = x;
  if (ci) {
    o["ci"] = {ci->first, ci->second};
    o["level"] = level;
  }
  return o;
}

}  // namespace

void validate_calibration(const Calibration& c) {
  auto bad = [](const std::string& what, double v, const std::string& rule) {
    throw DomainError(what + " = " + number_text(v) + ", but " + rule);
  };
  if (!(c.dark_rate >= 0) || !std::isfinite(c.dark_rate)) bad("dark rate", c.dark_rate, "must be >= 0");
  if (!(c.bright_rate > c.dark_rate) || !std::isfinite(c.bright_rate))
    bad("bright rate", c.bright_rate, "must be finite and above the dark rate " + number_text(c.dark_rate));
  if (!(c.threshold >= 0) || !std::isfinite(c.threshold)) bad("threshold", c.threshold, "must be >= 0");
  for (auto [name, v, ci] : {std::tuple{"dark_read_bright", c.dark_read_bright, &c.dark_read_bright_ci},
                             std::tuple{"bright_read_dark", c.bright_read_dark, &c.bright_read_dark_ci}}) {
    if (!(v >= 0 && v <= 1)) bad(name, v, "must be in [0, 1]");
    if (*ci) {
      const auto [lo, hi] = **ci;
      if (!(lo >= 0 && lo <= v)) bad(std::string(name) + " interval lower bound", lo, "must be in [0, estimate]");
      if (!(hi >= v && hi <= 1)) bad(std::string(name) + " interval upper bound", hi, "must be in [estimate, 1]");
    }
  }
  if (!(c.ci_level > 0 && c.ci_level < 1)) bad("interval level", c.ci_level, "must be in (0, 1)");
  if (!(c.window_s >= 0) || !std::isfinite(c.window_s)) bad("window_s", c.window_s, "must be >= 0");
  if (c.dark_lifetime_s && !(*c.dark_lifetime_s > 0 && std::isfinite(*c.dark_lifetime_s)))
    bad("dark_lifetime_s", *c.dark_lifetime_s, "must be > 0");
  if (c.dark_lifetime_s && c.window_s <= 0)
    throw DomainError("dark_lifetime_s is given but window_s is not: the decay model needs the window length");
  if (c.shots < 0) bad("shots", static_cast<double>(c.shots), "must be >= 0");
}

Calibration parse_calibration_text(const std::string& text, const std::string& file_label) {
  Reader r(file_label);
  json doc;
  try {
    doc = json::parse(text);
  } catch (const json::parse_error& e) {
    r.fail("", std::string("not valid JSON (") + e.what() + ")");
  }
  if (!doc.is_object()) r.fail("", "must be a JSON object");
  if (!doc.contains("format")) r.fail("format", std::string("missing (expected \"") + kFormat + "\")");
  if (!doc["format"].is_string() || doc["format"].get<std::string>() != kFormat)
    r.fail("format", std::string("must be \"") + kFormat + "\"");

  Calibration c;
  if (!doc.contains("rates") || !doc["rates"].is_object()) r.fail("rates", "missing or not an object");
  const json& rates = doc["rates"];
  for (const char* k : {"dark", "bright"})
    if (!rates.contains(k)) r.fail(std::string("rates.") + k, "missing");
  c.dark_rate = r.estimate(rates["dark"], "rates.dark", nullptr, nullptr);
  c.bright_rate = r.estimate(rates["bright"], "rates.bright", nullptr, nullptr);
  if (c.dark_rate < 0) r.fail("rates.dark", "= " + number_text(c.dark_rate) + ", but must be >= 0");
  if (!(c.bright_rate > c.dark_rate))
    r.fail("rates.bright", "= " + number_text(c.bright_rate) + ", but must be above rates.dark = " +
                               number_text(c.dark_rate));

  if (!doc.contains("threshold")) r.fail("threshold", "missing");
  c.threshold = r.number(doc["threshold"], "threshold");
  if (c.threshold < 0) r.fail("threshold", "= " + number_text(c.threshold) + ", but must be >= 0");

  if (!doc.contains("errors") || !doc["errors"].is_object()) r.fail("errors", "missing or not an object");
  const json& errors = doc["errors"];
  for (const char* k : {"dark_read_bright", "bright_read_dark"})
    if (!errors.contains(k)) r.fail(std::string("errors.") + k, "missing");
  c.dark_read_bright = r.estimate(errors["dark_read_bright"], "errors.dark_read_bright",
                                  &c.dark_read_bright_ci, &c.ci_level);
  c.bright_read_dark = r.estimate(errors["bright_read_dark"], "errors.bright_read_dark",
                                  &c.bright_read_dark_ci, &c.ci_level);
  check_probability(r, c.dark_read_bright, "errors.dark_read_bright");
  check_probability(r, c.bright_read_dark, "errors.bright_read_dark");
  for (auto [name, ci] : {std::pair{"errors.dark_read_bright.ci", &c.dark_read_bright_ci},
                          std::pair{"errors.bright_read_dark.ci", &c.bright_read_dark_ci}})
    if (*ci) {
      check_probability(r, (*ci)->first, std::string(name) + "[0]");
      check_probability(r, (*ci)->second, std::string(name) + "[1]");
    }

  if (doc.contains("window_s") && !doc["window_s"].is_null()) {
    c.window_s = r.number(doc["window_s"], "window_s");
    if (c.window_s < 0) r.fail("window_s", "= " + number_text(c.window_s) + ", but must be >= 0");
  }
  if (doc.contains("decay") && !doc["decay"].is_null()) {
    const json& d = doc["decay"];
    if (!d.is_object()) r.fail("decay", "must be an object or null");
    if (!d.contains("model") || !d["model"].is_string() ||
        d["model"].get<std::string>() != "dark-pumped-to-bright")
      r.fail("decay.model", "must be \"dark-pumped-to-bright\"");
    if (!d.contains("dark_lifetime_s")) r.fail("decay.dark_lifetime_s", "missing");
    const double tau = r.number(d["dark_lifetime_s"], "decay.dark_lifetime_s");
    if (!(tau > 0)) r.fail("decay.dark_lifetime_s", "= " + number_text(tau) + ", but must be > 0");
    if (c.window_s <= 0) r.fail("window_s", "needed (> 0) when a decay model is given");
    c.dark_lifetime_s = tau;
  }
  if (doc.contains("shots") && !doc["shots"].is_null()) {
    if (!doc["shots"].is_number_integer() || doc["shots"].get<long>() < 0)
      r.fail("shots", "must be a non-negative integer");
    c.shots = doc["shots"].get<long>();
  }
  if (doc.contains("source_file") && doc["source_file"].is_string())
    c.source_file = doc["source_file"].get<std::string>();
  return c;
}

Calibration read_calibration(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path, "", "cannot open the calibration file");
  const std::string text{std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
  return parse_calibration_text(text, path);
}

std::string calibration_json(const Calibration& c) {
  validate_calibration(c);
  ordered_json o;
  o["format"] = kFormat;
  o["rates"] = {{"dark", c.dark_rate}, {"bright", c.bright_rate}};
  o["threshold"] = c.threshold;
  o["errors"] = {{"dark_read_bright", estimate_json(c.dark_read_bright, c.dark_read_bright_ci, c.ci_level)},
                 {"bright_read_dark", estimate_json(c.bright_read_dark, c.bright_read_dark_ci, c.ci_level)}};
  o["window_s"] = c.window_s;
  if (c.dark_lifetime_s)
    o["decay"] = {{"model", "dark-pumped-to-bright"}, {"dark_lifetime_s", *c.dark_lifetime_s}};
  else
    o["decay"] = nullptr;
  o["shots"] = c.shots;
  o["source_file"] = c.source_file;
  return o.dump(2) + "\n";
}

void write_calibration(const Calibration& c, const std::string& path) {
  const std::string text = calibration_json(c);
  std::ofstream out(path, std::ios::binary);
  if (!(out << text) || !out.flush()) throw InputError(path, "", "cannot write the calibration file");
}

}  // namespace macroreal
