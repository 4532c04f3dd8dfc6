#!/usr/bin/python3
"""Settings search behind protocols/lg3_prepared_cat_conclusive.json (noise-free, ideal).

State: the ground state after one symmetric modular measurement M(beta0, phi0), outcome +
kept, i.e. the cat (|-beta0/2> + e^{i phi0} |beta0/2>) / norm. Its characteristic function,
from D(a) D(g) D(-a) = e^{2i Im(a g*)} D(g) and D(a) D(g) D(a) = D(g + 2a) (DESIGN.md
section 2) with a = beta0/2 and the vacuum chi0(g) = exp(-|g|^2/2):
    chi(g) = [2 cos(2 Im(a g*)) chi0(g) + e^{i phi0} chi0(g + beta0) + e^{-i phi0} chi0(g - beta0)]
             / [2 + 2 cos(phi0) exp(-|beta0|^2/2)].
For the symmetric split the signed Kraus sandwich multiplies Weyl symbols without a phase, so
    C_ij = 1/2 Re[e^{i(phi_i + phi_j)} chi(beta_i + beta_j) + e^{i(phi_j - phi_i)} chi(beta_j - beta_i)].
The scan maximises K = C_AB + C_BC - C_AC over equal moduli |beta_k| = b, the directions and
the phases (Nelder-Mead from random starts, fixed seed). The shipped file rounds the optimum
(b = 2, angles 0, -15, -165 deg, phases 270, 90, 90 deg) and adds a small heating rate; run
`macroreal predict` on it for the values with noise. tests/reference/qutip_predict_reference.py
checks the rounded settings in a truncated Fock basis.

Usage: /usr/bin/python3 scan_lg3_prepared_cat.py [beta0] [starts]
"""
import cmath
import math
import sys

import numpy as np
from scipy.optimize import minimize


def chi_cat(g, beta0, phi0):
    a = beta0 / 2
    chi0 = lambda z: math.exp(-abs(z) ** 2 / 2)
    im = (a * g.conjugate()).imag
    num = (2 * math.cos(2 * im) * chi0(g) + cmath.exp(1j * phi0) * chi0(g + beta0) +
           cmath.exp(-1j * phi0) * chi0(g - beta0))
    return num / (2 + 2 * math.cos(phi0) * math.exp(-abs(beta0) ** 2 / 2))


def corr(chi, m1, m2):
    (b1, p1), (b2, p2) = m1, m2
    return 0.5 * (cmath.exp(1j * (p1 + p2)) * chi(b1 + b2) +
                  cmath.exp(1j * (p2 - p1)) * chi(b2 - b1)).real


def k3(chi, ms):
    return corr(chi, ms[0], ms[1]) + corr(chi, ms[1], ms[2]) - corr(chi, ms[0], ms[2])


def settings(x):
    return [(x[0] * cmath.exp(1j * x[1 + 2 * k]), x[2 + 2 * k]) for k in range(3)]


def main():
    beta0 = float(sys.argv[1]) if len(sys.argv) > 1 else 4.0
    starts = int(sys.argv[2]) if len(sys.argv) > 2 else 100
    chi = lambda g: chi_cat(g, beta0, 0.0)
    rng = np.random.default_rng(1)
    best = (-9.0, None)
    for _ in range(starts):
        x0 = rng.uniform(-3, 3, 7)
        x0[0] = rng.uniform(0.5, 4)
        # Keep |beta| >= 0.5: a vanishing displacement is no measurement.
        f = lambda x: -k3(chi, settings(x)) + (100 * (0.5 - x[0]) ** 2 if abs(x[0]) < 0.5 else 0)
        r = minimize(f, x0, method="Nelder-Mead", options={"maxiter": 4000, "xatol": 1e-10})
        if -r.fun > best[0]:
            best = (-r.fun, r.x)
    print("beta0 = %g: K_max = %.5f" % (beta0, best[0]))
    for name, (b, p) in zip("ABC", settings(best[1])):
        print("  %s: |beta| %.4f angle %.2f deg phase %.2f deg" %
              (name, abs(b), math.degrees(cmath.phase(b)), math.degrees(p) % 360))
    rounded = [(cmath.rect(2, math.radians(t)), math.radians(p))
               for t, p in [(0, 270), (-15, 90), (-165, 90)]]
    print("rounded shipped settings: K = %.5f" % k3(chi, rounded))


if __name__ == "__main__":
    main()
