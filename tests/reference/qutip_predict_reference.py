#!/usr/bin/python3
"""Reference sequence probabilities and LG/NSIT values for tests/protocol/test_prediction.cpp.

Independent of the Weyl algebra: states and Kraus operators are matrices in a truncated Fock
basis built with QuTiP (displace, basis, thermal_dm), and sequence probabilities are
P(o_1..o_k) = Tr[K_ok ... K_o1 rho K_o1^dag ... K_ok^dag] (DESIGN.md section 2), with
  symmetric split:  K_o = 1/2 [D(-beta/2) + o e^{i phi} D(beta/2)]
  one-sided split:  K_o = 1/2 [1 + o e^{i phi} D(beta)].
Cases are the noise-free versions of the shipped protocols lg3_prepared_cat_conclusive.json
and lg3_thermal.json. The cutoff N = 160 keeps every displaced state used here (|alpha| <= 7)
far from the edge, where qutip.displace's truncation error lives.

Usage: /usr/bin/python3 qutip_predict_reference.py out.json
"""
import cmath
import json
import math
import sys

import numpy as np
import qutip

N = 160


def disp(beta):
    return qutip.displace(N, beta).full()


def kraus(beta, phase_deg, split, o):
    ph = cmath.exp(1j * math.radians(phase_deg))
    if split == "symmetric":
        return 0.5 * (disp(-beta / 2) + o * ph * disp(beta / 2))
    return 0.5 * (np.eye(N) + o * ph * disp(beta))


def polar(modulus, deg):
    return cmath.rect(modulus, math.radians(deg))


def prob(rho, ms, outcomes):
    r = rho
    for (beta, phase, split), o in zip(ms, outcomes):
        k = kraus(beta, phase, split, o)
        r = k @ r @ k.conj().T
    return float(np.trace(r).real)


def correlator(rho, m1, m2):
    return sum(a * b * prob(rho, [m1, m2], [a, b]) for a in (1, -1) for b in (1, -1))


def lg3(rho, ms):
    a, b, c = ms
    cab, cbc, cac = correlator(rho, a, b), correlator(rho, b, c), correlator(rho, a, c)
    return {"C_AB": cab, "C_BC": cbc, "C_AC": cac, "K": cab + cbc - cac}


def cat_case():
    # Ground state, one symmetric modular measurement beta = 4, phase 0, outcome + kept.
    vac = qutip.basis(N, 0).full()
    k = kraus(4.0, 0.0, "symmetric", +1)
    psi = k @ vac
    psi = psi / np.linalg.norm(psi)
    rho = psi @ psi.conj().T
    A = (polar(2.0, 0.0), 270.0, "symmetric")
    B = (polar(2.0, -15.0), 90.0, "symmetric")
    C = (polar(2.0, -165.0), 90.0, "symmetric")
    out = lg3(rho, [A, B, C])
    # Destructive configuration AB+ (dark is + at A): outcomes ++, +-, and - (A only).
    out["AB+"] = {"++": prob(rho, [A, B], [1, 1]), "+-": prob(rho, [A, B], [1, -1]),
                  "-": prob(rho, [A], [-1])}
    # NSIT A -> C: S = P_C(+) - sum_a P_AC(a, +).
    out["S_AC"] = prob(rho, [C], [1]) - prob(rho, [A, C], [1, 1]) - prob(rho, [A, C], [-1, 1])
    return out


def thermal_case():
    rho = qutip.thermal_dm(N, 0.3).full()
    A = (polar(2.4, 0.0), 0.0, "one-sided")
    B = (polar(2.4, 180.0), 15.0, "one-sided")
    C = (polar(2.4, 350.0), 270.0, "one-sided")
    out = lg3(rho, [A, B, C])
    out["S_AB"] = prob(rho, [B], [1]) - prob(rho, [A, B], [1, 1]) - prob(rho, [A, B], [-1, 1])
    return out


def main():
    doc = {"source": "QuTiP %s, truncated Fock basis N = %d, Kraus products" %
                     (qutip.__version__, N),
           "cat_conclusive_noise_free": cat_case(),
           "thermal_one_sided_noise_free": thermal_case()}
    with open(sys.argv[1], "w") as f:
        json.dump(doc, f, indent=1, sort_keys=True)


if __name__ == "__main__":
    main()
