#include "design/nsit_scan.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>

#include "core/error.hpp"
#include "design/model_cells.hpp"
#include "stats/estimator.hpp"

namespace macroreal {

namespace {

constexpr double kDeg = 180.0 / std::numbers::pi;

const std::vector<std::string>& scan_parameters() {
  static const std::vector<std::string> p{"beta_angle_deg", "beta_modulus", "phase_deg", "time_s",
                                          "contrast"};
  return p;
}

std::string axis_label_of(const std::string& parameter, const std::string& name) {
  if (parameter == "beta_angle_deg") return "direction of #gb of " + name + " (deg)";
  if (parameter == "beta_modulus") return "|#gb| of " + name;
  if (parameter == "phase_deg") return "Ramsey phase of " + name + " (deg)";
  if (parameter == "time_s") return "time of " + name + " (s)";
  return "contrast of " + name;
}

bool same(double a, double b) { return std::abs(a - b) <= 1e-9 * std::max({1.0, std::abs(a), std::abs(b)}); }

double normal_cdf(double z) { return 0.5 * std::erfc(-z / std::numbers::sqrt2); }

}  // namespace

double scan_setting(const MeasurementSpec& m, const std::string& parameter) {
  if (parameter == "beta_angle_deg") return std::arg(m.measurement.beta) * kDeg;
  if (parameter == "beta_modulus") return std::abs(m.measurement.beta);
  if (parameter == "phase_deg") return m.measurement.phase_rad * kDeg;
  if (parameter == "time_s") return m.time_s;
  if (parameter == "contrast") return m.measurement.contrast;
  throw DomainError("scan setting '" + parameter + "' is not one of beta_angle_deg, beta_modulus, "
                    "phase_deg, time_s, contrast");
}

MeasurementSpec with_scan_setting(const MeasurementSpec& m, const std::string& parameter, double value) {
  MeasurementSpec out = m;
  const double modulus = std::abs(m.measurement.beta), angle = std::arg(m.measurement.beta);
  if (parameter == "beta_angle_deg") out.measurement.beta = std::polar(modulus, value / kDeg);
  else if (parameter == "beta_modulus") out.measurement.beta = std::polar(value, angle);
  else if (parameter == "phase_deg") out.measurement.phase_rad = value / kDeg;
  else if (parameter == "time_s") out.time_s = value;
  else if (parameter == "contrast") out.measurement.contrast = value;
  else scan_setting(m, parameter);  // throws the DomainError naming the settings
  out.measurement.validate();
  return out;
}

std::optional<NsitScan> find_nsit_scan(const Protocol& protocol) {
  std::vector<int> tests;
  for (std::size_t t = 0; t < protocol.tests.size(); ++t)
    if (protocol.tests[t].kind == TestSpec::Kind::nsit) tests.push_back(static_cast<int>(t));
  if (tests.size() < 2) return std::nullopt;
  const std::string& to = protocol.tests[static_cast<std::size_t>(tests[0])].to;
  std::vector<const MeasurementSpec*> from;
  for (int t : tests) {
    const TestSpec& spec = protocol.tests[static_cast<std::size_t>(t)];
    if (spec.to != to) return std::nullopt;
    from.push_back(&protocol.measurement(spec.from));
  }
  for (const auto* m : from)
    if (m->measurement.split != from[0]->measurement.split || !same(m->duration_s, from[0]->duration_s))
      return std::nullopt;
  std::optional<std::string> varying;
  for (const auto& parameter : scan_parameters()) {
    bool differs = false;
    for (const auto* m : from) differs = differs || !same(scan_setting(*m, parameter), scan_setting(*from[0], parameter));
    // The direction of beta = 0 is undefined; a modulus scan through 0 is still one setting.
    if (differs && parameter == "beta_angle_deg") {
      bool zero = false;
      for (const auto* m : from) zero = zero || std::abs(m->measurement.beta) == 0.0;
      if (zero) differs = false;
    }
    if (!differs) continue;
    if (varying) return std::nullopt;  // two settings change: not a one-setting scan
    varying = parameter;
  }
  if (!varying) return std::nullopt;
  NsitScan scan;
  scan.parameter = *varying;
  scan.axis_label = axis_label_of(*varying, "the earlier measurement");
  scan.test_indices = tests;
  for (const auto* m : from) scan.values.push_back(scan_setting(*m, *varying));
  return scan;
}

ModelCurve nsit_scan_curve(const Protocol& protocol, const NsitScan& scan, int points,
                           const PredictOptions& options) {
  if (points < 2) throw DomainError("model curve points = " + std::to_string(points) + ", but must be >= 2");
  if (scan.test_indices.empty()) throw DomainError("model curve: the scan has no test");
  const TestSpec& first = protocol.tests.at(static_cast<std::size_t>(scan.test_indices[0]));
  const auto [lo_it, hi_it] = std::minmax_element(scan.values.begin(), scan.values.end());
  const double lo = *lo_it, hi = *hi_it;
  // One test and only the sequences it needs: predict() generates those from the test.
  Protocol base = protocol;
  base.tests = {first};
  base.sequences.clear();
  ModelCurve curve;
  for (int i = 0; i < points; ++i) {
    const double v = lo + (hi - lo) * i / (points - 1);
    Protocol p = base;
    p.measurements[first.from] = with_scan_setting(protocol.measurement(first.from), scan.parameter, v);
    const PredictionResult r = predict(p, options);
    MACROREAL_CHECK(!r.tests.empty() && r.tests[0].nsit);
    curve.x.push_back(v);
    curve.y.push_back(r.tests[0].nsit->S);
    curve.engine = r.engine.name;
  }
  return curve;
}

double SamplingPrediction::density(double s) const {
  if (entries.empty()) return 0.0;
  double f = 0.0;
  for (const auto& e : entries) {
    const double z = (s - e.model_value) / e.std_error;
    f += std::exp(-0.5 * z * z) / (e.std_error * std::sqrt(2.0 * std::numbers::pi));
  }
  return f / static_cast<double>(entries.size());
}

std::vector<double> SamplingPrediction::expected_counts(const std::vector<double>& edges) const {
  std::vector<double> out;
  for (std::size_t k = 0; k + 1 < edges.size(); ++k) {
    if (!(edges[k + 1] > edges[k])) throw DomainError("histogram edges must increase");
    double n = 0.0;
    for (const auto& e : entries)
      n += normal_cdf((edges[k + 1] - e.model_value) / e.std_error) -
           normal_cdf((edges[k] - e.model_value) / e.std_error);
    out.push_back(n);
  }
  return out;
}

SamplingPrediction nsit_sampling_prediction(const Protocol& protocol, const CampaignCounts& observed,
                                            const PredictOptions& options) {
  const ModelCells model = model_cells(protocol, options);
  CampaignCounts layout;
  layout.readout = observed.readout;
  CellCounts expected;
  for (const auto& s : observed.sequences) {
    if (!(s.total() > 0.0)) continue;
    std::size_t m = 0;
    while (m < model.layout.sequences.size() && model.layout.sequences[m].name != s.name) ++m;
    if (m == model.layout.sequences.size())
      throw DomainError("sampling prediction: the model has no sequence '" + s.name + "'");
    layout.sequences.push_back(s);
    std::vector<double> e(s.counts.size());
    for (std::size_t j = 0; j < e.size(); ++j) e[j] = s.total() * model.probabilities[m][j];
    expected.push_back(std::move(e));
  }
  SamplingPrediction out;
  out.method =
      "normal approximation: S^ ~ Normal(S_model, sigma^2) per setting, sigma the delta-method "
      "standard error of the pooled MLE at the expected counts N_s p_sj of the model (the "
      "multinomial sampling error of the campaign's shot numbers); the model's probabilities "
      "are those of the ideal outcomes, without detection errors";
  if (layout.sequences.empty()) return out;
  const CampaignEstimator estimator(protocol, layout);
  const std::vector<double> se = estimator.delta_method_se(expected);
  const auto& infos = estimator.quantities();
  for (std::size_t i = 0; i < infos.size(); ++i) {
    if (infos[i].kind != QuantityKind::nsit_s || infos[i].test_index < 0) continue;
    const auto t = static_cast<std::size_t>(infos[i].test_index);
    if (t >= model.prediction.tests.size() || !model.prediction.tests[t].nsit) continue;
    if (!(std::isfinite(se[i]) && se[i] > 0.0)) continue;
    out.entries.push_back({infos[i].test_index, infos[i].name, model.prediction.tests[t].nsit->S, se[i]});
  }
  return out;
}

}  // namespace macroreal
