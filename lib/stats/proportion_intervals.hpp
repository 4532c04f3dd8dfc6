// Confidence intervals for a binomial proportion and for the difference of two independent
// proportions.
//   Wilson score interval: Wilson, J. Am. Stat. Assoc. 22:209 (1927);
//   Clopper-Pearson exact interval: Clopper & Pearson, Biometrika 26:404 (1934), through
//     Boost.Math's binomial_distribution bounds;
//   hybrid score interval for p1 - p2 from the two Wilson intervals: Newcombe, Stat. Med.
//     17:873 (1998), method 10:
//       L = d - sqrt((p1 - l1)^2 + (u2 - p2)^2),  U = d + sqrt((u1 - p1)^2 + (p2 - l2)^2).
// Counts are reals so that weighted counts fit; they must satisfy 0 <= k <= n, n > 0, and
// the level must lie in (0, 1); otherwise DomainError naming the value.
#pragma once

#include <string>

namespace macroreal {

struct ProportionInterval {
  double lower = 0.0;
  double upper = 0.0;
  double level = 0.95;   // two-sided confidence level
  std::string method;    // "wilson", "clopper-pearson", "newcombe-hybrid-score"
};

ProportionInterval wilson_interval(double successes, double trials, double level = 0.95);
ProportionInterval clopper_pearson_interval(double successes, double trials, double level = 0.95);
// Interval for p1 - p2 with p1 = k1/n1, p2 = k2/n2 (Newcombe 1998, method 10).
ProportionInterval newcombe_difference_interval(double k1, double n1, double k2, double n2,
                                                double level = 0.95);

}  // namespace macroreal
