#!/usr/bin/python3
"""Reference values for modular-measurement sequences, computed with QuTiP 4.7 in a truncated
Fock space, for the Weyl-engine test tests/phase_space/test_qutip_reference.cpp.

Everything follows DESIGN.md section 2 literally, with none of the library's shortcuts:
  * Kraus operators from qutip.displace:
      symmetric  K_o = 1/2 [D(-beta/2) + o e^{i phi} D(beta/2)]
      one-sided  K_o = 1/2 [1 + o e^{i phi} D(beta)]
    with contrast c: rho -> c K_o rho K_o^dag + (1-c)/2 sum_o' K_o' rho K_o'^dag (unnormalised).
  * Noise between measurements (and from t = 0 to the first one) by exact propagation of the
    Lindblad equation whose generators add:
      gamma (n_th + 1) D[a] + gamma n_th D[a^dag]      (thermal damping with bath)
      (ndot + f) (D[a] + D[a^dag])                     (heating, force noise)
      kappa D[a^dag a]                                 (Markovian dephasing)
    The Liouvillian comes from qutip.liouvillian. All these generators are phase covariant, so
    the Liouvillian does not couple density-matrix elements with different m - n; each such
    block is exponentiated exactly with scipy.linalg.expm (checked: the off-block part of the
    Liouvillian is zero).
  * Quasi-static frequency noise: an offset delta ~ Normal(0, sigma^2) per shot, rotation
    U = exp(-i delta dt a^dag a) over each interval; probabilities averaged over delta by
    a nested trapezoidal rule in delta / sigma with step halving (change < 1e-12).
  * Truncation check: every value is computed at cutoff N and at 1.25 N + 10; if any changes by
    1e-11 or more, N is increased and the check repeated. The larger cutoff's values are kept.

Usage: /usr/bin/python3 qutip_weyl_reference.py [output.json]
       (default: tests/reference/qutip_weyl_reference.json beside this script)
Exits with 77 (skipped) when QuTiP, NumPy or SciPy is missing.
"""

import itertools
import json
import math
import os
import sys
import time

try:
    import numpy as np
    import qutip
    import scipy.linalg
    import scipy.sparse
except ImportError as missing:  # exit code 77: CTest's SKIP_RETURN_CODE for this script
    print(f"reference tool missing ({missing}); install python3-qutip and python3-scipy",
          file=sys.stderr)
    sys.exit(77)

CONVERGENCE_TOL = 1e-11
QUADRATURE_TOL = 1e-12

NOISE_FIELDS = ("heating_quanta_per_s", "damping_rate_per_s", "bath_nbar",
                "dephasing_rate_per_s", "frequency_noise_sd_rad_per_s",
                "force_noise_quanta_per_s")


# ----------------------------------------------------------------------------- states
def state_dm(spec, N):
    kind = spec["kind"]
    if kind == "thermal":
        return qutip.thermal_dm(N, spec["nbar"], method="analytic")
    if kind == "coherent":
        a = complex(*spec["alpha"])
        return qutip.ket2dm(qutip.coherent(N, a, method="analytic"))
    if kind == "squeezed":
        # rho = D(alpha) S(xi) rho_th S(xi)^dag D(alpha)^dag, S(xi) = exp((xi* a^2 - xi a^dag^2)/2)
        xi = spec["r"] * np.exp(1j * spec["theta_rad"])
        alpha = complex(*spec.get("alpha", [0.0, 0.0]))
        # Build at a larger cutoff and cut down: the truncated exponentials are then exact
        # on the kept levels to far below the convergence tolerance.
        M = 2 * N + 20
        rho_th = (qutip.thermal_dm(M, spec.get("nbar", 0.0), method="analytic")
                  if spec.get("nbar", 0.0) > 0 else qutip.fock_dm(M, 0))
        U = qutip.displace(M, alpha) * qutip.squeeze(M, xi)
        big = (U * rho_th * U.dag()).full()
        return qutip.Qobj(big[:N, :N])
    if kind == "fock":
        return qutip.fock_dm(N, spec["n"])
    if kind == "cat":
        a = complex(*spec["alpha"])
        psi = (qutip.coherent(N, a, method="analytic") +
               np.exp(1j * spec["relative_phase_rad"]) * qutip.coherent(N, -a, method="analytic"))
        return qutip.ket2dm(psi.unit())
    raise ValueError("unknown state kind " + kind)


