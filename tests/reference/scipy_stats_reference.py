#!/usr/bin/python3
"""Reference values for tests/stats/test_inference_reference.cpp, computed with SciPy.

Sources (each value in the JSON says which):
  * scipy.stats.bootstrap (SciPy 1.10), multi-sample, paired=False, n_resamples=100000,
    methods 'BCa', 'percentile', 'basic', on invented per-shot arrays; the statistic is the
    non-pooled K = C_AB + C_BC - C_AC (6 samples) or S = P_B(+) - P_AB(+,+) - P_AB(-,+)
    (3 samples), each the sum of the sample means of per-shot terms. The BCa acceleration is
    taken from scipy.stats._resampling._bca_interval (the function scipy.stats.bootstrap uses)
    and, independently, from a brute-force per-shot stratified jackknife written here.
  * scipy.stats.barnard_exact (two-sided, pooled) and a brute-force 20001-point grid maximum
    of the same p-value function.
  * scipy.stats.boschloo_exact (two-sided: twice the smaller one-sided p) and a brute-force
    20001-point grid maximum of the one-sided p-value functions, with Fisher's one-sided
    p-values from scipy.stats.hypergeom.
  * scipy.stats.chi2_contingency(correction=False): the Pearson chi-square p-value equals the
    two-sided pooled z (score) test of two proportions.
  * scipy.stats.binomtest(alternative='greater'): exact one-sided binomial p-value, which the
    parametric bootstrap of a single binomial must reproduce (the studentised statistic is
    checked here to be monotone in x, so both tests have the same rejection region).
  * Hoeffding (1963) and empirical-Bernstein (Maurer & Pontil 2009, Thm 4) p-values, TOST with
    restricted-MLE variances (scipy.optimize.minimize_scalar), Holm and Benjamini-Hochberg
    adjusted p-values: independent implementations written in this script (statsmodels is not
    available on Debian 12's default set), plus the 15 p-values of Benjamini & Hochberg, JRSS B
    57:289 (1995), section 4.2 (values from memory).
Run: /usr/bin/python3 tests/reference/scipy_stats_reference.py > tests/reference/scipy_stats_reference.json
"""
import json
import math

import numpy as np
import scipy
from scipy import optimize, stats
from scipy.stats import _resampling

# ---- invented data: destructive-readout LG three-time campaign, 6 sequences -----------------
# Cells per sequence (campaign_counts.hpp layout): [dark,+], [dark,-], [bright at step 1].
# AB+: ["++", "+-", "-"], AB-: ["-+", "--", "+"]; likewise BC, AC.
K_COUNTS = {
    "AB+": [17, 6, 9], "AB-": [5, 14, 10],
    "BC+": [19, 5, 7], "BC-": [4, 15, 9],
    "AC+": [9, 12, 10], "AC-": [11, 8, 11],
}
K_ORDER = ["AB+", "AB-", "BC+", "BC-", "AC+", "AC-"]
# Per-shot term of each cell: sign * a * b for the full strings, 0 for the bright cell.
K_COEF = {
    "AB+": [1, -1, 0], "AB-": [-1, 1, 0],
    "BC+": [1, -1, 0], "BC-": [-1, 1, 0],
    "AC+": [-1, 1, 0], "AC-": [1, -1, 0],
}
# NSIT A->B: [B] cells ["+", "-"]; AB+ and AB- as above.
S_COUNTS = {"B": [21, 19], "AB+": [14, 9, 12], "AB-": [6, 15, 11]}
S_ORDER = ["B", "AB+", "AB-"]
S_COEF = {"B": [1, 0], "AB+": [-1, 0, 0], "AB-": [-1, 0, 0]}


def shot_arrays(counts, coef, order):
    return [np.repeat(np.array(coef[k], dtype=float), counts[k]) for k in order]


def sum_of_means(*samples, axis=-1):
    return sum(np.mean(s, axis=axis) for s in samples)


def brute_jackknife_a(samples):
    num = den = 0.0
    for h, x in enumerate(samples):
        n = len(x)
        loo = []
        for i in range(n):
            y = list(samples)
            y[h] = np.delete(x, i)
            loo.append(sum_of_means(*y))
        loo = np.array(loo)
        u = (n - 1) * (loo.mean() - loo)
        num += (u ** 3).sum() / n ** 3
        den += (u ** 2).sum() / n ** 2
    return num / (6 * den ** 1.5)


