#!/usr/bin/python3
# Invented demo data: draws a per-shot outcome table for protocols/lg3_thermal.json from the
# model probabilities printed by `macroreal predict --json` (stdin), with Python's seeded
# Mersenne Twister (random.Random(seed).random() is fixed for a given seed), and writes the
# table (CSV, DESIGN.md section 8) to stdout. Ideal outcomes only: no detection errors are
# simulated. Shots of the sequences are interleaved in time, one every 2 ms.
#   ./build/macroreal predict protocols/lg3_thermal.json --json \
#     | /usr/bin/python3 example_runs/make_demo_runs.py 1500 7 > example_runs/lg3_thermal_runs.csv
import json
import random
import sys

shots = int(sys.argv[1]) if len(sys.argv) > 1 else 1500
seed = int(sys.argv[2]) if len(sys.argv) > 2 else 7
pred = json.load(sys.stdin)
rng = random.Random(seed)

cells = {}      # sequence -> list of (outcomes, p)
dark = {}       # sequence -> dark_is signs
steps = {}
for row in pred["probabilities"]:
    name = row["sequence"]
    cells.setdefault(name, []).append((row["outcomes"], row["p"]))
    dark[name] = row["dark_is"]
    steps[name] = len(row["steps"])

names = list(cells)
width = max(steps.values())
print("# invented demo data: drawn from the model probabilities of protocols/lg3_thermal.json")
print("# (macroreal predict --json), %d shots per sequence, seed %d, no detection errors" % (shots, seed))
print("sequence,shot,time_s," + ",".join("r%d" % (k + 1) for k in range(width)))
t = 0
for shot in range(shots):
    for name in names:
        u = rng.random()
        acc = 0.0
        chosen = cells[name][-1][0]
        for outcomes, p in cells[name]:
            acc += p
            if u < acc:
                chosen = outcomes
                break
        fields = []
        for k, sign in enumerate(chosen):
            fields.append("dark" if sign == dark[name][k] else "bright")
        fields += [""] * (width - len(fields))
        print("%s,%d,%.3f,%s" % (name, shot, t * 0.002, ",".join(fields)))
        t += 1
