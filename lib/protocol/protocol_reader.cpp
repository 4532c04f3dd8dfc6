#include "protocol/protocol_reader.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <initializer_list>
#include <iterator>

#include "core/error.hpp"
#include "core/types.hpp"
#include "fock/density_matrix_state.hpp"
#include "phase_space/number_text.hpp"
#include "phase_space/prepared_state.hpp"

namespace macroreal {

namespace {

using json = nlohmann::json;

constexpr const char* kFormat = "macroreal-protocol/1";

std::string child(const std::string& path, const std::string& key) {
  return path.empty() ? key : path + "." + key;
}

std::string element(const std::string& path, std::size_t i) {
  return path + "[" + std::to_string(i) + "]";
}

// A value as it is written in JSON, for messages ("1.2", "\"abc\"").
std::string shown(const json& j) {
  std::string s = j.dump();
  if (s.size() > 60) s = s.substr(0, 57) + "...";
  return s;
}

std::string shown(double x) { return detail::number_text(x); }

std::string joined(const std::vector<std::string>& names) {
  std::string s;
  for (std::size_t i = 0; i < names.size(); ++i) s += (i ? ", " : "") + names[i];
  return s;
}

// The reader's context: the file label for every error, and small checked accessors.
class Reader {
 public:
  Reader(std::string file, std::string base_dir)
      : file_(std::move(file)), base_dir_(std::move(base_dir)) {}

  [[noreturn]] void fail(const std::string& path, const std::string& message) const {
    throw InputError(file_, path, message);
  }

  const std::string& file() const { return file_; }
  // Folder against which relative file names inside the protocol are resolved.
  const std::string& base_dir() const { return base_dir_; }

  // `j` must be an object whose keys are all in `allowed`.
  void expect_object(const json& j, const std::string& path,
                     std::initializer_list<const char*> allowed) const {
    if (!j.is_object())
      fail(path, "expected an object, got " + std::string(j.type_name()) + " " + shown(j));
    std::vector<std::string> names(allowed.begin(), allowed.end());
    for (auto it = j.begin(); it != j.end(); ++it) {
      if (std::find(names.begin(), names.end(), it.key()) == names.end())
        fail(child(path, it.key()),
             "unknown field '" + it.key() + "' (allowed here: " + joined(names) + ")");
    }
  }

  const json& required(const json& obj, const std::string& key, const std::string& path) const {
    const auto it = obj.find(key);
    if (it == obj.end()) fail(child(path, key), "required field '" + key + "' is missing");
    return *it;
  }

  static const json* optional(const json& obj, const std::string& key) {
    const auto it = obj.find(key);
    return it == obj.end() ? nullptr : &*it;
  }

  double number(const json& j, const std::string& path, const std::string& what) const {
    if (!j.is_number())
      fail(path, what + " must be a number, got " + std::string(j.type_name()) + " " + shown(j));
    const double x = j.get<double>();
    if (!std::isfinite(x)) fail(path, what + " = " + shown(j) + ", but must be finite");
    return x;
  }

  double number_field(const json& obj, const std::string& key, const std::string& path) const {
    return number(required(obj, key, path), child(path, key), key);
  }

  double number_or(const json& obj, const std::string& key, const std::string& path,
                   double fallback) const {
    const json* j = optional(obj, key);
    return j ? number(*j, child(path, key), key) : fallback;
  }

  double nonnegative(double x, const std::string& path, const std::string& what) const {
    if (!(x >= 0.0)) fail(path, what + " = " + shown(x) + ", but must be >= 0");
    return x;
  }

  double unit_interval(double x, const std::string& path, const std::string& what) const {
    if (!(x >= 0.0 && x <= 1.0)) fail(path, what + " = " + shown(x) + ", but must be in [0, 1]");
    return x;
  }

