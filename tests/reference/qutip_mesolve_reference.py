#!/usr/bin/python3
"""Reference probabilities for Markovian dephasing and finite-duration measurements, from
QuTiP 4.7 mesolve (Debian python3-qutip), for the Fock engine (lib/fock/fock_engine.hpp).

Model (DESIGN.md section 2): Lindblad noise on the oscillator
    c_ops = sqrt(g(n_th+1)) a, sqrt(g n_th) a^dag, sqrt(ndot) a, sqrt(ndot) a^dag,
            sqrt(kappa) a^dag a,
between measurements and during interactions. An instantaneous modular measurement uses the
Kraus operators K_o = 1/2 [A + o e^{i phi} B] with (A, B) = (D(-beta/2), D(beta/2))
(symmetric) or (1, D(beta)) (one-sided). A finite-duration measurement (interaction from
time_s for duration T) is simulated on probe (x) oscillator: the probe starts in
(|up> + |down>)/sqrt2, evolves for T under
    symmetric:  H = sigma_z (x) (i b a^dag - i b* a),     b = beta / (2T),
    one-sided:  H = |up><up| (x) (i b a^dag - i b* a),    b = beta / T,
(so exp(-iHT) = |up><up| (x) B + |down><down| (x) A) with the oscillator noise acting
throughout, and is then projected on (|down> + o e^{-i phi}|up>)/sqrt2 (the closing Ramsey
pulse and readout); contrast c mixes outcomes: c M_o + (1-c)/2 (M_+ + M_-).
Measured quantities: P(o_1..o_k) (all steps, outcome map) and the correlator
<o_1...o_k> (signed maps). Solver tolerances atol 1e-12, rtol 1e-10.

Usage: /usr/bin/python3 qutip_mesolve_reference.py out.json
"""
import cmath
import json
import math
import sys

import numpy as np
import qutip

N = 50
OPTS = qutip.Options(atol=1e-12, rtol=1e-10, nsteps=1000000)
a = qutip.destroy(N)
I_osc = qutip.qeye(N)
up = qutip.basis(2, 0)
down = qutip.basis(2, 1)
I_q = qutip.qeye(2)


def c_ops(noise, with_probe):
    g = noise.get("damping_rate_per_s", 0.0)
    nth = noise.get("bath_nbar", 0.0)
    ndot = noise.get("heating_quanta_per_s", 0.0)
    kappa = noise.get("dephasing_rate_per_s", 0.0)
    ops = []
    for rate, op in [(g * (nth + 1.0), a), (g * nth, a.dag()), (ndot, a), (ndot, a.dag()),
                     (kappa, a.dag() * a)]:
        if rate > 0.0:
            ops.append(math.sqrt(rate) * (qutip.tensor(I_q, op) if with_probe else op))
    return ops


def free(x, noise, dt):
    ops = c_ops(noise, False)
    if dt <= 0.0 or not ops:
        return x
    return qutip.mesolve(0.0 * a.dag() * a, x, [0.0, dt], ops, [], options=OPTS).states[-1]


def branch_ops(m):
    beta = complex(*m["beta"])
    if m["split"] == "symmetric":
        return qutip.displace(N, -beta / 2), qutip.displace(N, beta / 2)
    return I_osc, qutip.displace(N, beta)


def outcome_parts(x, m, noise):
    """M_+ and M_- (unnormalised oscillator operators) for the measurement, contrast 1."""
    phi = m["phase_rad"]
    beta = complex(*m["beta"])
    T = m.get("duration_s", 0.0)
    parts = {}
    if T == 0.0:
        A, B = branch_ops(m)
        for o in (+1, -1):
            K = 0.5 * (A + o * cmath.exp(1j * phi) * B)
            parts[o] = K * x * K.dag()
        return parts
    plus = (up + down).unit()
    total = qutip.tensor(plus * plus.dag(), x)
    if m["split"] == "symmetric":
        b = beta / (2 * T)
        H = qutip.tensor(up * up.dag() - down * down.dag(), 1j * b * a.dag() - 1j * np.conj(b) * a)
    else:
        b = beta / T
        H = qutip.tensor(up * up.dag(), 1j * b * a.dag() - 1j * np.conj(b) * a)
    rho = qutip.mesolve(H, total, [0.0, T], c_ops(noise, True), [], options=OPTS).states[-1]
    for o in (+1, -1):
        chi = (down + o * cmath.exp(-1j * phi) * up) / math.sqrt(2.0)
        P = qutip.tensor(chi.dag(), I_osc)
        parts[o] = P * rho * P.dag()
    return parts


def run(rho0, meas, noise, outcomes):
    """outcomes: list of +-1 (probability) or None (correlator)."""
    x = rho0
    t_free = 0.0
    for j, m in enumerate(meas):
        x = free(x, noise, m["time_s"] - t_free)
        parts = outcome_parts(x, m, noise)
        c = m["contrast"]
        mixed = 0.5 * (parts[1] + parts[-1])
        if outcomes is None:
            x = c * (parts[1] - parts[-1])
        else:
            x = c * parts[outcomes[j]] + (1.0 - c) * mixed
        t_free = m["time_s"] + m.get("duration_s", 0.0)
    return float(np.real(x.tr()))


def make_state(s):
    k = s["kind"]
    if k == "thermal":
        return qutip.thermal_dm(N, s["nbar"])
    if k == "coherent":
        return qutip.coherent_dm(N, complex(*s["alpha"]))
    if k == "fock":
        return qutip.fock_dm(N, s["n"])
    if k == "cat":
        al = complex(*s["alpha"])
        psi = (qutip.coherent(N, al) + cmath.exp(1j * s["relative_phase_rad"]) *
               qutip.coherent(N, -al)).unit()
        return psi * psi.dag()
    if k == "squeezed":
        z = s["r"] * cmath.exp(1j * s["theta_rad"])
        psi = qutip.squeeze(N, z) * qutip.basis(N, 0)
        return psi * psi.dag()
    raise ValueError(k)