def bootstrap_case(name, counts, coef, order, seed):
    samples = shot_arrays(counts, coef, order)
    out = {"name": name, "sequences": order, "counts": [counts[k] for k in order],
           "coef": [coef[k] for k in order], "n_resamples": 100000, "level": 0.95,
           "estimate": float(sum_of_means(*samples))}
    for method in ["BCa", "percentile", "basic"]:
        res = stats.bootstrap(samples, sum_of_means, n_resamples=100000, confidence_level=0.95,
                              method=method, paired=False, vectorized=True,
                              random_state=np.random.default_rng(seed))
        out[method.lower()] = [float(res.confidence_interval.low), float(res.confidence_interval.high)]
        out["bootstrap_se"] = float(res.standard_error)
    # scipy's own acceleration (same function bootstrap() calls) and an independent one.
    theta_b = np.array([0.0, 1.0])  # z0 part unused here; only a_hat is read
    with np.errstate(divide="ignore", invalid="ignore"):
        _, _, a_hat = _resampling._bca_interval(samples, sum_of_means, axis=-1, alpha=0.025,
                                                theta_hat_b=theta_b[None, :], batch=None)
    out["acceleration_scipy"] = float(np.asarray(a_hat).ravel()[0])
    out["acceleration_bruteforce"] = float(brute_jackknife_a(samples))
    return out


def barnard_grid(x1, n1, x2, n2, points=20001):
    a = np.arange(n1 + 1)[:, None]
    b = np.arange(n2 + 1)[None, :]
    p1, p2 = a / n1, b / n2
    p = (a + b) / (n1 + n2)
    with np.errstate(divide="ignore", invalid="ignore"):
        w = (p1 - p2) / np.sqrt(p * (1 - p) * (1 / n1 + 1 / n2))
    w[p1 == p2] = 0
    region = np.abs(w) >= abs(w[x1, x2]) * (1 - 1e-12)
    best = 0.0
    for pi in np.linspace(0, 1, points):
        pm = stats.binom.pmf(np.arange(n1 + 1), n1, pi)[:, None] * stats.binom.pmf(np.arange(n2 + 1), n2, pi)[None, :]
        best = max(best, pm[region].sum())
    return float(best), float(w[x1, x2])


def boschloo_grid(x1, n1, x2, n2, points=20001):
    a = np.arange(n1 + 1)[:, None]
    b = np.arange(n2 + 1)[None, :]
    total = n1 + n2
    less = stats.hypergeom.cdf(a, total, a + b, n1)      # P(X1 <= a | a + b)
    greater = stats.hypergeom.sf(a - 1, total, a + b, n1)  # P(X1 >= a | a + b)
    pis = np.linspace(0, 1, points)
    out = []
    for fisher in (less, greater):
        region = fisher <= fisher[x1, x2] * (1 + 1e-12)
        best = 0.0
        for pi in pis:
            pm = stats.binom.pmf(np.arange(n1 + 1), n1, pi)[:, None] * stats.binom.pmf(np.arange(n2 + 1), n2, pi)[None, :]
            best = max(best, pm[region].sum())
        out.append(best)
    return float(min(1.0, 2 * min(out)))


def restricted_var(x1, n1, x2, n2, d):
    # max loglik over p1 - p2 = d; returns Var(p1^ - p2^) at the restricted fit
    def nll(p2):
        p1 = p2 + d
        return -(x1 * math.log(p1) + (n1 - x1) * math.log(1 - p1) + x2 * math.log(p2) + (n2 - x2) * math.log(1 - p2))
    lo, hi = max(0.0, -d) + 1e-12, min(1.0, 1 - d) - 1e-12
    r = optimize.minimize_scalar(nll, bounds=(lo, hi), method="bounded", options={"xatol": 1e-13})
    p2 = r.x
    p1 = p2 + d
    return p1 * (1 - p1) / n1 + p2 * (1 - p2) / n2


def tost(x1, n1, x2, n2, margin):
    est = x1 / n1 - x2 / n2
    p_hi = stats.norm.cdf((est - margin) / math.sqrt(restricted_var(x1, n1, x2, n2, margin)))
    p_lo = stats.norm.sf((est + margin) / math.sqrt(restricted_var(x1, n1, x2, n2, -margin)))
    return max(p_hi, p_lo)


def hoeffding(counts, coef, order, bound):
    est = sum(np.dot(coef[k], counts[k]) / sum(counts[k]) for k in order)
    den = sum((max(coef[k]) - min(coef[k])) ** 2 / sum(counts[k]) for k in order if any(coef[k]))
    t = est - bound
    return est, (math.exp(-2 * t * t / den) if t > 0 else 1.0)


def emp_bernstein(counts, coef, order, bound):
    parts = []
    for k in order:
        c = np.array(coef[k], float)
        if not c.any():
            continue
        n = sum(counts[k])
        y = np.repeat((c - c.min()) / (c.max() - c.min()), counts[k])
        parts.append((c.min(), c.max() - c.min(), y.mean(), y.var(ddof=1), n))
    S = len(parts)

    def lcb(d):
        lg = math.log(2 * S / d)
        return sum(cm + R * max(0.0, m - math.sqrt(2 * v * lg / n) - 7 * lg / (3 * (n - 1))) for cm, R, m, v, n in parts)

    if lcb(1.0) <= bound:
        return 1.0
    lo, hi = math.log(1e-300), 0.0
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        if lcb(math.exp(mid)) > bound:
            hi = mid
        else:
            lo = mid
    return math.exp(hi)