  int integer(const json& j, const std::string& path, const std::string& what, long lo,
              long hi) const {
    if (!j.is_number_integer())
      fail(path, what + " must be an integer, got " + std::string(j.type_name()) + " " + shown(j));
    const long v = j.is_number_unsigned() ? static_cast<long>(std::min<std::uint64_t>(
                                                j.get<std::uint64_t>(), 1ull << 62))
                                          : j.get<long>();
    if (v < lo || v > hi)
      fail(path, what + " = " + shown(j) + ", but must be in [" + std::to_string(lo) + ", " +
                     std::to_string(hi) + "]");
    return static_cast<int>(v);
  }

  std::string string(const json& j, const std::string& path, const std::string& what) const {
    if (!j.is_string())
      fail(path, what + " must be a string, got " + std::string(j.type_name()) + " " + shown(j));
    return j.get<std::string>();
  }

  const json& array(const json& j, const std::string& path, const std::string& what) const {
    if (!j.is_array())
      fail(path, what + " must be an array, got " + std::string(j.type_name()) + " " + shown(j));
    return j;
  }

  // [re, im]
  cplx complex_pair(const json& j, const std::string& path, const std::string& what) const {
    if (!j.is_array() || j.size() != 2)
      fail(path, what + " must be a pair [re, im] of numbers, got " + shown(j));
    return {number(j[0], element(path, 0), what + "[0]"),
            number(j[1], element(path, 1), what + "[1]")};
  }

  // A real number or [re, im].
  cplx complex_value(const json& j, const std::string& path, const std::string& what) const {
    if (j.is_number()) return {number(j, path, what), 0.0};
    if (j.is_array()) return complex_pair(j, path, what);
    fail(path, what + " must be a number or a pair [re, im], got " + std::string(j.type_name()) +
                   " " + shown(j));
  }

  // "+" / "-" for one sign.
  int sign(const json& j, const std::string& path, const std::string& what) const {
    if (j.is_string()) {
      const auto s = j.get<std::string>();
      if (s == "+") return +1;
      if (s == "-") return -1;
    }
    fail(path, what + " = " + shown(j) + ", but must be \"+\" or \"-\"");
  }

  // Runs a factory from lib/phase_space and turns its DomainError into an error at `path`.
  template <class F>
  auto checked(const std::string& path, F&& make) const {
    try {
      return make();
    } catch (const DomainError& e) {
      fail(path, e.what());
    }
  }