def meas(beta_abs, beta_deg, t, T=0.0, split="symmetric", phase=0.0, contrast=1.0):
    b = cmath.rect(beta_abs, math.radians(beta_deg))
    return {"beta": [b.real, b.imag], "phase_rad": phase, "split": split,
            "contrast": contrast, "time_s": t, "duration_s": T}


CASES = [
    ("thermal, symmetric, finite duration, damping",
     {"kind": "thermal", "nbar": 0.3}, [meas(2.0, 0, 0.0, 20e-6)],
     {"damping_rate_per_s": 1000.0, "bath_nbar": 0.2}, ["+"]),
    ("coherent, one-sided, finite duration, heating",
     {"kind": "coherent", "alpha": [0.5, 0.3]}, [meas(1.5, 30, 10e-6, 50e-6, "one-sided", 0.4)],
     {"heating_quanta_per_s": 200.0}, ["+", "-"]),
    ("Fock 1, symmetric, finite duration, dephasing",
     {"kind": "fock", "n": 1}, [meas(1.8, 0, 0.0, 40e-6)],
     {"dephasing_rate_per_s": 2000.0}, ["+"]),
    ("cat, two finite-duration measurements, dephasing + damping",
     {"kind": "cat", "alpha": [1.2, 0.0], "relative_phase_rad": 0.0},
     [meas(2.0, 90, 0.0, 30e-6), meas(2.0, 0, 100e-6, 30e-6, phase=0.3)],
     {"dephasing_rate_per_s": 1000.0, "damping_rate_per_s": 300.0}, ["C", "+-"]),
    ("squeezed vacuum, two finite-duration measurements, heating + dephasing",
     {"kind": "squeezed", "r": 0.4, "theta_rad": 0.5},
     [meas(1.6, 20, 5e-6, 25e-6), meas(1.6, 80, 60e-6, 25e-6)],
     {"heating_quanta_per_s": 300.0, "dephasing_rate_per_s": 500.0}, ["C", "++"]),
    ("cat, instantaneous, Markovian dephasing",
     {"kind": "cat", "alpha": [1.5, 0.0], "relative_phase_rad": 0.0},
     [meas(1.5, 0, 0.0), meas(1.5, 60, 200e-6)],
     {"dephasing_rate_per_s": 3000.0}, ["C", "++"]),
    ("coherent, three instantaneous, dephasing + damping with bath",
     {"kind": "coherent", "alpha": [1.0, 0.0]},
     [meas(1.2, 0, 0.0), meas(1.2, 45, 100e-6), meas(1.2, 90, 200e-6, split="one-sided")],
     {"dephasing_rate_per_s": 1000.0, "damping_rate_per_s": 500.0, "bath_nbar": 0.3},
     ["C", "+-+"]),
    ("Fock 2, one-sided, finite durations, damping + dephasing, contrast",
     {"kind": "fock", "n": 2},
     [meas(1.4, 10, 0.0, 60e-6, "one-sided", 0.2, 0.9),
      meas(1.4, 100, 150e-6, 60e-6, "one-sided", 0.0, 0.9)],
     {"damping_rate_per_s": 2000.0, "bath_nbar": 0.1, "dephasing_rate_per_s": 800.0},
     ["C", "-+"]),
    ("thermal, one-sided instantaneous, dephasing + heating",
     {"kind": "thermal", "nbar": 0.5},
     [meas(1.5, 0, 20e-6, split="one-sided"), meas(1.5, 120, 120e-6, split="one-sided")],
     {"dephasing_rate_per_s": 2000.0, "heating_quanta_per_s": 100.0}, ["C", "+-"]),
    ("cat, finite duration then instantaneous, dephasing",
     {"kind": "cat", "alpha": [0.0, 1.0], "relative_phase_rad": math.pi / 2},
     [meas(1.7, 0, 0.0, 40e-6), meas(1.7, 45, 90e-6)],
     {"dephasing_rate_per_s": 1500.0}, ["C", "++"]),
    ("coherent, finite duration, phase and contrast, strong damping",
     {"kind": "coherent", "alpha": [0.8, -0.4]},
     [meas(2.2, 200, 0.0, 80e-6, phase=math.pi / 4, contrast=0.8)],
     {"damping_rate_per_s": 5000.0, "bath_nbar": 0.05}, ["+"]),
    ("vacuum, two finite durations, dephasing + heating",
     {"kind": "fock", "n": 0},
     [meas(2.0, 0, 0.0, 100e-6), meas(2.0, 90, 150e-6, 100e-6)],
     {"dephasing_rate_per_s": 5000.0, "heating_quanta_per_s": 500.0}, ["C", "-+"]),
]


def main():
    out = []
    for (title, state, ms, noise, quantities) in CASES:
        rho0 = make_state(state)
        qs = []
        for q in quantities:
            if q == "C":
                qs.append({"kind": "correlator", "value": run(rho0, ms, noise, None)})
            else:
                o = [1 if ch == "+" else -1 for ch in q]
                qs.append({"kind": "probability", "outcomes": q,
                           "value": run(rho0, ms[:len(o)], noise, o)})
        out.append({"title": title, "state": state, "measurements": ms, "noise": noise,
                    "quantities": qs})
    doc = {"source": "QuTiP %s mesolve, %d Fock levels, atol 1e-12, rtol 1e-10" %
                     (qutip.__version__, N),
           "cases": out}
    with open(sys.argv[1], "w") as f:
        json.dump(doc, f, indent=1)


if __name__ == "__main__":
    main()
