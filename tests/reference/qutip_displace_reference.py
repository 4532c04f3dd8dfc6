#!/usr/bin/python3
"""Reference elements of D(beta) from QuTiP's displace() on a large cutoff.

qutip.displace(N, beta) exponentiates the truncated generator; its elements with small
indices converge to those of the infinite operator as N grows. With N = 400 and |beta| <= 4 the
elements with m, n < 30 are converged far below 1e-12 (the error lives near the cutoff).

Usage: /usr/bin/python3 qutip_displace_reference.py out.json
"""
import json
import sys

import qutip

CUTOFF = 400
KEEP = 30


def main():
    cases = []
    for b in [complex(0.5, 0.25), complex(-1.2, 2.0), complex(3.0, -2.5)]:
        d = qutip.displace(CUTOFF, b).full()
        for m in range(0, KEEP, 3):
            for n in range(0, KEEP, 4):
                v = d[m, n]
                cases.append({"m": m, "n": n, "beta": [b.real, b.imag],
                              "value": [v.real, v.imag]})
    doc = {"source": "QuTiP %s displace(%d, beta), elements m, n < %d" %
                     (qutip.__version__, CUTOFF, KEEP), "cases": cases}
    with open(sys.argv[1], "w") as f:
        json.dump(doc, f)


if __name__ == "__main__":
    main()
