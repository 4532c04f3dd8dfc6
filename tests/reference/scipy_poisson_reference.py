#!/usr/bin/python3
"""Reference values for lib/detection/count_model (photon-count distributions).

Source: scipy.stats.poisson (pmf, cdf, sf) and, for the dark-pumped-to-bright readout model
  P_dark(n) = exp(-a) Pois(n; d) + int_0^1 a exp(-a u) Pois(n; d + (b - d)(1 - u)) du
(M. Acton et al., Quantum Inf. Comput. 6:465 (2006), from memory), scipy.integrate.quad of the
integral with scipy.stats.poisson inside. Run: /usr/bin/python3 scipy_poisson_reference.py > scipy_poisson_reference.json
"""
import json
import math
import sys

import scipy
from scipy import integrate, stats

poisson = []
for lam in [0.05, 0.3, 1.0, 2.5, 7.0, 12.0, 30.0, 80.0]:
    for n in [0, 1, 2, 3, 5, 8, 13, 21, 40, 60, 120]:
        poisson.append({"n": n, "lambda": lam,
                        "pmf": float(stats.poisson.pmf(n, lam)),
                        "cdf": float(stats.poisson.cdf(n, lam)),
                        "sf": float(stats.poisson.sf(n, lam))})


def dark_pmf(n, d, b, a):
    f = lambda u: a * math.exp(-a * u) * stats.poisson.pmf(n, d + (b - d) * (1 - u))
    val, _ = integrate.quad(f, 0.0, 1.0, epsabs=1e-15, epsrel=1e-12, limit=200)
    return math.exp(-a) * stats.poisson.pmf(n, d) + val


def dark_sf(t, d, b, a):
    f = lambda u: a * math.exp(-a * u) * stats.poisson.sf(t, d + (b - d) * (1 - u))
    val, _ = integrate.quad(f, 0.0, 1.0, epsabs=1e-16, epsrel=1e-12, limit=200)
    return math.exp(-a) * stats.poisson.sf(t, d) + val


decay = []
for (d, b, a) in [(0.1, 8.0, 0.01), (0.2, 15.0, 0.05), (0.5, 30.0, 0.3), (0.05, 4.0, 1.0)]:
    decay.append({"dark": d, "bright": b, "pump_per_window": a,
                  "pmf": [dark_pmf(n, d, b, a) for n in range(0, 45)],
                  "sf": [dark_sf(t, d, b, a) for t in range(0, 8)]})

json.dump({"source": "scipy.stats.poisson and scipy.integrate.quad, scipy " + scipy.__version__,
           "poisson": poisson, "dark_pumped_to_bright": decay}, sys.stdout, indent=1)
sys.stdout.write("\n")
