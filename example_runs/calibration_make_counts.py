#!/usr/bin/python3
"""Writes the invented calibration demo files (calibration_counts.csv, calibration_counts_decay.csv).

INVENTED DATA for the demo of `macroreal calibrate`: no experiment behind it. Poisson counts by
inversion from Python's random.random() (Mersenne Twister, stable across Python versions),
seed fixed, so re-running gives the same files.
  calibration_counts.csv:       dark 0.12 and bright 9.5 counts per 300 us window; 2000 dark,
                                2000 bright reference shots and 2000 unknown shots (40 % bright).
  calibration_counts_decay.csv: as above with bright 12, and the dark state pumped to bright
                                after an exponential time with mean 5 ms (0.06 per window).
"""
import math
import random


def poisson(rng, lam):
    u, n = rng.random(), 0
    p = math.exp(-lam)
    c = p
    while u > c:
        n += 1
        p *= lam / n
        c += p
    return n


def dark(rng, d, b, a):
    if a > 0:
        s = rng.expovariate(a)
        if s < 1:
            return poisson(rng, d + (b - d) * (1 - s))
    return poisson(rng, d)


def write(path, d, b, a, seed, note):
    rng = random.Random(seed)
    with open(path, "w") as f:
        f.write("# INVENTED DATA (demo of macroreal calibrate): " + note + "\n")
        f.write("label,count,window_s\n")
        for _ in range(2000):
            f.write("dark,%d,3e-4\n" % dark(rng, d, b, a))
        for _ in range(2000):
            f.write("bright,%d,3e-4\n" % poisson(rng, b))
        for _ in range(2000):
            if rng.random() < 0.4:
                f.write("unknown,%d,3e-4\n" % poisson(rng, b))
            else:
                f.write("unknown,%d,3e-4\n" % dark(rng, d, b, a))


write("calibration_counts.csv", 0.12, 9.5, 0.0, 20261202,
      "dark 0.12, bright 9.5 per 300 us window, no decay")
write("calibration_counts_decay.csv", 0.12, 12.0, 0.06, 20261203,
      "dark 0.12, bright 12 per 300 us window, dark pumped to bright with mean lifetime 5 ms")
