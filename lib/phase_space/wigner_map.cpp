#include "phase_space/wigner_map.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>

#include <Eigen/Dense>

#include "core/error.hpp"

namespace macroreal {

namespace {

// Largest |beta| (up to 60) where |chi| still exceeds 1e-12 on any of 16 rays.
double scan_chi_extent(const State& state) {
  double extent = 1.0;
  for (int k = 0; k < 16; ++k) {
    const double angle = 2.0 * std::numbers::pi * k / 16.0;
    const cplx dir = std::polar(1.0, angle);
    for (double r = 0.25; r <= 60.0; r += 0.25)
      if (std::abs(state.characteristic(r * dir)) > 1e-12) extent = std::max(extent, r);
  }
  return extent + 0.5;
}

}  // namespace

WignerMap wigner_map(const State& state, double half_width, int points, double chi_extent) {
  if (points < 2) throw DomainError("wigner_map: need at least 2 points per axis");
  if (!(half_width > 0)) throw DomainError("wigner_map: half_width must be positive");
  WignerMap out;
  out.chi_extent = chi_extent > 0 ? chi_extent : scan_chi_extent(state);
  const double B = out.chi_extent;
  // Periodic images of W repeat every pi/h in alpha; the state itself extends about B/2 +
  // a few units (chi's extent mirrors |alpha| of its components), so keep pi/h beyond
  // 2 * (half_width + B) and never coarser than 0.1.
  const double h = std::min(0.1, std::numbers::pi / (2.0 * (half_width + B)));
  const int m = 2 * static_cast<int>(std::ceil(B / h)) + 1;
  out.chi_points = m;
  std::vector<double> b(m);
  for (int k = 0; k < m; ++k) b[k] = -B + k * (2.0 * B / (m - 1));
  const double hb = 2.0 * B / (m - 1);

  Eigen::MatrixXcd chi(m, m);  // chi(b_r + i b_i), rows: Re beta, columns: Im beta
  for (int r = 0; r < m; ++r)
    for (int i = 0; i < m; ++i) chi(r, i) = state.characteristic(cplx(b[r], b[i]));

  out.re_alpha.resize(points);
  out.im_alpha.resize(points);
  for (int k = 0; k < points; ++k)
    out.re_alpha[k] = out.im_alpha[k] = -half_width + k * (2.0 * half_width / (points - 1));

  // W(a_r + i a_i) = (h^2/pi^2) sum_{r,i} e^{2i a_i b_r} chi(r, i) e^{-2i a_r b_i}
  Eigen::MatrixXcd ey(points, m), ex(points, m);
  for (int q = 0; q < points; ++q)
    for (int k = 0; k < m; ++k) {
      ey(q, k) = std::polar(1.0, 2.0 * out.im_alpha[q] * b[k]);
      ex(q, k) = std::polar(1.0, -2.0 * out.re_alpha[q] * b[k]);
    }
  const Eigen::MatrixXcd wt = ey * chi * ex.transpose();  // wt(q, p): Im alpha q, Re alpha p
  const double scale = hb * hb / (std::numbers::pi * std::numbers::pi);
  out.w.assign(points, std::vector<double>(points));
  out.min_value = std::numeric_limits<double>::infinity();
  const double da = 2.0 * half_width / (points - 1);
  double integral = 0.0;
  for (int p = 0; p < points; ++p)
    for (int q = 0; q < points; ++q) {
      const double v = scale * wt(q, p).real();
      out.w[p][q] = v;
      out.min_value = std::min(out.min_value, v);
      const double weight = (p == 0 || p == points - 1 ? 0.5 : 1.0) *
                            (q == 0 || q == points - 1 ? 0.5 : 1.0);
      integral += weight * v;
    }
  out.integral = integral * da * da;
  return out;
}

}  // namespace macroreal