def holm(p):
    m = len(p)
    idx = np.argsort(p, kind="stable")
    out = np.empty(m)
    run = 0.0
    for i, j in enumerate(idx):
        run = max(run, min(1.0, (m - i) * p[j]))
        out[j] = run
    return out.tolist()


def bh(p):
    m = len(p)
    idx = np.argsort(p, kind="stable")
    out = np.empty(m)
    run = 1.0
    for r in range(m - 1, -1, -1):
        j = idx[r]
        run = min(run, min(1.0, m * p[j] / (r + 1)))
        out[j] = run
    return out.tolist()


def main():
    ref = {"source": f"SciPy {scipy.__version__}, NumPy {np.__version__}"}
    ref["bootstrap"] = [bootstrap_case("K", K_COUNTS, K_COEF, K_ORDER, 12345),
                        bootstrap_case("S", S_COUNTS, S_COEF, S_ORDER, 54321)]
    tables = [(7, 12, 2, 10), (14, 30, 23, 30), (0, 15, 5, 15), (20, 50, 20, 50), (45, 60, 30, 55)]
    ref["two_binomial"] = []
    for x1, n1, x2, n2 in tables:
        bar = stats.barnard_exact([[x1, x2], [n1 - x1, n2 - x2]], alternative="two-sided", pooled=True)
        grid, w = barnard_grid(x1, n1, x2, n2)
        bos = stats.boschloo_exact([[x1, x2], [n1 - x1, n2 - x2]], alternative="two-sided")
        chi = stats.chi2_contingency([[x1, x2], [n1 - x1, n2 - x2]], correction=False)
        ref["two_binomial"].append({
            "x1": x1, "n1": n1, "x2": x2, "n2": n2, "wald": w,
            "barnard_scipy": float(bar.pvalue), "barnard_grid": grid,
            "boschloo_scipy": float(bos.pvalue), "boschloo_statistic_scipy": float(bos.statistic),
            "boschloo_grid": boschloo_grid(x1, n1, x2, n2),
            "score_chi2_p": float(chi[1]) if (x1 + x2) not in (0, n1 + n2) else 1.0,
            "tost_margin": 0.2, "tost_p": tost(x1, n1, x2, n2, 0.2) if 0 < x1 < n1 and 0 < x2 < n2 else None,
        })
    # single binomial: parametric bootstrap vs exact binomial test
    n, x, p0 = 40, 19, 0.3
    T = [(k / n - p0) / math.sqrt(((k + 0.5) / (n + 1)) * (1 - (k + 0.5) / (n + 1)) / n) for k in range(n + 1)]
    monotone = all((T[k] >= T[x]) == (k >= x) for k in range(n + 1))
    ref["binomial"] = {"n": n, "x": x, "p0": p0, "monotone_statistic": monotone,
                       "binomtest_greater": float(stats.binomtest(x, n, p0, alternative="greater").pvalue)}
    ref["finite_sample"] = []
    big = {k: [30 * c for c in v] for k, v in K_COUNTS.items()}
    for counts, bound in [(K_COUNTS, 0.5), (big, 1.0), (big, 1.5)]:
        est, hp = hoeffding(counts, K_COEF, K_ORDER, bound)
        ref["finite_sample"].append({"counts": [counts[k] for k in K_ORDER], "bound": bound,
                                     "estimate": float(est), "hoeffding_p": hp,
                                     "empirical_bernstein_p": emp_bernstein(counts, K_COEF, K_ORDER, bound)})
    # NSIT S (S_COUNTS): two-sided Hoeffding = twice the smaller one-sided bound.
    neg = {k: [-c for c in v] for k, v in S_COEF.items()}
    s_est, h_up = hoeffding(S_COUNTS, S_COEF, S_ORDER, 0.0)
    _, h_down = hoeffding(S_COUNTS, neg, S_ORDER, 0.0)
    s_big = {k: [8 * c for c in v] for k, v in S_COUNTS.items()}
    _, hb_up = hoeffding(s_big, S_COEF, S_ORDER, 0.0)
    _, hb_down = hoeffding(s_big, neg, S_ORDER, 0.0)
    ref["nsit_hoeffding"] = [{"counts": [S_COUNTS[k] for k in S_ORDER], "estimate": float(s_est),
                              "p": min(1.0, 2 * min(h_up, h_down))},
                             {"counts": [s_big[k] for k in S_ORDER], "p": min(1.0, 2 * min(hb_up, hb_down))}]
    bh15 = [0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.3240,
            0.4262, 0.5719, 0.6528, 0.7590, 1.000]
    mixed = [0.04, 0.001, 0.03, 0.5, 0.012, 0.012, 0.2]
    ref["multiplicity"] = [{"p": bh15, "holm": holm(bh15), "bh": bh(bh15)},
                           {"p": mixed, "holm": holm(mixed), "bh": bh(mixed)}]
    print(json.dumps(ref, indent=1))


if __name__ == "__main__":
    main()