# ----------------------------------------------------------------------------- measurements
def displacement(N, beta):
    # exp(beta a^dag - beta* a) computed at a larger cutoff, then cut down to N levels, so
    # that the kept matrix elements are those of the true operator.
    M = 2 * N + 20
    return qutip.Qobj(qutip.displace(M, beta).full()[:N, :N])


def kraus_pair(m, N):
    beta = complex(*m["beta"])
    ph = np.exp(1j * m["phase_rad"])
    if m["split"] == "symmetric":
        A, B = displacement(N, -beta / 2), displacement(N, beta / 2)
    elif m["split"] == "one-sided":
        A, B = qutip.qeye(N), displacement(N, beta)
    else:
        raise ValueError("unknown split " + m["split"])
    return {o: (0.5 * (A + o * ph * B)).full() for o in (+1, -1)}


def apply_measurement(rho, K, contrast):
    """Unnormalised post-measurement states for o = +1 and o = -1."""
    sel = {s: K[s] @ rho @ K[s].conj().T for s in (+1, -1)}
    mixed = 0.5 * (1.0 - contrast) * (sel[+1] + sel[-1])
    return {o: contrast * sel[o] + mixed for o in (+1, -1)}


# ----------------------------------------------------------------------------- channels
class Channel:
    """Exact propagator of the phase-covariant Lindblad part over an interval dt."""

    def __init__(self, noise, dt, N):
        self.N = N
        self.dt = dt
        a = qutip.destroy(N)
        n = a.dag() * a
        g, nth = noise["damping_rate_per_s"], noise["bath_nbar"]
        heat = noise["heating_quanta_per_s"] + noise["force_noise_quanta_per_s"]
        kappa = noise["dephasing_rate_per_s"]
        rates = [(g * (nth + 1.0), a), (g * nth, a.dag()), (heat, a), (heat, a.dag()),
                 (kappa, n)]
        c_ops = [math.sqrt(r) * op for r, op in rates if r > 0.0]
        self.identity = not c_ops or dt == 0.0
        if self.identity:
            return
        L = qutip.liouvillian(None, c_ops).data.tocsr()  # column stacking: index i + N j
        r_all, c_all, v_all = [], [], []
        covered = 0.0
        for k in range(-(N - 1), N):
            rows = np.array([i for i in range(N) if 0 <= i - k < N])
            idx = rows + N * (rows - k)
            block = L[idx, :][:, idx].toarray()
            covered += abs(block).sum()
            P = scipy.linalg.expm(block * dt)
            r_all.append(np.repeat(idx, len(idx)))
            c_all.append(np.tile(idx, len(idx)))
            v_all.append(P.ravel())
        total = abs(L).sum()
        if abs(total - covered) > 1e-12 * max(total, 1.0):
            raise RuntimeError("Liouvillian couples different m - n blocks")
        # The exact propagator exp(L dt), block diagonal in m - n, as one sparse matrix.
        self.P = scipy.sparse.csr_matrix(
            (np.concatenate(v_all), (np.concatenate(r_all), np.concatenate(c_all))),
            shape=(N * N, N * N))

    def apply(self, rho):
        if self.identity:
            return rho
        v = self.P @ rho.ravel(order="F")
        return v.reshape((self.N, self.N), order="F")


def rotation(rho, delta, dt):
    if delta == 0.0 or dt == 0.0:
        return rho
    ph = np.exp(-1j * delta * dt * np.arange(rho.shape[0]))  # U = exp(-i delta dt a^dag a)
    return ph[:, None] * rho * ph.conj()[None, :]


# ----------------------------------------------------------------------------- one case
def subsequences(n):
    out = []
    for r in range(1, n + 1):
        out.extend(itertools.combinations(range(n), r))
    return out


