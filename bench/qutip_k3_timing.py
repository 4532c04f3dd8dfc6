#!/usr/bin/python3
"""Speed reference: how long QuTiP 4.7 takes for one K_3 of the benchmark protocol
(bench/bench_weyl.cpp uses the same protocol):
  thermal nbar 0.3, heating 20 quanta/s, |beta| = 2 at 0 / 60 / 120 degrees, times
  0 / 100e-6 / 200e-6 s, symmetric split, contrast 1, no Ramsey phase.
K_3 = C12 + C23 - C13, each C_ij from runs with only i and j measured.

The cutoff is the converged one of tests/reference/qutip_weyl_reference.py (values change by
< 1e-11 from N to 1.25 N + 10). Two timings are printed per K_3:
  * "block expm": the reference script's method (Liouvillian from qutip.liouvillian,
    exponentiated exactly per m - n block), including building the Kraus operators and
    propagators;
  * "mesolve": the same with qutip.mesolve (atol = rtol = 1e-12) for every noise interval,
    the way a QuTiP user would usually write it.
Usage: /usr/bin/python3 bench/qutip_k3_timing.py [repeats]
"""

import math
import os
import sys
import time

import numpy as np
import qutip

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, "..", "tests", "reference"))
import qutip_weyl_reference as ref  # noqa: E402


def protocol():
    ms = [ref.meas(l, ref.polar(2.0, d), t) for l, d, t in
          zip("ABC", (0.0, 60.0, 120.0), (0.0, 100e-6, 200e-6))]
    return {"name": "benchmark", "state": {"kind": "thermal", "nbar": 0.3},
            "measurements": ms, "noise": ref.noise(heating_quanta_per_s=20.0), "N0": 30}


def k3_block_expm(case, N):
    ms = case["measurements"]
    rho0 = ref.state_dm(case["state"], N).full()
    kraus = [ref.kraus_pair(m, N) for m in ms]
    cache = {}

    def channel(rho, t0, t1):
        if (t0, t1) not in cache:
            cache[(t0, t1)] = ref.Channel(case["noise"], t1 - t0, N)
        return cache[(t0, t1)].apply(rho)

    return k3_from(ms, rho0, kraus, channel)


def k3_mesolve(case, N):
    ms = case["measurements"]
    rho0 = ref.state_dm(case["state"], N).full()
    kraus = [ref.kraus_pair(m, N) for m in ms]
    a = qutip.destroy(N)
    heat = case["noise"]["heating_quanta_per_s"]
    c_ops = [math.sqrt(heat) * a, math.sqrt(heat) * a.dag()]
    opts = qutip.Options(atol=1e-12, rtol=1e-12)
    H = 0 * a.dag() * a

    def channel(rho, t0, t1):
        if t1 == t0:
            return rho
        out = qutip.mesolve(H, qutip.Qobj(rho), [0.0, t1 - t0], c_ops, [], options=opts)
        return out.states[-1].full()

    return k3_from(ms, rho0, kraus, channel)


def k3_from(ms, rho0, kraus, channel):
    def corr(i, j):
        rho = channel(rho0, 0.0, ms[i]["time_s"])
        post = ref.apply_measurement(rho, kraus[i], ms[i]["contrast"])
        signed = post[+1] - post[-1]  # sum_o1 o1 rho_o1 (the map is linear)
        signed = channel(signed, ms[i]["time_s"], ms[j]["time_s"])
        post = ref.apply_measurement(signed, kraus[j], ms[j]["contrast"])
        return float(np.real(np.trace(post[+1] - post[-1])))

    return corr(0, 1) + corr(1, 2) - corr(0, 2)


def weyl_seconds(path):
    """CPU seconds per K_3 of BM_WeylEngine_K3Thermal from a Google Benchmark JSON file
    (bench_weyl --benchmark_out=FILE --benchmark_out_format=json)."""
    import json
    with open(path) as f:
        runs = json.load(f)["benchmarks"]
    scale = {"ns": 1e-9, "us": 1e-6, "ms": 1e-3, "s": 1.0}
    for r in runs:
        if r["name"].startswith("BM_WeylEngine_K3Thermal") and r.get("run_type", "iteration") == "iteration":
            return r["cpu_time"] * scale[r["time_unit"]]
    raise SystemExit(f"{path}: no BM_WeylEngine_K3Thermal entry")


def main(argv):
    # usage: qutip_k3_timing.py [REPEATS] [WEYL_BENCH_JSON]
    repeats = int(argv[1]) if len(argv) > 1 else 5
    weyl = weyl_seconds(argv[2]) if len(argv) > 2 else None
    case = protocol()
    _, N, N_prev, change, _ = ref.converged(case, case["N0"])
    print(f"converged cutoff N = {N} (change vs N = {N_prev}: {change:.1e})")
    for name, fn in (("block expm", k3_block_expm), ("mesolve", k3_mesolve)):
        times, cpu, k = [], [], None
        for _ in range(repeats):
            t, c = time.perf_counter(), time.process_time()
            k = fn(case, N)
            times.append(time.perf_counter() - t)
            cpu.append(time.process_time() - c)
        # CPU time is printed too: on a shared machine the wall-clock time mostly measures
        # the other processes.
        print(f"{name}: K_3 = {k:.12f}, {min(times):.3f} s per K_3 (best of {repeats}), "
              f"median {sorted(times)[len(times) // 2]:.3f} s; CPU {min(cpu):.3f} s; cutoff {N}")
        if weyl:
            print(f"  Weyl engine {weyl * 1e9:.0f} ns CPU per K_3: ratio {min(cpu) / weyl:.3g}x "
                  f"(CPU time, target >= 1000x)")


if __name__ == "__main__":
    main(sys.argv)
