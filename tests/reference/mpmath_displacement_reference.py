#!/usr/bin/python3
"""Reference matrix elements <m|D(beta)|n> in high precision (mpmath, 60 digits).

Closed form of Cahill & Glauber, Phys. Rev. 177, 1857 (1969): for m >= n
    <m|D(b)|n> = sqrt(n!/m!) b^(m-n) exp(-|b|^2/2) L_n^(m-n)(|b|^2),
and <m|D(b)|n> = sqrt(m!/n!) (-b*)^(n-m) exp(-|b|^2/2) L_m^(n-m)(|b|^2) for m < n.
mpmath evaluates the generalised Laguerre polynomial at 60 significant digits, so the values
are an independent check of the double-precision recurrence in lib/fock/displacement_matrix.

Usage: /usr/bin/python3 mpmath_displacement_reference.py out.json
"""
import json
import sys

import mpmath as mp

mp.mp.dps = 60


def element(m, n, b):
    x = abs(b) ** 2
    if m >= n:
        k = m - n
        pref = mp.sqrt(mp.factorial(n) / mp.factorial(m)) * b ** k
        lag = mp.laguerre(n, k, x)
    else:
        k = n - m
        pref = mp.sqrt(mp.factorial(m) / mp.factorial(n)) * (-mp.conj(b)) ** k
        lag = mp.laguerre(m, k, x)
    return pref * mp.exp(-x / 2) * lag


def main():
    cases = []
    betas = [mp.mpc(0.3, -0.2), mp.mpc(1.5, 0.7), mp.mpc(-3.0, 2.0), mp.mpc(0.0, 7.5),
             mp.mpc(12.0, -9.0), mp.mpc(-20.0, 0.0), mp.mpc(14.0, 14.0)]
    index_pairs = [(0, 0), (1, 0), (0, 1), (5, 3), (3, 5), (40, 40), (60, 10), (10, 60),
                   (150, 149), (200, 180), (180, 200), (399, 399), (399, 300), (300, 399),
                   (399, 0), (0, 399), (250, 350), (399, 398)]
    for b in betas:
        for (m, n) in index_pairs:
            v = element(m, n, b)
            cases.append({"m": m, "n": n, "beta": [float(b.real), float(b.imag)],
                          "value": [float(v.real), float(v.imag)]})
    doc = {"source": "mpmath " + mp.__version__ + " at 60 digits, closed form of Cahill & "
                     "Glauber, Phys. Rev. 177, 1857 (1969)",
           "cases": cases}
    with open(sys.argv[1], "w") as f:
        json.dump(doc, f)


if __name__ == "__main__":
    main()