def branch_probabilities(case, N, rho0, kraus, channels, delta):
    """All P(outcome string) for every subsequence, at fixed delta."""
    ms = case["measurements"]
    result = {}
    for sub in subsequences(len(ms)):
        branches = {"": rho0}
        t_prev = 0.0
        for j in sub:
            dt = ms[j]["time_s"] - t_prev
            ch = channels[(t_prev, ms[j]["time_s"])]
            t_prev = ms[j]["time_s"]
            new = {}
            for s, rho in branches.items():
                rho = rotation(ch.apply(rho), delta, dt)
                post = apply_measurement(rho, kraus[j], ms[j]["contrast"])
                new[s + "+"], new[s + "-"] = post[+1], post[-1]
            branches = new
        for s, rho in branches.items():
            result[(sub, s)] = float(np.real(np.trace(rho)))
    return result


def case_values(case, N):
    ms = case["measurements"]
    rho0 = state_dm(case["state"], N).full()
    kraus = [kraus_pair(m, N) for m in ms]
    channels = {}
    for sub in subsequences(len(ms)):
        t_prev = 0.0
        for j in sub:
            key = (t_prev, ms[j]["time_s"])
            if key not in channels:
                channels[key] = Channel(case["noise"], key[1] - key[0], N)
            t_prev = ms[j]["time_s"]
    sigma = case["noise"]["frequency_noise_sd_rad_per_s"]
    if sigma == 0.0:
        return branch_probabilities(case, N, rho0, kraus, channels, 0.0), 0
    # delta = sigma u, u ~ N(0, 1): trapezoidal rule on u in [-U, U] (the Gaussian tail beyond
    # U = 10 is below 1e-22), step halved until the average changes by less than
    # QUADRATURE_TOL; nested, so every refinement reuses the earlier nodes. For a smooth
    # integrand times a Gaussian the trapezoidal error falls like exp(-(2 pi / h)^2 / 2 ...)
    # (aliasing), far faster than the node count grows.
    U, h = 10.0, 0.25
    cache = {}

    def at(u):
        key = round(u / h_min, 0)
        if key not in cache:
            cache[key] = branch_probabilities(case, N, rho0, kraus, channels, sigma * u)
        return cache[key]

    h_min = h / 64.0
    previous = None
    while True:
        count = int(round(2 * U / h))
        acc = None
        for i in range(count + 1):
            u = -U + i * h
            wi = h * math.exp(-0.5 * u * u) / math.sqrt(2.0 * math.pi)
            if i in (0, count):
                wi *= 0.5
            vals = at(u)
            if acc is None:
                acc = {k: wi * v for k, v in vals.items()}
            else:
                for k, v in vals.items():
                    acc[k] += wi * v
        if previous is not None:
            change = max(abs(acc[k] - previous[k]) for k in acc)
            if change < QUADRATURE_TOL:
                return acc, count + 1
        previous, h = acc, h / 2.0
        if h < h_min:
            raise RuntimeError("frequency-noise quadrature did not converge")


def derived(case, probs):
    n = len(case["measurements"])
    out = {"probabilities": []}
    for (sub, s), p in sorted(probs.items()):
        out["probabilities"].append({"steps": list(sub), "outcomes": s, "p": p})

    def corr(sub):
        total = 0.0
        for (ss, s), p in probs.items():
            if ss == sub:
                total += p * np.prod([1 if c == "+" else -1 for c in s])
        return total

    out["correlators"] = {"".join(str(j + 1) for j in sub): corr(sub)
                          for sub in subsequences(n) if len(sub) >= 2}
    full = tuple(range(n))
    out["last_average"] = sum(p * (1 if s[-1] == "+" else -1)
                              for (ss, s), p in probs.items() if ss == full)
    if n == 3:
        c = out["correlators"]
        out["K3"] = c["12"] + c["23"] - c["13"]
    out["nsit"] = []
    for a, b in itertools.combinations(range(n), 2):
        S = probs[((b,), "+")] - probs[((a, b), "++")] - probs[((a, b), "-+")]
        out["nsit"].append({"from": a, "to": b, "S": S})
    return out


