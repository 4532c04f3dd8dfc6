// Reports of `macroreal reach` (reach_report.hpp).
#include "report/reach_report.hpp"

#include <cmath>
#include <cstdio>
#include <map>
#include <sstream>

#include <nlohmann/json.hpp>

#include "core/error.hpp"
#include "report/text_layout.hpp"

namespace macroreal {

namespace {

std::string g(double v, int digits = 4) {
  if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
  if (std::isnan(v)) return "n/a";
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*g", digits, v);
  return buf;
}
std::string exact(double v) {
  if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.17g", v);
  return buf;
}
std::string hours(double s) { return std::isfinite(s) ? g(s / 3600.0, 4) : "never"; }
nlohmann::json num(double v) {
  return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(nullptr);
}
std::string test_name(ReachTest t) {
  return t == ReachTest::leggett_garg ? "Leggett-Garg (K_3)" : "NSIT (A -> B)";
}

}  // namespace

std::string reach_text(const ReachResult& r, const DeviceSpec& spec) {
  std::ostringstream o;
  const MappedDevice& m = r.mapped;
  o << "macroreal reach: " << (spec.title.empty() ? spec.file : spec.title) << "\n";
  if (!spec.note.empty()) o << "  note: " << spec.note << "\n";
  o << "\nTest: " << test_name(r.options.test) << ", conclusive at " << g(r.options.sigma)
    << " sigma with power " << g(r.options.power) << " (z total " << g(r.z_total) << ")\n";
  o << "\nModel of the device (docs/device_mapping.md)\n";
  detail::Table t({false, true});
  t.row({"omega (rad/s)", g(m.omega_rad_per_s, 6)});
  t.row({"gamma = omega/Q (1/s)", g(m.gamma_per_s)});
  t.row({"bath occupation n_th", g(m.bath_nbar)});
  t.row({"initial occupation", g(m.initial_nbar)});
  t.row({"interaction " + to_string(r.point.scheme) + " (s)", g(m.interaction_s)});
  t.row({"|beta| per measurement", g(std::abs(m.beta))});
  t.row({"contrast: bath / T2 / readout", g(m.contrast_bath, 6) + " / " + g(m.contrast_t2, 6) +
                                              " / " + g(m.contrast_readout, 6)});
  t.row({"frequency noise sd (rad/s)", g(m.noise.frequency_noise_sd_rad_per_s)});
  t.row({"readout", m.destructive ? "destructive" : "nondestructive"});
  o << t.str();
  o << "\nRoutes (settings optimised: rotation angles between interactions, Ramsey phases)\n";
  detail::Table rt({false, true, true, true, true, true});
  const std::string vname = r.options.test == ReachTest::leggett_garg ? "K" : "S";
  rt.row({"route", vname, vname + "_classical", "p_success", "shots", "hours"});
  for (const auto& x : r.routes)
    rt.row({x.name, g(x.value, 6), x.classical_available ? g(x.value_classical, 6) : "n/a",
            g(x.success_probability), std::isfinite(x.shots_needed) ? g(x.shots_needed) : "never",
            hours(x.seconds_needed)});
  o << rt.str();
  for (const auto& x : r.routes) {
    o << detail::wrap(x.name + ": " + x.input + "; " + x.classical_note + ".", "  - ", "    ");
    std::string s = "settings:";
    for (std::size_t i = 0; i < x.settings.size(); ++i)
      s += " " + x.setting_names[i] + " = " + g(x.settings[i] * 180.0 / 3.14159265358979323846, 4) + " deg";
    s += " (" + x.search_method + ")";
    o << detail::wrap(s, "    ", "    ");
  }
  o << "\nVerdict\n" << detail::wrap(r.verdict, "  ", "  ");
  if (!r.elasticities.empty()) {
    o << "\nLimiting factor: each parameter improved 2x, time to a conclusive test\n";
    detail::Table et({false, false, true, true, true});
    et.row({"parameter", "change", "hours after", "time ratio", "elasticity"});
    for (const auto& e : r.elasticities)
      et.row({e.parameter, e.change, hours(e.seconds_after), g(e.time_ratio), g(e.elasticity)});
    o << et.str();
    o << detail::wrap("largest gain: " + r.limiting_factor, "  ", "  ");
  }
  o << "\nAssumptions\n";
  for (const auto& a : r.assumptions) o << detail::wrap(a, "  - ", "    ");
  o << detail::wrap(
      "Not established: a conclusive test here would refute macrorealism together with "
      "non-invasive measurability only; it says nothing about the size scale of the "
      "superposition, and the device model leaves out every noise source not in the file.",
      "  ", "  ");
  return o.str();
}

std::string reach_json_text(const ReachResult& r, const DeviceSpec& spec) {
  nlohmann::json j;
  j["device"] = {{"file", spec.file}, {"title", spec.title}, {"note", spec.note}};
  j["test"] = to_string(r.options.test);
  j["sigma"] = r.options.sigma;
  j["power"] = r.options.power;
  const MappedDevice& m = r.mapped;
  j["model"] = {{"omega_rad_per_s", m.omega_rad_per_s}, {"gamma_per_s", m.gamma_per_s},
                {"bath_nbar", m.bath_nbar}, {"initial_nbar", m.initial_nbar},
                {"interaction_s", m.interaction_s}, {"beta", {m.beta.real(), m.beta.imag()}},
                {"contrast", m.contrast}, {"contrast_bath", m.contrast_bath},
                {"contrast_t2", m.contrast_t2}, {"contrast_readout", m.contrast_readout},
                {"frequency_noise_sd_rad_per_s", m.noise.frequency_noise_sd_rad_per_s},
                {"readout", m.destructive ? "destructive" : "nondestructive"}};
  nlohmann::json routes = nlohmann::json::array();
  for (const auto& x : r.routes) {
    nlohmann::json s = nlohmann::json::object();
    for (std::size_t i = 0; i < x.settings.size(); ++i) s[x.setting_names[i]] = x.settings[i];
    routes.push_back({{"route", x.name}, {"input", x.input},
                      {r.options.test == ReachTest::leggett_garg ? "K" : "S", x.value},
                      {"bound", x.bound}, {"effect", x.effect},
                      {"classical", x.classical_available ? num(x.value_classical) : nlohmann::json(nullptr)},
                      {"can_be_conclusive", x.can_be_conclusive}, {"classical_note", x.classical_note},
                      {"settings_rad", s}, {"start_times_s", x.start_times_s},
                      {"success_probability", x.success_probability},
                      {"preparation_multiple", x.preparation_multiple},
                      {"seconds_per_shot", x.seconds_per_shot},
                      {"variance_one_second", x.variance_one_second},
                      {"seconds_needed", num(x.seconds_needed)}, {"shots_needed", num(x.shots_needed)},
                      {"evaluations", x.evaluations}, {"method", x.search_method}});
  }
  j["routes"] = routes;
  j["best_route"] = r.best_route >= 0 ? nlohmann::json(r.routes[static_cast<std::size_t>(r.best_route)].name)
                                      : nlohmann::json(nullptr);
  j["seconds_needed"] = num(r.seconds_needed);
  j["hours_needed"] = num(r.seconds_needed / 3600.0);
  j["available_hours"] = r.point.measurement_time_available_h;
  j["conclusive"] = r.conclusive;
  j["verdict"] = r.verdict;
  nlohmann::json el = nlohmann::json::array();
  for (const auto& e : r.elasticities)
    el.push_back({{"parameter", e.parameter}, {"change", e.change},
                  {"seconds_after", num(e.seconds_after)}, {"time_ratio", num(e.time_ratio)},
                  {"elasticity", num(e.elasticity)}});
  j["elasticities"] = el;
  j["limiting_factor"] = r.limiting_factor;
  j["assumptions"] = r.assumptions;
  return j.dump(2) + "\n";
}

namespace {

std::string part_header(const ReachMap& map, const ReachOptions& o) {
  std::ostringstream s;
  s << "#grid x=" << map.x_param << " y=" << map.y_param << " nx=" << map.xs.size()
    << " ny=" << map.ys.size() << " available_s=" << exact(map.available_s) << "\n";
  s << "#options test=" << to_string(o.test) << " sigma=" << exact(o.sigma)
    << " power=" << exact(o.power) << "\n";
  s << "#xs";
  for (double v : map.xs) s << " " << exact(v);
  s << "\n#ys";
  for (double v : map.ys) s << " " << exact(v);
  s << "\n";
  return s.str();
}

}  // namespace

std::string map_csv_text(const ReachMap& map, const ReachOptions& o) {
  const std::size_t nx = map.xs.size(), ny = map.ys.size();
  if (map.points.size() != nx * ny) throw DomainError("the map is incomplete");
  std::vector<double> sec(nx * ny);
  for (const auto& p : map.points) sec[static_cast<std::size_t>(p.index)] = p.seconds;
  auto feasible = [&](std::size_t i, std::size_t j) { return sec[j * nx + i] <= map.available_s; };
  std::ostringstream s;
  s << "# macroreal reach map: hours to a conclusive " << test_name(o.test) << " test at "
    << g(o.sigma) << " sigma, power " << g(o.power) << "\n";
  s << "# feasible: hours <= " << g(map.available_s / 3600.0)
    << " (available); boundary: a feasible point with an infeasible 4-neighbour\n";
  s << map.x_param << "," << map.y_param << ",hours_to_conclusive,feasible,boundary\n";
  for (std::size_t j = 0; j < ny; ++j)
    for (std::size_t i = 0; i < nx; ++i) {
      const bool f = feasible(i, j);
      bool b = false;
      if (f) {
        if (i > 0 && !feasible(i - 1, j)) b = true;
        if (i + 1 < nx && !feasible(i + 1, j)) b = true;
        if (j > 0 && !feasible(i, j - 1)) b = true;
        if (j + 1 < ny && !feasible(i, j + 1)) b = true;
      }
      const double h = sec[j * nx + i] / 3600.0;
      s << g(map.xs[i], 10) << "," << g(map.ys[j], 10) << ","
        << (std::isfinite(h) ? g(h, 8) : std::string("inf")) << "," << (f ? 1 : 0) << ","
        << (b ? 1 : 0) << "\n";
    }
  return s.str();
}

std::string map_part_text(const ReachMap& map, const ReachOptions& o, int shard, int shards) {
  std::ostringstream s;
  s << "#macroreal-reach-map-part/1 shard=" << shard << "/" << shards << "\n";
  s << part_header(map, o);
  s << "index,seconds\n";
  for (const auto& p : map.points) s << p.index << "," << exact(p.seconds) << "\n";
  return s.str();
}

std::string merge_map_parts(const std::vector<std::string>& texts,
                            const std::vector<std::string>& names) {
  if (texts.empty()) throw InputError("", "", "merge needs at least one part file");
  std::string header;
  std::map<long, double> seconds;
  ReachMap map;
  ReachOptions opt;
  for (std::size_t f = 0; f < texts.size(); ++f) {
    const std::string& name = f < names.size() ? names[f] : "part";
    std::istringstream in(texts[f]);
    std::string line, head;
    int lineno = 0;
    if (!std::getline(in, line) || line.rfind("#macroreal-reach-map-part/1", 0) != 0)
      throw InputError(name, "line 1", "not a reach map part (first line must start with "
                                       "#macroreal-reach-map-part/1)");
    ++lineno;
    for (int k = 0; k < 4; ++k) {
      if (!std::getline(in, line) || line.empty() || line[0] != '#')
        throw InputError(name, "line " + std::to_string(lineno + 1), "header line missing");
      ++lineno;
      head += line + "\n";
    }
    if (f == 0) {
      header = head;
      std::istringstream h(head);
      std::string l1, l2, l3, l4;
      std::getline(h, l1);
      std::getline(h, l2);
      std::getline(h, l3);
      std::getline(h, l4);
      char xb[128] = {0}, yb[128] = {0}, tb[16] = {0};
      std::size_t nx = 0, ny = 0;
      double avail = 0, sigma = 0, power = 0;
      if (std::sscanf(l1.c_str(), "#grid x=%127s y=%127s nx=%zu ny=%zu available_s=%lf", xb, yb,
                      &nx, &ny, &avail) != 5 ||
          std::sscanf(l2.c_str(), "#options test=%15s sigma=%lf power=%lf", tb, &sigma, &power) != 3)
        throw InputError(name, "line 2", "malformed grid or options line");
      map.x_param = xb;
      map.y_param = yb;
      map.available_s = avail;
      opt.test = parse_reach_test(tb);
      opt.sigma = sigma;
      opt.power = power;
      auto read_list = [&](const std::string& l, const char* tag, std::vector<double>& out,
                           std::size_t n) {
        std::istringstream ls(l.substr(std::string(tag).size()));
        std::string tok;
        while (ls >> tok) out.push_back(std::strtod(tok.c_str(), nullptr));
        if (out.size() != n) throw InputError(name, tag, "wrong number of grid values");
      };
      read_list(l3, "#xs", map.xs, nx);
      read_list(l4, "#ys", map.ys, ny);
    } else if (head != header) {
      throw InputError(name, "header", "this part belongs to another map (grid or options "
                                       "differ from " + names[0] + ")");
    }
    if (!std::getline(in, line) || line != "index,seconds")
      throw InputError(name, "line 6", "expected the column line index,seconds");
    lineno = 6;
    while (std::getline(in, line)) {
      ++lineno;
      if (line.empty()) continue;
      const auto comma = line.find(',');
      char* end = nullptr;
      const long idx = std::strtol(line.c_str(), &end, 10);
      if (comma == std::string::npos || end != line.c_str() + comma || idx < 0 ||
          static_cast<std::size_t>(idx) >= map.xs.size() * map.ys.size())
        throw InputError(name, "line " + std::to_string(lineno), "bad point index");
      const std::string v = line.substr(comma + 1);
      const double sec = v == "inf" ? std::numeric_limits<double>::infinity()
                                    : std::strtod(v.c_str(), nullptr);
      if (!seconds.emplace(idx, sec).second)
        throw InputError(name, "line " + std::to_string(lineno),
                         "point " + std::to_string(idx) + " appears in more than one part");
    }
  }
  const std::size_t n = map.xs.size() * map.ys.size();
  if (seconds.size() != n)
    throw InputError(names.empty() ? "" : names[0], "",
                     std::to_string(n - seconds.size()) + " of " + std::to_string(n) +
                         " map points are missing (are all shards merged?)");
  for (const auto& [idx, sec] : seconds) {
    MapPoint p;
    p.index = idx;
    p.i = static_cast<int>(idx % static_cast<long>(map.xs.size()));
    p.j = static_cast<int>(idx / static_cast<long>(map.xs.size()));
    p.x = map.xs[static_cast<std::size_t>(p.i)];
    p.y = map.ys[static_cast<std::size_t>(p.j)];
    p.seconds = sec;
    map.points.push_back(p);
  }
  return map_csv_text(map, opt);
}

}  // namespace macroreal
