#!/usr/bin/python3
"""Reference values for tests/device/test_device.cpp: the probe coherence of a qubit with a
longitudinal coupling g sigma_z (a + a^dag) to a damped oscillator in a thermal bath, by direct
integration of the master equation with QuTiP 4.7 (mesolve), in the frame rotating at the mode
frequency w:  H(t) = g s(t) sigma_z (a e^{-iwt} + a^dag e^{iwt}),
              L = sqrt(gamma (n_th + 1)) a,  sqrt(gamma n_th) a^dag,
s(t) = +-1 the echo sign (instantaneous pi pulses in the toggling frame). Input: the qubit in
|+>, the oscillator thermal with n0. Output: 2 <up| rho |down> traced over the oscillator
(real and imaginary part) at the end of the interaction. Units: f = 1 (w = 2 pi).
Prints one JSON object {"cases": [...]}."""
import json
import numpy as np
import qutip

def coherence(g_over_w, q, nth, n0, scheme, amount, N):
    w = 2 * np.pi
    g = g_over_w * w
    gamma = w / q
    tau = amount / 1.0 if scheme == "free" else amount / 2.0  # fraction of a period / half periods
    a = qutip.tensor(qutip.qeye(2), qutip.destroy(N))
    sz = qutip.tensor(qutip.sigmaz(), qutip.qeye(N))
    def sign(t):
        if scheme == "free":
            return 1.0
        k = min(int(np.floor(2.0 * t)), int(amount) - 1)
        return 1.0 if k % 2 == 0 else -1.0
    H = [[sz * a, lambda t, args: g * sign(t) * np.exp(-1j * w * t)],
         [sz * a.dag(), lambda t, args: g * sign(t) * np.exp(1j * w * t)]]
    c_ops = [np.sqrt(gamma * (nth + 1)) * a]
    if nth > 0:
        c_ops.append(np.sqrt(gamma * nth) * a.dag())
    plus = (qutip.basis(2, 0) + qutip.basis(2, 1)).unit()
    rho0 = qutip.tensor(plus * plus.dag(), qutip.thermal_dm(N, n0))
    op = qutip.tensor(qutip.basis(2, 1) * qutip.basis(2, 0).dag(), qutip.qeye(N))
    opts = qutip.Options(atol=1e-11, rtol=1e-9, nsteps=200000, max_step=tau / 400)
    # Integrate each echo segment separately so the sign jump is not smeared by the stepper.
    bounds = [0.0, tau] if scheme == "free" else [k / 2.0 for k in range(int(amount) + 1)]
    rho = rho0
    for t0, t1 in zip(bounds[:-1], bounds[1:]):
        res = qutip.mesolve(H, rho, [t0, t1], c_ops, [], options=opts)
        rho = res.states[-1]
    c = 2.0 * qutip.expect(op, rho)
    return complex(c)

cases = []
for (g_over_w, q, nth, n0, scheme, amount, N) in [
        (0.15, 50.0, 3.0, 3.0, "free", 0.5, 60),
        (0.15, 50.0, 3.0, 0.5, "free", 1.0, 60),
        (0.10, 40.0, 5.0, 5.0, "echo", 3, 90),
        (0.10, 200.0, 0.0, 0.0, "free", 0.3, 40)]:
    c = coherence(g_over_w, q, nth, n0, scheme, amount, N)
    cases.append({"g_over_w": g_over_w, "quality_factor": q, "bath_nbar": nth, "initial_nbar": n0,
                  "scheme": scheme, "amount": amount, "levels": N, "re": c.real, "im": c.imag})
print(json.dumps({"source": "QuTiP 4.7 mesolve", "cases": cases}, indent=1))
