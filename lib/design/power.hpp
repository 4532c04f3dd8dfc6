// Normal-approximation power and sample size of the three tests a campaign is planned for.
// The estimator T^ of the tested quantity is taken as Normal(theta, se1^2), se1 its standard
// error at the true (model) value; a z statistic uses the standard error se0 it would use
// under its null. With a fixed allocation shape the variances scale as 1/t (t = lab seconds
// or total shots): se = sd / sqrt(t), sd the "per unit" standard deviation.
//
//   one-sided, H0: theta <= bound:     power = Phi((theta - bound) / se1 - z_{1-alpha})
//       (se0 = se1: the statistic uses the plug-in SE at the data, close to se1)
//       t = (z_{1-alpha} + z_{1-beta})^2 sd^2 / (theta - bound)^2
//   two-sided, H0: theta = 0:          power = Phi((theta - z_{1-alpha/2} se0) / se1)
//                                            + Phi((-theta - z_{1-alpha/2} se0) / se1)
//       closed form (far tail neglected) t = (z_{1-alpha/2} sd0 + z_{1-beta} sd1)^2 / theta^2
//   TOST, H0: |theta| >= m:            rejects when -m + z se_lo < T^ < m - z se_hi,
//                                      power = Phi((m - z se_hi - theta) / se1)
//                                            - Phi((-m + z se_lo - theta) / se1), >= 0
//       closed form t = (z_{1-alpha} + z_{1-beta/2})^2 sd^2 / (m - |theta|)^2 (exact when
//       theta = 0 and se_lo = se_hi = se1; conservative otherwise)
// References: Chow, Shao & Wang, Sample Size Calculations in Clinical Research, 2nd ed.
// (2008), sec. 3.1 (one-sample mean: two-sided test p. 51, non-inferiority p. 52, equivalence)
// and sec. 3.2 (two-sample equivalence, example 3.2.4); Rosner, Fundamentals of
// Biostatistics, 7th ed. (2010), pp. 224, 230 (one-sided test of a mean); Schuirmann,
// J. Pharmacokinet. Biopharm. 15:657 (1987) for the TOST procedure.
// Exact solutions of power(t) = target are found by bisection in log t (the power functions
// increase in t wherever they exceed alpha).
#pragma once

#include <functional>

namespace macroreal {

double z_quantile(double p);         // Phi^-1(p), p in (0, 1)
double normal_cdf(double x);         // Phi(x)

double power_one_sided(double theta_minus_bound, double se1, double alpha);
double power_two_sided(double theta, double se0, double se1, double alpha);
double power_tost(double theta, double margin, double se_lo, double se_hi, double se1, double alpha);

// Closed-form sample sizes in units of t (see above); DomainError when the effect is 0 or of
// the wrong sign, or alpha / power outside (0, 1).
double units_one_sided(double theta_minus_bound, double sd1, double alpha, double power);
double units_two_sided(double theta, double sd0, double sd1, double alpha, double power);
double units_tost(double theta, double margin, double sd1, double alpha, double power);

// Smallest t (relative precision 1e-10) with power_at(t) >= target, power_at increasing;
// bracketing starts from `guess` (> 0). Throws DomainError when no t up to 1e30 * guess
// reaches the target.
double solve_units(const std::function<double(double)>& power_at, double target, double guess);

}  // namespace macroreal
