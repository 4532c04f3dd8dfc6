// Tabulated Fock-basis states and their file readers (density_matrix_state.hpp).
#include "fock/density_matrix_state.hpp"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <fstream>
#include <sstream>

#include <nlohmann/json.hpp>

#include "core/error.hpp"
#include "fock/displacement_matrix.hpp"

namespace macroreal {

namespace {

std::string num(double v) {
  std::ostringstream os;
  os.precision(6);
  os << v;
  return os.str();
}

std::string trim(const std::string& s) {
  std::size_t a = 0, b = s.size();
  while (a < b && std::isspace(static_cast<unsigned char>(s[a]))) ++a;
  while (b > a && std::isspace(static_cast<unsigned char>(s[b - 1]))) --b;
  return s.substr(a, b - a);
}

double parse_number(const std::string& text, const std::string& file, const std::string& where,
                    const char* field) {
  const std::string t = trim(text);
  std::size_t used = 0;
  double v = 0.0;
  try {
    v = std::stod(t, &used);
  } catch (const std::exception&) {
    used = 0;
  }
  if (t.empty() || used != t.size() || !std::isfinite(v))
    throw InputError(file, where, std::string(field) + " = \"" + t + "\", but must be a finite number");
  return v;
}

}  // namespace

void check_density_matrix(const Eigen::MatrixXcd& rho, const std::string& file,
                          const DensityMatrixTolerances& tol) {
  if (rho.rows() < 1 || rho.rows() != rho.cols())
    throw InputError(file, "", "density matrix is " + std::to_string(rho.rows()) + " x " +
                                   std::to_string(rho.cols()) + ", but must be square and non-empty");
  if (!rho.allFinite()) throw InputError(file, "", "density matrix has a non-finite entry");
  const double herm = (rho - rho.adjoint()).cwiseAbs().maxCoeff();
  if (herm > tol.hermiticity)
    throw InputError(file, "", "density matrix is not Hermitian: max |rho_mn - conj(rho_nm)| = " +
                                   num(herm) + ", tolerance " + num(tol.hermiticity));
  const double tr = rho.trace().real();
  if (std::abs(tr - 1.0) > tol.trace)
    throw InputError(file, "", "density matrix trace = " + num(tr) + ", but must be 1 within " +
                                   num(tol.trace));
  const Eigen::MatrixXcd h = 0.5 * (rho + rho.adjoint());
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXcd> es(h, Eigen::EigenvaluesOnly);
  const double lmin = es.eigenvalues().minCoeff();
  if (lmin < -tol.positivity)
    throw InputError(file, "", "density matrix is not positive semi-definite: smallest eigenvalue = " +
                                   num(lmin) + ", tolerance " + num(tol.positivity));
}

DensityMatrixState::DensityMatrixState(Eigen::MatrixXcd rho, std::string source,
                                       const DensityMatrixTolerances& tol)
    : source_(std::move(source)) {
  check_density_matrix(rho, source_, tol);
  rho_ = 0.5 * (rho + rho.adjoint());
  Eigen::MatrixXcd off = rho_;
  off.diagonal().setZero();
  diagonal_ = off.cwiseAbs().maxCoeff() <= 1e-14;
}

cplx DensityMatrixState::characteristic(cplx beta) const {
  // Tr[rho D] = sum_mn rho_mn D_nm.
  const Eigen::MatrixXcd d = displacement_matrix(dimension(), beta);
  return rho_.cwiseProduct(d.transpose()).sum();
}

std::string DensityMatrixState::describe() const {
  return "density matrix (" + std::to_string(dimension()) + " Fock levels, from " + source_ + ")";
}

Eigen::MatrixXcd read_density_matrix_json(const std::string& path) {
  std::ifstream in(path);
  if (!in) throw InputError(path, "", "cannot open the file");
  nlohmann::json doc;
  try {
    doc = nlohmann::json::parse(in);
  } catch (const nlohmann::json::parse_error& e) {
    throw InputError(path, "", std::string("not valid JSON: ") + e.what());
  }
  if (!doc.is_object()) throw InputError(path, "", "top level must be a JSON object");
  for (const auto& [key, value] : doc.items()) {
    (void)value;
    if (key != "format" && key != "dimension" && key != "real" && key != "imag" && key != "comment")
      throw InputError(path, key, "unknown field");
  }
  if (!doc.contains("format") || doc["format"] != "macroreal-density-matrix/1")
    throw InputError(path, "format", "must be \"macroreal-density-matrix/1\"");
  if (!doc.contains("dimension") || !doc["dimension"].is_number_integer() || doc["dimension"].get<long>() < 1)
    throw InputError(path, "dimension", "must be an integer >= 1");
  const long n = doc["dimension"].get<long>();
  Eigen::MatrixXcd rho = Eigen::MatrixXcd::Zero(n, n);
  auto read_part = [&](const char* field, bool imag) {
    const auto& a = doc[field];
    if (!a.is_array() || static_cast<long>(a.size()) != n)
      throw InputError(path, field, "must be an array of " + std::to_string(n) + " rows");
    for (long m = 0; m < n; ++m) {
      const auto& row = a[m];
      const std::string where = std::string(field) + "[" + std::to_string(m) + "]";
      if (!row.is_array() || static_cast<long>(row.size()) != n)
        throw InputError(path, where, "must be an array of " + std::to_string(n) + " numbers");
      for (long k = 0; k < n; ++k) {
        if (!row[k].is_number())
          throw InputError(path, where + "[" + std::to_string(k) + "]", "must be a number");
        const double v = row[k].get<double>();
        if (imag) rho(m, k).imag(v);
        else rho(m, k).real(v);
      }
    }
  };
  if (!doc.contains("real")) throw InputError(path, "real", "missing");
  read_part("real", false);
  if (doc.contains("imag")) read_part("imag", true);
  return rho;
}

Eigen::MatrixXcd read_density_matrix_csv(const std::string& path) {
  std::ifstream in(path);
  if (!in) throw InputError(path, "", "cannot open the file");
  struct Entry { long m, n; cplx v; };
  std::vector<Entry> entries;
  long declared = -1, largest = -1;
  std::string line;
  int lineno = 0;
  while (std::getline(in, line)) {
    ++lineno;
    const std::string where = "line " + std::to_string(lineno);
    const std::string t = trim(line);
    if (t.empty()) continue;
    if (t[0] == '#') {
      const auto pos = t.find("dimension:");
      if (pos != std::string::npos)
        declared = static_cast<long>(parse_number(t.substr(pos + 10), path, where, "dimension"));
      continue;
    }
    std::vector<std::string> f;
    std::stringstream ss(t);
    std::string cell;
    while (std::getline(ss, cell, ',')) f.push_back(trim(cell));
    if (lineno == 1 || entries.empty()) {
      if (!f.empty() && f[0] == "m") continue;  // header
    }
    if (f.size() < 3 || f.size() > 4)
      throw InputError(path, where, "expected \"m,n,re,im\" (3 or 4 fields), got " +
                                        std::to_string(f.size()));
    const double m = parse_number(f[0], path, where, "m"), n = parse_number(f[1], path, where, "n");
    if (m < 0 || n < 0 || m != std::floor(m) || n != std::floor(n) || m > 100000 || n > 100000)
      throw InputError(path, where, "Fock indices must be integers in [0, 100000]");
    const double re = parse_number(f[2], path, where, "re");
    const double im = f.size() == 4 ? parse_number(f[3], path, where, "im") : 0.0;
    entries.push_back({static_cast<long>(m), static_cast<long>(n), cplx(re, im)});
    largest = std::max(largest, static_cast<long>(std::max(m, n)));
  }
  if (entries.empty()) throw InputError(path, "", "no matrix entries");
  long dim = largest + 1;
  if (declared >= 0) {
    if (declared < dim)
      throw InputError(path, "dimension", "declared dimension " + std::to_string(declared) +
                                              " is smaller than 1 + the largest index " +
                                              std::to_string(dim));
    dim = declared;
  }
  Eigen::MatrixXcd rho = Eigen::MatrixXcd::Zero(dim, dim);
  for (const auto& e : entries) rho(e.m, e.n) = e.v;
  return rho;
}

std::shared_ptr<const DensityMatrixState> read_density_matrix(const std::string& path,
                                                              const DensityMatrixTolerances& tol) {
  std::string ext;
  const auto dot = path.find_last_of('.');
  if (dot != std::string::npos) ext = path.substr(dot + 1);
  std::transform(ext.begin(), ext.end(), ext.begin(), [](unsigned char c) { return std::tolower(c); });
  Eigen::MatrixXcd rho;
  if (ext == "json") rho = read_density_matrix_json(path);
  else if (ext == "csv") rho = read_density_matrix_csv(path);
  else throw InputError(path, "", "density matrix file must end in .json or .csv");
  return std::make_shared<const DensityMatrixState>(std::move(rho), path, tol);
}

}  // namespace macroreal
