#include "protocol/protocol_writer.hpp"

#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>

#include "core/error.hpp"
#include "core/types.hpp"

namespace macroreal {

namespace {

using ojson = nlohmann::ordered_json;

// The shortest decimal (at most 15 significant digits) whose value y satisfies
// back(y) == target exactly, or nullopt. Used so that a phase stored in radians is written
// as "270" when 270 * kDegree is exactly the stored value.
template <class Back>
std::optional<double> short_decimal(double guess, double target, Back back) {
  if (!std::isfinite(guess)) return std::nullopt;
  char buf[40];
  for (int digits = 1; digits <= 15; ++digits) {
    std::snprintf(buf, sizeof buf, "%.*g", digits, guess);
    const double y = std::strtod(buf, nullptr);
    if (back(y) == target) return y == 0.0 ? 0.0 : y;  // no "-0"
  }
  return std::nullopt;
}

// Degrees for an angle stored in radians: a short decimal when one maps back exactly. The
// fallback (an exact but long number) still reads back to within one rounding of the radians.
double degrees(double rad) {
  const auto d = short_decimal(rad / kDegree, rad, [](double y) { return y * kDegree; });
  return d ? *d : rad / kDegree;
}

// "beta" or "beta_polar" for a displacement: polar when short decimals of modulus and angle
// rebuild beta exactly through std::polar (as the reader does), else [re, im] (exact).
void put_beta(ojson& out, cplx beta) {
  const double mod = std::abs(beta);
  const double ang = std::arg(beta) / kDegree;
  if (beta.imag() != 0.0 && mod > 0.0) {
    char bm[40], ba[40];
    for (int digits = 1; digits <= 17; ++digits) {
      std::snprintf(bm, sizeof bm, "%.*g", digits, mod);
      std::snprintf(ba, sizeof ba, "%.*g", digits, ang);
      const double m = std::strtod(bm, nullptr);
      const double a = std::strtod(ba, nullptr);
      if (std::polar(m, a * kDegree) == beta) {
        out["beta_polar"] = ojson::array({m, a});
        return;
      }
    }
  }
  out["beta"] = ojson::array({beta.real(), beta.imag() == 0.0 ? 0.0 : beta.imag()});
}

ojson measurement_json(const ModularMeasurement& m) {
  ojson j = ojson::object();
  put_beta(j, m.beta);
  j["phase_deg"] = degrees(m.phase_rad);
  j["split"] = to_string(m.split);
  if (m.contrast != 1.0) j["contrast"] = m.contrast;
  return j;
}

// A state object from state_json with "kind", "from", "steps", "outcomes" first, nested
// objects likewise.
ojson ordered_state(const nlohmann::json& j) {
  if (j.is_object()) {
    // The reading order of the format (DESIGN.md section 8) first, then the rest.
    static const char* const kFirst[] = {"kind", "from", "steps", "outcomes"};
    ojson out = ojson::object();
    for (const char* key : kFirst)
      if (j.contains(key)) out[key] = ordered_state(j.at(key));
    for (auto it = j.begin(); it != j.end(); ++it)
      if (!out.contains(it.key())) out[it.key()] = ordered_state(it.value());
    return out;
  }
  if (j.is_array()) {
    ojson out = ojson::array();
    for (const auto& e : j) out.push_back(ordered_state(e));
    return out;
  }
  return ojson::parse(j.dump());
}

ojson noise_json(const Protocol& p) {
  ojson n = ojson::object();
  for (const auto& field : noise_field_names()) {
    const UncertainValue* u = nullptr;
    for (const auto& v : p.uncertain_noise)
      if (v.field == field) u = &v;
    if (u && u->is_range()) {
      n[field] = ojson{{"range", ojson::array({*u->low, *u->high})}};
    } else if (u) {
      n[field] = ojson{{"mean", u->mean}, {"sd", u->sd}};
    } else {
      const double v = noise_field(p.noise, field);
      if (v != 0.0) n[field] = v;
    }
  }
  return n;
}

// Inline text of a JSON value with ", " and ": " separators.
std::string inline_text(const ojson& j) {
  if (j.is_object()) {
    std::string s = "{";
    bool first = true;
    for (auto it = j.begin(); it != j.end(); ++it) {
      s += (first ? "" : ", ") + ojson(it.key()).dump() + ": " + inline_text(it.value());
      first = false;
    }
    return s + "}";
  }
  if (j.is_array()) {
    std::string s = "[";
    for (std::size_t i = 0; i < j.size(); ++i) s += (i ? ", " : "") + inline_text(j[i]);
    return s + "]";
  }
  return j.dump();
}

void layout_into(const ojson& j, int indent, int used, int width, std::string& out) {
  const std::string flat = inline_text(j);
  if ((!j.is_object() && !j.is_array()) || j.empty() ||
      used + static_cast<int>(flat.size()) <= width) {
    out += flat;
    return;
  }
  const std::string pad(static_cast<std::size_t>(indent + 2), ' ');
  const bool object = j.is_object();
  out += object ? "{\n" : "[\n";
  std::size_t i = 0;
  for (auto it = j.begin(); it != j.end(); ++it, ++i) {
    out += pad;
    int col = indent + 2;
    if (object) {
      const std::string key = ojson(it.key()).dump() + ": ";
      out += key;
      col += static_cast<int>(key.size());
    }
    layout_into(it.value(), indent + 2, col + 1, width, out);
    out += i + 1 < j.size() ? ",\n" : "\n";
  }
  out += std::string(static_cast<std::size_t>(indent), ' ') + (object ? "}" : "]");
}

}  // namespace

ojson protocol_to_json(const Protocol& p) {
  ojson doc = ojson::object();
  doc["format"] = "macroreal-protocol/1";
  if (!p.title.empty()) doc["title"] = p.title;
  if (p.state) {
    if (p.state_json.is_null())
      throw DomainError("protocol '" + p.title +
                        "' has a state without a JSON description (state_json), so it cannot "
                        "be written; build states through protocol_builders.hpp");
    doc["state"] = ordered_state(p.state_json);
  } else if (!p.state_json.is_null()) {
    doc["state"] = ordered_state(p.state_json);
  }
  doc["readout"] = to_string(p.readout);
  ojson ms = ojson::object();
  for (const auto& [name, spec] : p.measurements) {
    ojson m = measurement_json(spec.measurement);
    m["time_s"] = spec.time_s;
    if (spec.duration_s > 0.0) m["duration_s"] = spec.duration_s;
    ms[name] = m;
  }
  doc["measurements"] = ms;
  const ojson noise = noise_json(p);
  if (!noise.empty()) doc["noise"] = noise;
  ojson det = ojson::object();
  det["dark_read_bright"] = p.detection.dark_read_bright;
  det["bright_read_dark"] = p.detection.bright_read_dark;
  if (p.detection.threshold) det["threshold"] = *p.detection.threshold;
  doc["detection"] = det;
  ojson seqs = ojson::array();
  for (const auto& s : p.sequences) {
    if (s.generated) continue;
    ojson d = ojson::array();
    for (int v : s.dark_is) d.push_back(v > 0 ? "+" : "-");
    seqs.push_back(ojson{{"name", s.name}, {"steps", s.steps}, {"dark_is", d}});
  }
  if (!seqs.empty()) doc["sequences"] = seqs;
  ojson tests = ojson::array();
  for (const auto& t : p.tests) {
    if (t.kind == TestSpec::Kind::leggett_garg) {
      tests.push_back(ojson{{"kind", "leggett-garg"}, {"order", t.order}});
    } else {
      ojson n{{"kind", "nsit"}, {"from", t.from}, {"to", t.to}};
      if (t.margin) n["margin"] = *t.margin;
      tests.push_back(n);
    }
  }
  if (!tests.empty()) doc["tests"] = tests;
  return doc;
}

std::string layout_json(const ojson& doc, int width) {
  std::string out;
  layout_into(doc, 0, 0, width, out);
  return out;
}

std::string write_protocol_text(const Protocol& protocol) {
  return layout_json(protocol_to_json(protocol)) + "\n";
}

void write_protocol(const Protocol& protocol, const std::string& path) {
  const std::string text = write_protocol_text(protocol);
  std::ofstream out(path, std::ios::binary);
  if (!out) throw InputError(path, "", "cannot open the file for writing");
  out << text;
  if (!out) throw InputError(path, "", "writing the protocol file failed");
}

}  // namespace macroreal
