#!/usr/bin/python3
"""Reference values of the Gaussian significance of p-values for
tests/stats/test_gaussian_sigma.cpp, computed with SciPy (scipy.stats.norm.isf, SciPy 1.10).

  one-sided test: sigma = norm.isf(p) = Phi^-1(1 - p), reported as 0 when p >= 1/2
  two-sided test: sigma = norm.isf(p / 2) = Phi^-1(1 - p/2), the |z| of a two-sided z test
Also the two-sided z-test p-values 2 * norm.sf(|z|) of the z values used there, and for two
binomials (30 of 100 against 45 of 100) the Pearson chi-square of the 2 x 2 table without
continuity correction (scipy.stats.chi2_contingency): its square root is the |z| of the pooled
two-proportion score test, so the two-sided sigma of that test must equal it.
Run: /usr/bin/python3 tests/reference/scipy_gaussian_sigma.py > tests/reference/scipy_gaussian_sigma.json
"""
import json

from scipy.stats import chi2_contingency, norm

one = [1e-300, 1e-12, 0.00134989803163009, 0.0227501319481792, 0.3, 0.49999]
two = [1e-300, 1e-12, 0.0026997960632601866, 0.05, 0.1748, 0.5, 0.7041, 0.99]
zs = [0.3798, 1.3569, 2.5]
chi = chi2_contingency([[30, 70], [45, 55]], correction=False)
print(json.dumps({
    "one_sided_isf_p": [[p, float(norm.isf(p))] for p in one],
    "one_sided_isf_p_above_half": [[p, float(norm.isf(p))] for p in [0.5, 0.7, 0.9]],
    "two_sided_isf_half_p": [[p, float(norm.isf(p / 2))] for p in two],
    "two_sided_p_of_z": [[z, float(2 * norm.sf(z))] for z in zs],
    "score_30_of_100_vs_45_of_100": {
        "chi2": float(chi.statistic), "p": float(chi.pvalue), "sqrt_chi2": float(chi.statistic ** 0.5)},
}, indent=1))
