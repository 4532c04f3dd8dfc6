#include "protocol/protocol_builders.hpp"

#include <algorithm>
#include <cmath>

#include "core/error.hpp"
#include "core/types.hpp"
#include "phase_space/number_text.hpp"
#include "protocol/protocol_reader.hpp"
#include "protocol/protocol_writer.hpp"

namespace macroreal {

namespace {

using json = nlohmann::json;

// 20 log10(e): dB of squeezing per unit of r (DESIGN.md section 2).
const double kDbPerNeper = 20.0 / std::log(10.0);

json pair_json(cplx z) { return json::array({z.real(), z.imag()}); }

// A measurement object of the file format (without time_s).
json setting_json(const MeasurementSetting& s) {
  if (!(std::isfinite(s.modulus) && s.modulus >= 0.0))
    throw DomainError("modulus = " + detail::number_text(s.modulus) + ", but must be >= 0");
  json j = json::object();
  j["beta_polar"] = json::array({s.modulus, s.angle_deg});
  j["phase_deg"] = s.phase_deg;
  j["split"] = to_string(s.split);
  if (s.contrast != 1.0) j["contrast"] = s.contrast;
  return j;
}

MeasurementSpec spec_of(const std::string& name, const MeasurementSetting& s, double time_s) {
  MeasurementSpec spec;
  spec.name = name;
  // The same arithmetic as the reader, so a written and re-read file holds the same doubles.
  spec.measurement.beta = std::polar(s.modulus, s.angle_deg * kDegree);
  spec.measurement.phase_rad = s.phase_deg * kDegree;
  spec.measurement.split = s.split;
  spec.measurement.contrast = s.contrast;
  spec.time_s = time_s;
  spec.duration_s = s.duration_s;
  return spec;
}

Protocol start(const ProtocolCommon& c) {
  Protocol p;
  p.file = "<built: " + c.title + ">";
  p.title = c.title;
  p.state_json = c.state;
  p.readout = c.readout;
  p.noise = c.noise;
  p.uncertain_noise = c.uncertain_noise;
  p.detection = c.detection;
  return p;
}

std::string angle_text(double deg) { return detail::number_text(deg); }

}  // namespace

json thermal_state_json(double nbar) { return {{"kind", "thermal"}, {"nbar", nbar}}; }
json coherent_state_json(cplx alpha) {
  return {{"kind", "coherent"}, {"alpha", pair_json(alpha)}};
}
json squeezed_state_json(double r, double theta_deg, double nbar, cplx alpha) {
  json j{{"kind", "squeezed"}, {"r", r}, {"theta_deg", theta_deg}};
  if (nbar != 0.0) j["nbar"] = nbar;
  if (alpha != cplx(0.0)) j["alpha"] = pair_json(alpha);
  return j;
}
json fock_state_json(int n) { return {{"kind", "fock"}, {"n", n}}; }
json cat_state_json(double alpha, double relative_phase_deg) {
  return {{"kind", "cat"}, {"alpha", alpha}, {"relative_phase_deg", relative_phase_deg}};
}

json prepared_state_json(const json& from, const std::vector<PreparationStep>& steps) {
  if (steps.empty()) throw DomainError("a prepared state needs at least one preparation step");
  json list = json::array();
  std::string outcomes;
  for (const auto& s : steps) {
    if (s.outcome != 1 && s.outcome != -1)
      throw DomainError("preparation outcome = " + std::to_string(s.outcome) +
                        ", but must be +1 or -1");
    if (s.setting.duration_s != 0.0)
      throw DomainError("preparation steps have no duration (duration_s must be 0)");
    list.push_back(setting_json(s.setting));
    outcomes += s.outcome > 0 ? '+' : '-';
  }
  return {{"kind", "prepared"}, {"from", from}, {"steps", list}, {"outcomes", outcomes}};
}

json cat_prefix_json(const CatPrefixOptions& o) {
  if (!(o.separation > 0.0))
    throw DomainError("cat separation = " + detail::number_text(o.separation) +
                      ", but must be > 0");
  PreparationStep step;
  step.setting.modulus = o.separation;
  step.setting.angle_deg = o.angle_deg;
  step.setting.phase_deg = o.phase_deg;
  step.setting.split = Split::symmetric;
  step.outcome = o.outcome;
  return prepared_state_json(o.from, {step});
}

double grid_lattice_beta() { return std::sqrt(kPi); }

json grid_prefix_json(const GridPrefixOptions& o) {
  if (!(o.squeezing_db > 0.0))
    throw DomainError("squeezing_db = " + detail::number_text(o.squeezing_db) +
                      ", but must be > 0");
  if (o.rounds < 1)
    throw DomainError("rounds = " + std::to_string(o.rounds) + ", but must be >= 1");
  // theta = 2 angle squeezes the quadrature along which D(sqrt(pi) e^{i angle}) translates, so
  // the peaks of the comb are narrow (DESIGN.md section 2: theta = 0 squeezes x).
  const double r = o.squeezing_db / kDbPerNeper;
  const json from = squeezed_state_json(r, 2.0 * o.angle_deg);
  PreparationStep step;
  step.setting.modulus = grid_lattice_beta();
  step.setting.angle_deg = o.angle_deg;
  step.setting.phase_deg = o.phase_deg;
  step.setting.split = Split::symmetric;
  return prepared_state_json(from, std::vector<PreparationStep>(o.rounds, step));
}

std::string measurement_name(std::size_t index) {
  if (index < 26) return std::string(1, static_cast<char>('A' + index));
  return "M" + std::to_string(index);
}

std::vector<SequenceSpec> needed_configurations(const Protocol& proto) {
  std::vector<SequenceSpec> out;
  const auto covered = [&](const std::vector<std::string>& steps, const std::vector<int>& dark) {
    const auto same = [&](const SequenceSpec& s) {
      if (s.steps != steps) return false;
      if (proto.readout == Readout::nondestructive) return true;
      for (std::size_t k = 0; k + 1 < steps.size(); ++k)
        if (s.dark_is[k] != dark[k]) return false;
      return true;
    };
    return std::any_of(proto.sequences.begin(), proto.sequences.end(), same) ||
           std::any_of(out.begin(), out.end(), same);
  };
  for (const auto& steps : proto.step_sets_needed()) {
    for (const auto& dark : dark_patterns(steps.size(), proto.readout)) {
      if (covered(steps, dark)) continue;
      SequenceSpec s;
      s.name = generated_sequence_name(steps, dark, proto.readout);
      s.steps = steps;
      s.dark_is = dark;
      s.generated = false;
      out.push_back(std::move(s));
    }
  }
  return out;
}

void finish_protocol(Protocol& p, bool list_configurations) {
  for (const auto& u : p.uncertain_noise) noise_field(p.noise, u.field) = u.mean;
  // Validate with the reader's own rules by writing and reading the protocol: whatever a
  // builder makes is then exactly what a saved file gives back.
  Protocol checked;
  try {
    ProtocolReadOptions ro;
    ro.generate_needed_sequences = false;
    checked = parse_protocol_text(write_protocol_text(p), p.file, ro);
  } catch (const InputError& e) {
    throw DomainError("the built protocol '" + p.title + "' is not valid: " + e.where() + ": " +
                      e.message());
  }
  p.state = checked.state;
  p.noise = checked.noise;
  if (list_configurations)
    for (auto& s : needed_configurations(p)) p.sequences.push_back(std::move(s));
}

Protocol build_leggett_garg(const LgOptions& o) {
  const std::size_t n = o.settings.size();
  if (n < 3)
    throw DomainError("a Leggett-Garg test needs at least 3 measurements, got " +
                      std::to_string(n));
  if (o.times_s.size() != n)
    throw DomainError("times_s has " + std::to_string(o.times_s.size()) +
                      " entries, but settings has " + std::to_string(n));
  Protocol p = start(o.common);
  TestSpec lg;
  lg.kind = TestSpec::Kind::leggett_garg;
  for (std::size_t k = 0; k < n; ++k) {
    const std::string name = measurement_name(k);
    p.measurements.emplace(name, spec_of(name, o.settings[k], o.times_s[k]));
    lg.order.push_back(name);
  }
  p.tests.push_back(lg);
  if (o.nsit_controls) {
    for (std::size_t k = 0; k + 1 < n; ++k) {
      TestSpec t;
      t.kind = TestSpec::Kind::nsit;
      t.from = lg.order[k];
      t.to = lg.order[k + 1];
      p.tests.push_back(t);
    }
  }
  finish_protocol(p, o.common.list_configurations);
  return p;
}

Protocol build_leggett_garg_equal(const EqualSpacingOptions& o) {
  if (o.times < 3)
    throw DomainError("times = " + std::to_string(o.times) + ", but must be >= 3");
  if (!(o.spacing_s >= 0.0))
    throw DomainError("spacing_s = " + detail::number_text(o.spacing_s) + ", but must be >= 0");
  LgOptions lg;
  lg.common = o.common;
  lg.nsit_controls = o.nsit_controls;
  for (int k = 0; k < o.times; ++k) {
    MeasurementSetting s = o.first;
    s.angle_deg = o.first.angle_deg + k * o.rotation_deg;
    lg.settings.push_back(s);
    lg.times_s.push_back(k * o.spacing_s);
  }
  return build_leggett_garg(lg);
}

Protocol build_nsit(const NsitOptions& o) {
  Protocol p = start(o.common);
  p.measurements.emplace("A", spec_of("A", o.from, o.time_from_s));
  p.measurements.emplace("B", spec_of("B", o.to, o.time_to_s));
  TestSpec t;
  t.kind = TestSpec::Kind::nsit;
  t.from = "A";
  t.to = "B";
  t.margin = o.margin;
  p.tests.push_back(t);
  finish_protocol(p, o.common.list_configurations);
  return p;
}

Protocol build_nsit_scan(const NsitScanOptions& o) {
  if (o.from_angles_deg.empty())
    throw DomainError("an NSIT scan needs at least one orientation (from_angles_deg is empty)");
  Protocol p = start(o.common);
  p.measurements.emplace("B", spec_of("B", o.to, o.time_to_s));
  for (std::size_t i = 0; i < o.from_angles_deg.size(); ++i) {
    MeasurementSetting s = o.from;
    s.angle_deg = o.from_angles_deg[i];
    const std::string name = "A" + std::to_string(i);
    p.measurements.emplace(name, spec_of(name, s, o.time_from_s));
    TestSpec t;
    t.kind = TestSpec::Kind::nsit;
    t.from = name;
    t.to = "B";
    t.margin = o.margin;
    p.tests.push_back(t);
  }
  finish_protocol(p, o.common.list_configurations);
  return p;
}

std::vector<Protocol> build_nsit_scan_family(const NsitScanOptions& o) {
  if (o.from_angles_deg.empty())
    throw DomainError("an NSIT scan needs at least one orientation (from_angles_deg is empty)");
  std::vector<Protocol> family;
  for (double angle : o.from_angles_deg) {
    NsitOptions n;
    n.common = o.common;
    n.common.title = o.common.title + " (A at " + angle_text(angle) + " deg)";
    n.from = o.from;
    n.from.angle_deg = angle;
    n.to = o.to;
    n.time_from_s = o.time_from_s;
    n.time_to_s = o.time_to_s;
    n.margin = o.margin;
    family.push_back(build_nsit(n));
  }
  return family;
}

}  // namespace macroreal
