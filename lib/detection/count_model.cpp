#include "detection/count_model.hpp"

#include <cmath>

#include <boost/math/quadrature/gauss.hpp>
#include <boost/math/special_functions/gamma.hpp>

#include "core/error.hpp"
#include "phase_space/number_text.hpp"

namespace macroreal {

namespace {

using detail::number_text;

constexpr int kPanels = 8;

// Calls f(u, weight) at the composite Gauss-Legendre nodes of [0, 1].
template <class F>
void for_each_node(F&& f) {
  using rule = boost::math::quadrature::gauss<double, 15>;
  const auto& x = rule::abscissa();
  const auto& w = rule::weights();
  const double h = 1.0 / kPanels;
  for (int p = 0; p < kPanels; ++p) {
    const double mid = (p + 0.5) * h;
    for (std::size_t i = 0; i < x.size(); ++i) {
      // boost stores non-negative abscissae only; a zero abscissa is the odd rule's centre.
      if (x[i] == 0) {
        f(mid, w[i] * h / 2);
      } else {
        f(mid - x[i] * h / 2, w[i] * h / 2);
        f(mid + x[i] * h / 2, w[i] * h / 2);
      }
    }
  }
}

// Adds weight * Pois(n; lambda) for n = 0..n_max into out.
void add_poisson(std::vector<double>& out, double lambda, double weight) {
  if (lambda <= 0) {
    out[0] += weight;
    return;
  }
  const double log_lambda = std::log(lambda);
  for (std::size_t n = 0; n < out.size(); ++n)
    out[n] += weight * std::exp(static_cast<double>(n) * log_lambda - lambda -
                                std::lgamma(static_cast<double>(n) + 1.0));
}

}  // namespace

void validate(const CountModel& m) {
  if (!(m.dark_rate >= 0) || !std::isfinite(m.dark_rate))
    throw DomainError("dark rate = " + number_text(m.dark_rate) + ", but must be >= 0 and finite");
  if (!(m.bright_rate > m.dark_rate) || !std::isfinite(m.bright_rate))
    throw DomainError("bright rate = " + number_text(m.bright_rate) +
                      ", but must be finite and above the dark rate " + number_text(m.dark_rate));
  if (!(m.pump_per_window >= 0) || !std::isfinite(m.pump_per_window))
    throw DomainError("pump_per_window = " + number_text(m.pump_per_window) + ", but must be >= 0");
}

double poisson_probability(long n, double lambda) {
  if (n < 0) return 0;
  if (lambda <= 0) return n == 0 ? 1.0 : 0.0;
  return std::exp(static_cast<double>(n) * std::log(lambda) - lambda -
                  std::lgamma(static_cast<double>(n) + 1.0));
}

double poisson_lower_tail(long n, double lambda) {
  if (n < 0) return 0;
  if (lambda <= 0) return 1;
  return boost::math::gamma_q(static_cast<double>(n) + 1.0, lambda);
}

double poisson_upper_tail(long n, double lambda) {
  if (n < 0) return 1;
  if (lambda <= 0) return 0;
  return boost::math::gamma_p(static_cast<double>(n) + 1.0, lambda);
}

std::vector<double> dark_pmf(const CountModel& m, long n_max) {
  std::vector<double> out(static_cast<std::size_t>(std::max(0L, n_max) + 1), 0.0);
  const double a = m.pump_per_window;
  add_poisson(out, m.dark_rate, std::exp(-a));
  if (a > 0) {
    const double delta = m.bright_rate - m.dark_rate;
    for_each_node([&](double u, double w) {
      add_poisson(out, m.dark_rate + delta * (1 - u), w * a * std::exp(-a * u));
    });
  }
  return out;
}

std::vector<double> bright_pmf(const CountModel& m, long n_max) {
  std::vector<double> out(static_cast<std::size_t>(std::max(0L, n_max) + 1), 0.0);
  add_poisson(out, m.bright_rate, 1.0);
  return out;
}

Misassignment misassignment(const CountModel& m, long threshold) {
  Misassignment e;
  const double a = m.pump_per_window;
  e.dark_read_bright = std::exp(-a) * poisson_upper_tail(threshold, m.dark_rate);
  if (a > 0) {
    const double delta = m.bright_rate - m.dark_rate;
    for_each_node([&](double u, double w) {
      e.dark_read_bright += w * a * std::exp(-a * u) * poisson_upper_tail(threshold, m.dark_rate + delta * (1 - u));
    });
  }
  e.bright_read_dark = poisson_lower_tail(threshold, m.bright_rate);
  return e;
}

CountModel scaled_window(const CountModel& m, double factor) {
  if (!(factor > 0) || !std::isfinite(factor))
    throw DomainError("window factor = " + number_text(factor) + ", but must be > 0");
  return {m.dark_rate * factor, m.bright_rate * factor, m.pump_per_window * factor};
}

}  // namespace macroreal
