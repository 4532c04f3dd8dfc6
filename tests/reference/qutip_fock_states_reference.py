#!/usr/bin/python3
"""Reference Fock-basis density matrices from QuTiP (block of the first KEEP levels).

States built on a large cutoff (N = 200) with QuTiP's operators, whose conventions match
DESIGN.md section 2: displace(N, a) = exp(a a^dag - a* a), squeeze(N, z) =
exp((z* a^2 - z a^dag^2)/2), thermal_dm(N, nbar) geometric populations. The elements with
indices < KEEP are converged far below 1e-12.

Usage: /usr/bin/python3 qutip_fock_states_reference.py out.json
"""
import cmath
import json
import sys

import qutip

N = 200
KEEP = 24


def block(rho):
    m = rho.full()[:KEEP, :KEEP]
    return {"real": [[float(m[i, j].real) for j in range(KEEP)] for i in range(KEEP)],
            "imag": [[float(m[i, j].imag) for j in range(KEEP)] for i in range(KEEP)]}


def main():
    cases = []
    for (r, theta, nbar, alpha) in [(0.5, 0.3, 0.0, 0j), (0.8, -1.2, 0.4, complex(0.7, -0.3)),
                                    (0.3, 2.0, 1.0, complex(-1.0, 0.5))]:
        z = r * cmath.exp(1j * theta)
        s = qutip.squeeze(N, z)
        d = qutip.displace(N, alpha)
        rho = d * s * qutip.thermal_dm(N, nbar) * s.dag() * d.dag()
        c = {"kind": "squeezed", "r": r, "theta_rad": theta, "nbar": nbar,
             "alpha": [alpha.real, alpha.imag]}
        c.update(block(rho))
        cases.append(c)
    for (alpha, phase) in [(complex(1.5, 0.5), 0.0), (complex(-0.8, 1.1), 2.1)]:
        psi = qutip.coherent(N, alpha) + cmath.exp(1j * phase) * qutip.coherent(N, -alpha)
        psi = psi.unit()
        c = {"kind": "cat", "alpha": [alpha.real, alpha.imag], "relative_phase_rad": phase}
        c.update(block(psi * psi.dag()))
        cases.append(c)
    doc = {"source": "QuTiP %s, states on %d levels, block of %d" % (qutip.__version__, N, KEEP),
           "cases": cases}
    with open(sys.argv[1], "w") as f:
        json.dump(doc, f)


if __name__ == "__main__":
    main()