def converged(case, N0):
    N = N0
    pa, _ = case_values(case, N)
    while True:
        Nb = int(math.ceil(1.25 * N + 10))
        pb, nodes = case_values(case, Nb)
        change = max(abs(pa[k] - pb[k]) for k in pa)
        if change < CONVERGENCE_TOL:
            return pb, Nb, N, change, nodes
        N, pa = Nb, pb
        if N > 400:
            raise RuntimeError("cutoff did not converge for case " + case["name"])


# ----------------------------------------------------------------------------- the cases
def meas(label, beta, time_s, phase=0.0, split="symmetric", contrast=1.0):
    return {"label": label, "beta": [float(beta.real), float(beta.imag)], "phase_rad": phase,
            "split": split, "contrast": contrast, "time_s": time_s}


def polar(r, deg):
    return r * np.exp(1j * math.radians(deg))


def noise(**kw):
    out = {f: 0.0 for f in NOISE_FIELDS}
    for k, v in kw.items():
        if k not in out:
            raise KeyError(k)
        out[k] = float(v)
    return out


def lg3(beta, degs, times, split="symmetric", phases=(0.0, 0.0, 0.0), contrast=1.0):
    return [meas(l, polar(beta, d), t, p, split, contrast)
            for l, d, t, p in zip("ABC", degs, times, phases)]


