#!/usr/bin/python3
"""Reference values for tests/stats/test_proportion_intervals.cpp, computed with SciPy.

Wilson score interval from its closed form (Wilson, J. Am. Stat. Assoc. 22:209 (1927)) with
z = scipy.stats.norm.ppf(1 - alpha/2); Clopper-Pearson from scipy.stats.beta.ppf
(Clopper & Pearson, Biometrika 26:404 (1934)) and, independently, from
scipy.stats.binomtest(k, n).proportion_ci(method='exact'); Newcombe's hybrid score interval
for p1 - p2 from the two Wilson intervals (Newcombe, Stat. Med. 17:873 (1998), method 10).
Run: /usr/bin/python3 tests/reference/scipy_proportions.py > tests/reference/scipy_proportions.json
"""
import json
import math

import scipy
from scipy import stats


def wilson(k, n, level):
    z = stats.norm.ppf(1 - (1 - level) / 2)
    p = k / n
    denom = 1 + z * z / n
    centre = (p + z * z / (2 * n)) / denom
    half = z / denom * math.sqrt(p * (1 - p) / n + z * z / (4 * n * n))
    lo = 0.0 if k == 0 else max(0.0, centre - half)
    hi = 1.0 if k == n else min(1.0, centre + half)
    return lo, hi


def clopper_pearson_beta(k, n, level):
    a = (1 - level) / 2
    lo = 0.0 if k == 0 else stats.beta.ppf(a, k, n - k + 1)
    hi = 1.0 if k == n else stats.beta.ppf(1 - a, k + 1, n - k)
    return float(lo), float(hi)


def clopper_pearson_binomtest(k, n, level):
    ci = stats.binomtest(k, n).proportion_ci(confidence_level=level, method='exact')
    return float(ci.low), float(ci.high)


def newcombe(k1, n1, k2, n2, level):
    l1, u1 = wilson(k1, n1, level)
    l2, u2 = wilson(k2, n2, level)
    p1, p2 = k1 / n1, k2 / n2
    d = p1 - p2
    return (d - math.sqrt((p1 - l1) ** 2 + (u2 - p2) ** 2),
            d + math.sqrt((u1 - p1) ** 2 + (p2 - l2) ** 2))


single = [(0, 10), (1, 10), (5, 10), (10, 10), (56, 70), (48, 80), (3, 1000), (999, 1000),
          (0, 1), (1, 1), (17, 29), (412, 1000), (81, 263)]
pairs = [(56, 70, 48, 80), (9, 10, 3, 10), (6, 7, 2, 7), (5, 56, 0, 29), (0, 10, 0, 20),
         (0, 10, 0, 10), (10, 10, 0, 20), (412, 800, 388, 800)]
levels = [0.95, 0.99, 0.9]

out = {"source": "SciPy " + scipy.__version__ + " (scipy.stats.norm, beta, binomtest)",
       "proportions": [], "differences": []}
for level in levels:
    for k, n in single:
        out["proportions"].append({
            "k": k, "n": n, "level": level,
            "wilson": wilson(k, n, level),
            "clopper_pearson_beta": clopper_pearson_beta(k, n, level),
            "clopper_pearson_binomtest": clopper_pearson_binomtest(k, n, level)})
    for k1, n1, k2, n2 in pairs:
        out["differences"].append({"k1": k1, "n1": n1, "k2": k2, "n2": n2, "level": level,
                                   "newcombe": newcombe(k1, n1, k2, n2, level)})
print(json.dumps(out, indent=1))
