#!/usr/bin/python3
"""Time the K_3 of bench/bench_fock.cpp (BM_FockEngine_K3Dephasing) in QuTiP 4.7 mesolve.

Thermal nbar 0.3 on 80 levels; symmetric modular measurements |beta| = 2 at 0/60/120 degrees,
phase 0, at 0/100/200 us; Markovian dephasing kappa D[a^dag a], kappa = 200/s, between them
(mesolve, atol 1e-12, rtol 1e-10). Each correlator C_ij: evolve to t_i, apply the signed map
sum_o o K_o rho K_o^dag (K_o from qutip.displace), evolve to t_j, take Tr[rho sum_o o K_o^dag
K_o]. K_3 = C_12 + C_23 - C_13. Prints K_3 and the median wall time of `repeats` runs.

Usage: /usr/bin/python3 bench/qutip_k3_dephasing_timing.py [repeats]
"""
import cmath
import math
import statistics
import sys
import time

import qutip

N = 80
OPTS = qutip.Options(atol=1e-12, rtol=1e-10, nsteps=100000)
a = qutip.destroy(N)
KAPPA = 200.0
TIMES = [0.0, 100e-6, 200e-6]
BETAS = [cmath.rect(2.0, math.radians(d)) for d in (0.0, 60.0, 120.0)]


def kraus(beta, o, phi=0.0):
    return 0.5 * (qutip.displace(N, -beta / 2) + o * cmath.exp(1j * phi) * qutip.displace(N, beta / 2))


def evolve(rho, dt):
    if dt <= 0.0:
        return rho
    return qutip.mesolve(0.0 * a.dag() * a, rho, [0.0, dt], [math.sqrt(KAPPA) * a.dag() * a], [],
                         options=OPTS).states[-1]


def correlator(i, j):
    rho = evolve(qutip.thermal_dm(N, 0.3), TIMES[i])
    ks = [kraus(BETAS[i], o) for o in (1, -1)]
    rho = ks[0] * rho * ks[0].dag() - ks[1] * rho * ks[1].dag()
    rho = evolve(rho, TIMES[j] - TIMES[i])
    kj = [kraus(BETAS[j], o) for o in (1, -1)]
    effect = kj[0].dag() * kj[0] - kj[1].dag() * kj[1]
    return (effect * rho).tr().real


def k3():
    return correlator(0, 1) + correlator(1, 2) - correlator(0, 2)


def main():
    repeats = int(sys.argv[1]) if len(sys.argv) > 1 else 5
    wall, cpu = [], []
    value = None
    for _ in range(repeats):
        t0, c0 = time.perf_counter(), time.process_time()
        value = k3()
        wall.append(time.perf_counter() - t0)
        cpu.append(time.process_time() - c0)
    print("QuTiP %s mesolve K_3 = %.12f over %d runs: wall median %.1f ms (min %.1f), "
          "CPU median %.1f ms (min %.1f)" %
          (qutip.__version__, value, repeats, 1e3 * statistics.median(wall), 1e3 * min(wall),
           1e3 * statistics.median(cpu), 1e3 * min(cpu)))


if __name__ == "__main__":
    main()