def cases():
    T = (0.0, 100e-6, 200e-6)
    c = []

    def add(name, state, ms, nz, N0=30):
        c.append({"name": name, "state": state, "measurements": ms, "noise": nz, "N0": N0})

    # The benchmark protocol, both splits.
    add("thermal-benchmark-symmetric", {"kind": "thermal", "nbar": 0.3},
        lg3(2.0, (0, 60, 120), T), noise(heating_quanta_per_s=20.0))
    add("thermal-benchmark-one-sided", {"kind": "thermal", "nbar": 0.3},
        lg3(2.0, (0, 60, 120), T, "one-sided"), noise(heating_quanta_per_s=20.0))
    # Oblique, non-collinear beta, Ramsey phases, contrast < 1.
    add("thermal-oblique-phases", {"kind": "thermal", "nbar": 0.5},
        [meas("A", 1.3 + 0.4j, 0.0, 0.3), meas("B", -0.5 + 1.1j, 50e-6, -1.1),
         meas("C", 0.9 - 0.8j, 120e-6, 2.0)], noise(heating_quanta_per_s=200.0))
    add("thermal-one-sided-contrast", {"kind": "thermal", "nbar": 0.2},
        [meas("A", 1.5 + 0.2j, 0.0, 0.5, "one-sided", 0.9),
         meas("B", 0.3 + 1.4j, 1e-4, -0.4, "one-sided", 0.8),
         meas("C", -1.0 + 0.7j, 2e-4, 1.2, "one-sided", 0.95)], noise())
    add("thermal-mixed-splits-damping", {"kind": "thermal", "nbar": 0.4},
        [meas("A", 1.2 + 0.0j, 0.0, 0.0, "one-sided"),
         meas("B", polar(1.6, 75), 2e-3, 0.7, "symmetric", 0.85),
         meas("C", polar(1.1, 150), 5e-3, -0.3, "one-sided")],
        noise(damping_rate_per_s=80.0, bath_nbar=0.7))
    # Damping with bath and heating together (generators add).
    add("thermal-damping-and-heating", {"kind": "thermal", "nbar": 0.1},
        lg3(1.8, (0, 70, 140), (1e-4, 1.5e-3, 4e-3), "one-sided", (0.2, -0.6, 1.0)),
        noise(damping_rate_per_s=150.0, bath_nbar=1.2, heating_quanta_per_s=60.0))
    # Coherent states.
    add("coherent-symmetric", {"kind": "coherent", "alpha": [0.8, -0.5]},
        [meas("A", 1.1 + 0.3j, 0.0, 0.4), meas("B", -0.2 + 1.5j, 1e-4, 0.0),
         meas("C", 1.4 - 0.6j, 3e-4, -0.9)], noise(heating_quanta_per_s=100.0))
    add("coherent-one-sided-damping", {"kind": "coherent", "alpha": [-0.6, 0.9]},
        [meas("A", 0.7 + 0.9j, 0.0, 1.0, "one-sided", 0.9),
         meas("B", 1.3 - 0.2j, 1e-3, -0.5, "one-sided"),
         meas("C", -0.8 - 0.8j, 3e-3, 0.25, "one-sided", 0.7)],
        noise(damping_rate_per_s=100.0, bath_nbar=0.3, heating_quanta_per_s=10.0))
    # Squeezed (thermal, displaced) states.
    add("squeezed-vacuum-symmetric", {"kind": "squeezed", "r": 0.6, "theta_rad": 0.8,
                                      "nbar": 0.0, "alpha": [0.0, 0.0]},
        lg3(1.7, (10, 55, 130), T, "symmetric", (0.0, 0.5, -0.5)), noise(heating_quanta_per_s=50.0))
    add("squeezed-thermal-displaced-one-sided",
        {"kind": "squeezed", "r": 0.4, "theta_rad": -1.2, "nbar": 0.3, "alpha": [0.5, 0.3]},
        [meas("A", 1.2 - 0.4j, 0.0, 0.3, "one-sided"),
         meas("B", 0.4 + 1.3j, 2e-4, -0.2, "one-sided", 0.9),
         meas("C", -1.1 + 0.5j, 5e-4, 0.8, "one-sided")],
        noise(heating_quanta_per_s=30.0, damping_rate_per_s=20.0, bath_nbar=0.5))
    add("squeezed-frequency-noise",
        {"kind": "squeezed", "r": 0.5, "theta_rad": 0.3, "nbar": 0.1, "alpha": [0.4, 0.0]},
        lg3(1.5, (0, 60, 120), T, "one-sided", (0.1, 0.2, 0.3)),
        noise(frequency_noise_sd_rad_per_s=3000.0, heating_quanta_per_s=20.0))
    # Fock states (Wigner-negative).
    add("fock1-symmetric", {"kind": "fock", "n": 1},
        lg3(1.6, (0, 60, 120), T), noise(heating_quanta_per_s=20.0))
    add("fock2-one-sided-oblique", {"kind": "fock", "n": 2},
        [meas("A", 1.0 + 0.6j, 0.0, 0.7, "one-sided"),
         meas("B", -0.3 + 1.2j, 1e-4, -0.3, "one-sided", 0.9),
         meas("C", 1.3 + 0.1j, 3e-4, 0.0, "one-sided")],
        noise(damping_rate_per_s=50.0, bath_nbar=0.2))
    add("fock3-dephasing", {"kind": "fock", "n": 3},
        lg3(1.4, (0, 45, 100), (0.0, 1e-3, 2e-3), "symmetric", (0.0, 0.4, 0.8), 0.95),
        noise(dephasing_rate_per_s=40.0, heating_quanta_per_s=5.0))
    add("fock1-frequency-noise", {"kind": "fock", "n": 1},
        lg3(1.8, (0, 60, 120), T, "one-sided"),
        noise(frequency_noise_sd_rad_per_s=2000.0))
    # Cat states.
    add("cat-even-symmetric", {"kind": "cat", "alpha": [1.2, 0.0], "relative_phase_rad": 0.0},
        lg3(1.5, (90, 30, 150), T, "symmetric", (0.0, 0.3, -0.3)), noise(heating_quanta_per_s=20.0))
    add("cat-odd-one-sided", {"kind": "cat", "alpha": [0.8, 0.6], "relative_phase_rad": math.pi},
        [meas("A", 1.1 + 0.2j, 0.0, 0.0, "one-sided"),
         meas("B", 0.2 + 1.0j, 1e-4, 0.9, "one-sided", 0.9),
         meas("C", -0.9 + 0.9j, 2e-4, -0.6, "one-sided")],
        noise(damping_rate_per_s=30.0, bath_nbar=0.5, heating_quanta_per_s=15.0))
    add("cat-phase-frequency-noise", {"kind": "cat", "alpha": [1.0, 0.5], "relative_phase_rad": 1.1},
        [meas("A", 1.0 - 0.5j, 0.0, 0.5, "symmetric"),
         meas("B", 0.6 + 1.2j, 1e-4, -0.2, "one-sided", 0.9),
         meas("C", -1.2 + 0.3j, 2.5e-4, 0.0, "symmetric")],
        noise(frequency_noise_sd_rad_per_s=1500.0, dephasing_rate_per_s=100.0))
    # Quasi-static frequency noise on a thermal state (rotation before the first measurement
    # is irrelevant there; between measurements it is not).
    add("thermal-frequency-noise", {"kind": "thermal", "nbar": 0.3},
        lg3(2.0, (0, 60, 120), T, "one-sided"),
        noise(frequency_noise_sd_rad_per_s=4000.0, heating_quanta_per_s=20.0))
    add("coherent-frequency-noise-and-dephasing", {"kind": "coherent", "alpha": [1.0, 0.2]},
        [meas("A", 1.2 + 0.3j, 0.0, 0.2), meas("B", -0.4 + 1.3j, 1.2e-4, -0.7, "one-sided"),
         meas("C", 1.0 - 1.0j, 2.5e-4, 0.4)],
        noise(frequency_noise_sd_rad_per_s=2500.0, dephasing_rate_per_s=300.0,
              heating_quanta_per_s=40.0))
    # Force noise (adds to heating) with damping.
    add("thermal-force-noise-damping", {"kind": "thermal", "nbar": 0.6},
        lg3(1.3, (20, 100, 170), (0.0, 2e-3, 6e-3), "symmetric", (0.5, 0.0, -0.5), 0.9),
        noise(force_noise_quanta_per_s=25.0, damping_rate_per_s=40.0, bath_nbar=0.4))
    # Two-step cases (NSIT between two measurements only).
    add("two-step-fock1-one-sided", {"kind": "fock", "n": 1},
        [meas("A", 1.2 + 0.5j, 0.0, 0.3, "one-sided"), meas("B", -0.6 + 1.1j, 1e-4, 0.0, "one-sided")],
        noise(heating_quanta_per_s=20.0))
    add("two-step-squeezed-symmetric",
        {"kind": "squeezed", "r": 0.7, "theta_rad": 2.0, "nbar": 0.0, "alpha": [0.0, 0.6]},
        [meas("A", 0.9 + 0.9j, 0.0, -0.4, "symmetric", 0.9), meas("B", 1.5 + 0.0j, 3e-4, 0.6)],
        noise(damping_rate_per_s=60.0, bath_nbar=0.9))
    return c


