#!/usr/bin/env bash
# The invented end-to-end demo scenario (README.md beside this file): a device, its
# feasibility, a designed protocol, a shot plan, simulated runs from that plan, their analysis.
# Every output of this folder is made by the commands below, run from the repository root;
# tests/apps/test_demo_scenario.cpp re-runs this script in a scratch copy and compares the
# bytes. MACROREAL names the program (default ./build/macroreal).
set -euo pipefail
cd "$(dirname "$0")/../.."
m="${MACROREAL:-./build/macroreal}"
d=example_runs/demo

# Shows each command (on stderr, so redirected outputs stay clean), then runs it.
step() { printf '$ macroreal %s\n' "${*:2}" >&2; "$@"; }

# 1. Feasibility of the invented device: hours to a 5-sigma test at power 0.8 on each route.
step "$m" reach $d/device.json -o $d/reach.txt
step "$m" reach $d/device.json --json -o $d/reach.json
# 2. Design: the directions and Ramsey phases of the starting protocol (the device's model with
#    reach's post-selected input, settings guessed) optimised for the expected significance at
#    6000 shots; |beta| = 2.4 stays the device's (six echo half periods).
step "$m" optimise $d/protocol_start.json --objective significance --budget-shots 6000 \
  --free angle,phase --max-evaluations 4000 --seed 1 -o $d/protocol_designed.json >$d/optimise.txt
# 3. Plan: shots per sequence for the LG test at alpha = 0.001 with power 0.9.
step "$m" plan $d/protocol_designed.json --alpha 0.001 --power 0.9 --cycle-time-s 0.004,0.0002 \
  -o $d/allocation.json --power-curve $d/power_curve.csv --figures $d/figures >$d/plan.txt
# 4. Simulated runs (invented data) from the plan, with a fixed seed; the plan sizes the LG
#    test only, so the NSIT control B (alone) gets 2500 shots of its own.
step "$m" simulate $d/protocol_designed.json --allocation $d/allocation.json --shots 2500 --seed 2026 \
  --cycle-time-s 0.004 --step-time-s 0.0002 -o $d/runs.csv
# 5. The analysis of those runs; --check lg makes the script fail (exit code 1) if the LG test
#    does not reach alpha = 0.05 (the NSIT test is the invasiveness control: not checked).
step "$m" analyse $d/runs.csv --protocol $d/protocol_designed.json --bootstrap 2000 --seed 7 \
  --check lg --figures $d/figures -o $d/analysis.txt
step "$m" analyse $d/runs.csv --protocol $d/protocol_designed.json --bootstrap 2000 --seed 7 \
  --json -o $d/analysis.json