 private:
  std::string file_;
  std::string base_dir_;
};

// One modular measurement; `with_time` for the "measurements" map (prepared steps have none).
MeasurementSpec parse_measurement(const Reader& r, const json& j, const std::string& path,
                                  const std::string& name, bool with_time) {
  if (with_time)
    r.expect_object(j, path, {"beta", "beta_polar", "phase_deg", "split", "contrast", "time_s",
                               "duration_s"});
  else
    r.expect_object(j, path, {"beta", "beta_polar", "phase_deg", "split", "contrast"});
  MeasurementSpec spec;
  spec.name = name;
  ModularMeasurement& m = spec.measurement;

  const json* beta = Reader::optional(j, "beta");
  const json* polar = Reader::optional(j, "beta_polar");
  if (beta && polar)
    r.fail(child(path, "beta"),
           "both beta and beta_polar are given, but exactly one of them must be");
  if (!beta && !polar)
    r.fail(child(path, "beta"),
           "neither beta nor beta_polar is given, but exactly one of them must be");
  if (beta) {
    m.beta = r.complex_pair(*beta, child(path, "beta"), "beta");
  } else {
    const std::string p = child(path, "beta_polar");
    if (!polar->is_array() || polar->size() != 2)
      r.fail(p, "beta_polar must be a pair [modulus, angle_deg] of numbers, got " + shown(*polar));
    const double modulus = r.number((*polar)[0], element(p, 0), "beta_polar modulus");
    r.nonnegative(modulus, element(p, 0), "beta_polar modulus");
    const double angle = r.number((*polar)[1], element(p, 1), "beta_polar angle_deg");
    m.beta = std::polar(modulus, angle * kDegree);
  }
  m.phase_rad = r.number_or(j, "phase_deg", path, 0.0) * kDegree;
  if (const json* s = Reader::optional(j, "split")) {
    const std::string text = r.string(*s, child(path, "split"), "split");
    if (text == "symmetric")
      m.split = Split::symmetric;
    else if (text == "one-sided")
      m.split = Split::one_sided;
    else
      r.fail(child(path, "split"),
             "split = " + shown(*s) + ", but must be \"symmetric\" or \"one-sided\"");
  }
  m.contrast = r.unit_interval(r.number_or(j, "contrast", path, 1.0), child(path, "contrast"),
                               "contrast");
  if (with_time)
    spec.time_s =
        r.nonnegative(r.number_or(j, "time_s", path, 0.0), child(path, "time_s"), "time_s");
  if (with_time)
    spec.duration_s = r.nonnegative(r.number_or(j, "duration_s", path, 0.0),
                                    child(path, "duration_s"), "duration_s");
  return spec;
}

OutcomeString parse_outcome_string(const Reader& r, const json& j, const std::string& path,
                                   std::size_t expected_length) {
  const std::string s = r.string(j, path, "outcomes");
  OutcomeString o;
  for (std::size_t k = 0; k < s.size(); ++k) {
    if (s[k] == '+')
      o.push_back(+1);
    else if (s[k] == '-')
      o.push_back(-1);
    else
      r.fail(path, "outcomes = " + shown(j) + ", but every character must be '+' or '-' (" +
                       "character " + std::to_string(k + 1) + " is not)");
  }
  if (o.size() != expected_length)
    r.fail(path, "outcomes = " + shown(j) + " has " + std::to_string(o.size()) +
                     " signs, but steps has " + std::to_string(expected_length) +
                     " measurements; give one sign per step");
  return o;
}

StatePtr parse_state_impl(const Reader& r, const json& j, const std::string& path);

PureComponent parse_pure_component(const Reader& r, const json& j, const std::string& path) {
  r.expect_object(j, path, {"amplitude", "coherent", "fock"});
  PureComponent c{};
  c.amplitude = r.complex_value(r.required(j, "amplitude", path), child(path, "amplitude"),
                                "amplitude");
  const json* coh = Reader::optional(j, "coherent");
  const json* fock = Reader::optional(j, "fock");
  if (coh && fock)
    r.fail(child(path, "coherent"),
           "both coherent and fock are given, but a component is exactly one of them");
  if (!coh && !fock)
    r.fail(child(path, "coherent"),
           "neither coherent nor fock is given, but a component must be one of them");
  if (coh) {
    c.kind = PureComponent::Kind::coherent;
    c.alpha = r.complex_pair(*coh, child(path, "coherent"), "coherent");
  } else {
    c.kind = PureComponent::Kind::fock;
    c.n = r.integer(*fock, child(path, "fock"), "fock", 0, 2000);
  }
  return c;
}

StatePtr parse_state_impl(const Reader& r, const json& j, const std::string& path) {
  if (!j.is_object())
    r.fail(path, "a state must be an object, got " + std::string(j.type_name()) + " " + shown(j));
  const std::string kind = r.string(r.required(j, "kind", path), child(path, "kind"), "kind");

  if (kind == "thermal") {
    r.expect_object(j, path, {"kind", "nbar"});
    const double nbar =
        r.nonnegative(r.number_field(j, "nbar", path), child(path, "nbar"), "nbar");
    return r.checked(path, [&] { return make_thermal(nbar); });
  }
  if (kind == "coherent") {
    r.expect_object(j, path, {"kind", "alpha"});
    const cplx alpha = r.complex_pair(r.required(j, "alpha", path), child(path, "alpha"), "alpha");
    return r.checked(path, [&] { return make_coherent(alpha); });
  }
  if (kind == "squeezed") {
    r.expect_object(j, path, {"kind", "r", "theta_deg", "nbar", "alpha"});
    const double sq = r.nonnegative(r.number_field(j, "r", path), child(path, "r"), "r");
    const double theta = r.number_or(j, "theta_deg", path, 0.0) * kDegree;
    const double nbar =
        r.nonnegative(r.number_or(j, "nbar", path, 0.0), child(path, "nbar"), "nbar");
    cplx alpha = 0.0;
    if (const json* a = Reader::optional(j, "alpha"))
      alpha = r.complex_pair(*a, child(path, "alpha"), "alpha");
    return r.checked(path, [&] { return make_squeezed(sq, theta, nbar, alpha); });
  }
  if (kind == "fock") {
    r.expect_object(j, path, {"kind", "n"});
    const int n = r.integer(r.required(j, "n", path), child(path, "n"), "n", 0, 2000);
    return r.checked(path, [&] { return make_fock(n); });
  }
  if (kind == "cat") {
    r.expect_object(j, path, {"kind", "alpha", "relative_phase_deg"});
    const cplx alpha =
        r.complex_value(r.required(j, "alpha", path), child(path, "alpha"), "alpha");
    const double phase = r.number_or(j, "relative_phase_deg", path, 0.0) * kDegree;
    return r.checked(path, [&] { return make_cat(alpha, phase); });
  }
  if (kind == "superposition") {
    r.expect_object(j, path, {"kind", "components"});
    const std::string p = child(path, "components");
    const json& comps = r.array(r.required(j, "components", path), p, "components");
    if (comps.empty()) r.fail(p, "components is empty, but a superposition needs at least one");
    std::vector<PureComponent> parts;
    for (std::size_t i = 0; i < comps.size(); ++i)
      parts.push_back(parse_pure_component(r, comps[i], element(p, i)));
    return r.checked(path, [&] { return make_superposition(std::move(parts)); });
  }
  if (kind == "mixture") {
    r.expect_object(j, path, {"kind", "components"});
    const std::string p = child(path, "components");
    const json& comps = r.array(r.required(j, "components", path), p, "components");
    if (comps.empty()) r.fail(p, "components is empty, but a mixture needs at least one");
    std::vector<std::pair<double, StatePtr>> parts;
    double total = 0.0;
    for (std::size_t i = 0; i < comps.size(); ++i) {
      const std::string pi = element(p, i);
      r.expect_object(comps[i], pi, {"weight", "state"});
      const double w =
          r.nonnegative(r.number_field(comps[i], "weight", pi), child(pi, "weight"), "weight");
      total += w;
      parts.emplace_back(w, parse_state_impl(r, r.required(comps[i], "state", pi),
                                             child(pi, "state")));
    }
    if (!(total > 0.0)) r.fail(p, "the weights sum to 0, but must have a positive sum");
    return r.checked(path, [&] { return make_mixture(std::move(parts)); });
  }
  if (kind == "prepared") {
    r.expect_object(j, path, {"kind", "from", "steps", "outcomes"});
    StatePtr from = parse_state_impl(r, r.required(j, "from", path), child(path, "from"));
    const std::string p = child(path, "steps");
    const json& steps = r.array(r.required(j, "steps", path), p, "steps");
    if (steps.empty()) r.fail(p, "steps is empty, but a prepared state needs at least one");
    std::vector<ModularMeasurement> ms;
    for (std::size_t i = 0; i < steps.size(); ++i)
      ms.push_back(parse_measurement(r, steps[i], element(p, i), "", false).measurement);
    OutcomeString outcomes = parse_outcome_string(r, r.required(j, "outcomes", path),
                                                  child(path, "outcomes"), ms.size());
    return r.checked(path, [&] {
      return make_prepared(std::move(from), std::move(ms), std::move(outcomes));
    });
  }
  if (kind == "density_matrix") {
    r.expect_object(j, path, {"kind", "file"});
    const std::string pf = child(path, "file");
    const std::string f = r.string(r.required(j, "file", path), pf, "file");
    if (f.empty()) r.fail(pf, "file is empty, but must name a density-matrix file (.json or .csv)");
    // Relative names are relative to the protocol file's folder, so a protocol and its
    // tabulated state can be moved together.
    std::filesystem::path resolved(f);
    if (resolved.is_relative() && !r.base_dir().empty())
      resolved = std::filesystem::path(r.base_dir()) / resolved;
    try {
      return read_density_matrix(resolved.string());
    } catch (const InputError& e) {
      // Keep the matrix file's own message (its path, line or field, and the Hermiticity,
      // trace or smallest-eigenvalue figure) and say where in the protocol it was named.
      r.fail(pf, "density matrix file " + shown(json(f)) + " is not usable: " + e.what());
    }
  }
  r.fail(child(path, "kind"),
         "kind = " + shown(json(kind)) +
             ", but must be one of thermal, coherent, squeezed, fock, cat, superposition, "
             "mixture, prepared, density_matrix");
}

bool valid_measurement_name(const std::string& s) {
  if (s.empty()) return false;
  return std::all_of(s.begin(), s.end(), [](unsigned char ch) {
    return std::isalnum(ch) != 0 || ch == '_';
  });
}

// One noise field: a number, {"mean": m, "sd": s} or {"range": [lo, hi]}. Returns the value
// the NoiseModel keeps (the mean or the midpoint) and records any uncertainty.
double parse_noise_value(const Reader& r, const json& j, const std::string& path,
                         const std::string& key, std::vector<UncertainValue>& uncertain) {
  if (j.is_number()) return r.nonnegative(r.number(j, path, key), path, key);
  if (!j.is_object())
    r.fail(path, key + " must be a number, {\"mean\": m, \"sd\": s} or " +
                     "{\"range\": [lo, hi]}, got " + std::string(j.type_name()) + " " + shown(j));
  UncertainValue u;
  u.field = key;
  if (j.contains("range")) {
    r.expect_object(j, path, {"range"});
    const std::string pr = child(path, "range");
    const json& range = j.at("range");
    if (!range.is_array() || range.size() != 2)
      r.fail(pr, "range must be a pair [lo, hi] of numbers, got " + shown(range));
    const double lo = r.nonnegative(r.number(range[0], element(pr, 0), key + " range lo"),
                                    element(pr, 0), key + " range lo");
    const double hi = r.nonnegative(r.number(range[1], element(pr, 1), key + " range hi"),
                                    element(pr, 1), key + " range hi");
    if (lo > hi)
      r.fail(pr, key + " range lo = " + shown(lo) + " is above hi = " + shown(hi) +
                     ", but must be <= hi");
    u.low = lo;
    u.high = hi;
    u.mean = 0.5 * (lo + hi);
  } else {
    r.expect_object(j, path, {"mean", "sd"});
    u.mean = r.nonnegative(r.number_field(j, "mean", path), child(path, "mean"), key + " mean");
    u.sd = r.nonnegative(r.number_field(j, "sd", path), child(path, "sd"), key + " sd");
  }
  uncertain.push_back(u);
  return u.mean;
}

NoiseModel parse_noise(const Reader& r, const json& j, const std::string& path,
                       std::vector<UncertainValue>& uncertain) {
  r.expect_object(j, path,
                  {"heating_quanta_per_s", "damping_rate_per_s", "bath_nbar",
                   "dephasing_rate_per_s", "frequency_noise_sd_rad_per_s",
                   "force_noise_quanta_per_s"});
  NoiseModel n;
  for (const auto& key : noise_field_names())
    if (const json* v = Reader::optional(j, key))
      noise_field(n, key) = parse_noise_value(r, *v, child(path, key), key, uncertain);
  return n;
}

DetectionSpec parse_detection(const Reader& r, const json& j, const std::string& path) {
  r.expect_object(j, path, {"dark_read_bright", "bright_read_dark", "threshold"});
  DetectionSpec d;
  d.dark_read_bright = r.unit_interval(r.number_or(j, "dark_read_bright", path, 0.0),
                                       child(path, "dark_read_bright"), "dark_read_bright");
  d.bright_read_dark = r.unit_interval(r.number_or(j, "bright_read_dark", path, 0.0),
                                       child(path, "bright_read_dark"), "bright_read_dark");
  if (const json* t = Reader::optional(j, "threshold"))
    d.threshold = r.nonnegative(r.number(*t, child(path, "threshold"), "threshold"),
                                child(path, "threshold"), "threshold");
  return d;
}

// A list of measurement names (sequence steps, LG order) that must be defined and whose
// times must not decrease.
std::vector<std::string> parse_step_names(const Reader& r, const Protocol& proto, const json& j,
                                          const std::string& path, const std::string& what) {
  r.array(j, path, what);
  std::vector<std::string> names;
  for (std::size_t i = 0; i < j.size(); ++i) {
    const std::string pi = element(path, i);
    const std::string name = r.string(j[i], pi, what + " entry");
    const auto it = proto.measurements.find(name);
    if (it == proto.measurements.end()) {
      std::vector<std::string> defined;
      for (const auto& [k, v] : proto.measurements) defined.push_back(k);
      r.fail(pi, "measurement '" + name + "' is not defined (defined in measurements: " +
                     joined(defined) + ")");
    }
    if (!names.empty()) {
      const auto& prev = proto.measurements.at(names.back());
      if (it->second.time_s < prev.time_s)
        r.fail(pi, "time_s of '" + name + "' = " + shown(it->second.time_s) +
                       " is earlier than time_s of '" + prev.name + "' = " +
                       shown(prev.time_s) + " before it, but times must not decrease along a " +
                       what);
    }
    if (std::find(names.begin(), names.end(), name) != names.end())
      r.fail(pi, "measurement '" + name + "' appears twice, but each step of a " + what +
                     " must be a different measurement");
    names.push_back(name);
  }
  return names;
}

SequenceSpec parse_sequence(const Reader& r, const Protocol& proto, const json& j,
                            const std::string& path) {
  r.expect_object(j, path, {"name", "steps", "dark_is"});
  SequenceSpec s;
  s.name = r.string(r.required(j, "name", path), child(path, "name"), "name");
  if (s.name.empty()) r.fail(child(path, "name"), "name is empty, but must be a non-empty string");
  s.steps = parse_step_names(r, proto, r.required(j, "steps", path), child(path, "steps"),
                             "sequence");
  if (s.steps.empty())
    r.fail(child(path, "steps"), "steps is empty, but a sequence needs at least one step");
  const std::string pd = child(path, "dark_is");
  const json& dark = r.array(r.required(j, "dark_is", path), pd, "dark_is");
  if (dark.size() != s.steps.size())
    r.fail(pd, "dark_is has " + std::to_string(dark.size()) + " entries, but steps has " +
                   std::to_string(s.steps.size()) + "; give one sign per step");
  for (std::size_t i = 0; i < dark.size(); ++i)
    s.dark_is.push_back(r.sign(dark[i], element(pd, i), "dark_is"));
  return s;
}

TestSpec parse_test(const Reader& r, const Protocol& proto, const json& j,
                    const std::string& path) {
  if (!j.is_object())
    r.fail(path, "a test must be an object, got " + std::string(j.type_name()) + " " + shown(j));
  const std::string kind = r.string(r.required(j, "kind", path), child(path, "kind"), "kind");
  TestSpec t;
  if (kind == "leggett-garg") {
    r.expect_object(j, path, {"kind", "order"});
    t.kind = TestSpec::Kind::leggett_garg;
    t.order = parse_step_names(r, proto, r.required(j, "order", path), child(path, "order"),
                               "Leggett-Garg order");
    if (t.order.size() < 3)
      r.fail(child(path, "order"), "order names " + std::to_string(t.order.size()) +
                                       " measurements, but a Leggett-Garg test needs at least 3");
    return t;
  }
  if (kind == "nsit") {
    r.expect_object(j, path, {"kind", "from", "to", "margin"});
    t.kind = TestSpec::Kind::nsit;
    for (const char* key : {"from", "to"}) {
      const std::string name = r.string(r.required(j, key, path), child(path, key), key);
      if (!proto.measurements.count(name)) {
        std::vector<std::string> defined;
        for (const auto& [k, v] : proto.measurements) defined.push_back(k);
        r.fail(child(path, key), "measurement '" + name +
                                     "' is not defined (defined in measurements: " +
                                     joined(defined) + ")");
      }
    }
    t.from = j.at("from").get<std::string>();
    t.to = j.at("to").get<std::string>();
    if (t.from == t.to)
      r.fail(child(path, "to"), "to = '" + t.to + "' is the same as from, but NSIT compares " +
                                    "two different measurements");
    const double tf = proto.measurements.at(t.from).time_s;
    const double tt = proto.measurements.at(t.to).time_s;
    if (tt < tf)
      r.fail(child(path, "to"), "time_s of '" + t.to + "' = " + shown(tt) +
                                    " is earlier than time_s of '" + t.from + "' = " + shown(tf) +
                                    ", but 'to' must not come before 'from'");
    if (const json* m = Reader::optional(j, "margin"))
      t.margin = r.nonnegative(r.number(*m, child(path, "margin"), "margin"),
                               child(path, "margin"), "margin");
    return t;
  }
  r.fail(child(path, "kind"),
         "kind = " + shown(json(kind)) + ", but must be \"leggett-garg\" or \"nsit\"");
}

// Under destructive readout a sequence covers the same outcomes whatever the final dark sign
// is; under nondestructive readout every step runs on every shot, so dark_is does not matter.
bool same_run(const SequenceSpec& a, const std::vector<std::string>& steps,
              const std::vector<int>& dark_is, Readout readout) {
  if (a.steps != steps) return false;
  if (readout == Readout::nondestructive) return true;
  for (std::size_t k = 0; k + 1 < steps.size(); ++k)
    if (a.dark_is[k] != dark_is[k]) return false;
  return true;
}

void add_generated_sequences(const Reader& r, Protocol& proto) {
  const std::size_t listed = proto.sequences.size();
  for (const auto& steps : proto.step_sets_needed()) {
    for (const auto& dark : dark_patterns(steps.size(), proto.readout)) {
      const bool covered = std::any_of(proto.sequences.begin(), proto.sequences.end(),
                                       [&](const SequenceSpec& s) {
                                         return same_run(s, steps, dark, proto.readout);
                                       });
      if (covered) continue;
      SequenceSpec s;
      s.name = generated_sequence_name(steps, dark, proto.readout);
      s.steps = steps;
      s.dark_is = dark;
      s.generated = true;
      for (std::size_t i = 0; i < listed; ++i)
        if (proto.sequences[i].name == s.name)
          r.fail(element("sequences", i) + ".name",
                 "name '" + s.name + "' is reserved for the generated sequence of steps " +
                     joined(steps) + " that a test needs, but this sequence has other steps " +
                     "or signs; rename it");
      proto.sequences.push_back(std::move(s));
    }
  }
}

}  // namespace

StatePtr parse_state(const nlohmann::json& j, const std::string& file_label,
                     const std::string& path, const std::string& base_dir) {
  return parse_state_impl(Reader(file_label, base_dir), j, path);
}

Protocol parse_protocol(const nlohmann::json& doc, const std::string& file_label,
                        const ProtocolReadOptions& options) {
  const Reader r(file_label, options.base_dir);
  r.expect_object(doc, "", {"format", "title", "state", "readout", "measurements", "noise",
                            "detection", "sequences", "tests"});
  Protocol proto;
  proto.file = file_label;

  const std::string format = r.string(r.required(doc, "format", ""), "format", "format");
  if (format != kFormat)
    r.fail("format", "format = " + shown(json(format)) + ", but must be \"" + kFormat + "\"");
  if (const json* t = Reader::optional(doc, "title")) proto.title = r.string(*t, "title", "title");

  if (const json* s = Reader::optional(doc, "readout")) {
    const std::string text = r.string(*s, "readout", "readout");
    if (text == "destructive")
      proto.readout = Readout::destructive;
    else if (text == "nondestructive")
      proto.readout = Readout::nondestructive;
    else
      r.fail("readout",
             "readout = " + shown(*s) + ", but must be \"destructive\" or \"nondestructive\"");
  }

  const json& ms = r.required(doc, "measurements", "");
  if (!ms.is_object())
    r.fail("measurements", "measurements must be an object of named measurements, got " +
                               std::string(ms.type_name()) + " " + shown(ms));
  if (ms.empty()) r.fail("measurements", "measurements is empty, but needs at least one");
  for (auto it = ms.begin(); it != ms.end(); ++it) {
    const std::string path = child("measurements", it.key());
    if (!valid_measurement_name(it.key()))
      r.fail(path, "measurement name '" + it.key() +
                       "' must be non-empty and consist of letters, digits and '_' only");
    proto.measurements.emplace(it.key(), parse_measurement(r, it.value(), path, it.key(), true));
  }

  if (const json* n = Reader::optional(doc, "noise"))
    proto.noise = parse_noise(r, *n, "noise", proto.uncertain_noise);
  if (const json* d = Reader::optional(doc, "detection"))
    proto.detection = parse_detection(r, *d, "detection");

  if (const json* s = Reader::optional(doc, "state")) {
    proto.state_json = *s;
    proto.state = parse_state_impl(r, *s, "state");
  } else if (options.require_state) {
    r.fail("state", "required field 'state' is missing (predictions need the input state)");
  }

  if (const json* seqs = Reader::optional(doc, "sequences")) {
    r.array(*seqs, "sequences", "sequences");
    for (std::size_t i = 0; i < seqs->size(); ++i) {
      const std::string path = element("sequences", i);
      SequenceSpec s = parse_sequence(r, proto, (*seqs)[i], path);
      if (proto.find_sequence(s.name))
        r.fail(path + ".name", "name '" + s.name + "' is used by an earlier sequence, but " +
                                   "sequence names must be unique");
      proto.sequences.push_back(std::move(s));
    }
  }

  if (const json* tests = Reader::optional(doc, "tests")) {
    r.array(*tests, "tests", "tests");
    for (std::size_t i = 0; i < tests->size(); ++i)
      proto.tests.push_back(parse_test(r, proto, (*tests)[i], element("tests", i)));
  }

  if (options.generate_needed_sequences) add_generated_sequences(r, proto);
  return proto;
}

Protocol read_protocol(const std::string& path, const ProtocolReadOptions& options) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError(path, "", "cannot open the protocol file");
  const std::string text{std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
  ProtocolReadOptions opts = options;
  if (opts.base_dir.empty()) {
    opts.base_dir = std::filesystem::path(path).parent_path().string();
    if (opts.base_dir.empty()) opts.base_dir = ".";
  }
  return parse_protocol_text(text, path, opts);
}

Protocol parse_protocol_text(const std::string& text, const std::string& label,
                             const ProtocolReadOptions& options) {
  json doc;
  try {
    doc = json::parse(text);
  } catch (const json::parse_error& e) {
    // Report the line and column of the byte where parsing stopped.
    std::size_t line = 1, column = 1;
    const std::size_t stop = std::min<std::size_t>(e.byte == 0 ? 0 : e.byte - 1, text.size());
    for (std::size_t i = 0; i < stop; ++i) {
      if (text[i] == '\n') {
        ++line;
        column = 1;
      } else {
        ++column;
      }
    }
    std::string what = e.what();
    const auto pos = what.find("syntax error");
    if (pos != std::string::npos) what = what.substr(pos);
    throw InputError(label, "line " + std::to_string(line) + ", column " + std::to_string(column),
                     "not valid JSON: " + what);
  }
  return parse_protocol(doc, label, options);
}

}  // namespace macroreal