def main(argv):
    here = os.path.dirname(os.path.abspath(__file__))
    out_path = argv[1] if len(argv) > 1 else os.path.join(here, "qutip_weyl_reference.json")
    results = []
    start = time.time()
    for case in cases():
        probs, N, N_prev, change, nodes = converged(case, case["N0"])
        entry = {"name": case["name"], "state": case["state"],
                 "measurements": case["measurements"], "noise": case["noise"],
                 "cutoff": N, "cutoff_compared": N_prev, "convergence_change": change,
                 "frequency_noise_nodes": nodes}
        entry.update(derived(case, probs))
        results.append(entry)
        print(f"{case['name']}: cutoff {N} (vs {N_prev}: change {change:.2e})"
              + (f", {nodes} quadrature nodes" if nodes else ""), file=sys.stderr)
    doc = {"format": "macroreal-reference/1",
           "source": "QuTiP " + qutip.__version__ + " (truncated Fock space, exact Lindblad "
                     "propagation); generated by tests/reference/qutip_weyl_reference.py",
           "convergence_tolerance": CONVERGENCE_TOL,
           "cases": results}
    os.makedirs(os.path.dirname(os.path.abspath(out_path)), exist_ok=True)
    with open(out_path, "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")
    print(f"wrote {len(results)} cases to {out_path} in {time.time() - start:.1f} s",
          file=sys.stderr)


if __name__ == "__main__":
    main(sys.argv)
