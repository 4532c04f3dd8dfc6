#!/usr/bin/env bash
# The main job on the bundled demo: installs and builds if needed, then runs the invented
# end-to-end demo scenario (example_runs/demo/README.md): a device's feasibility, a designed
# protocol, a shot plan, simulated runs, their analysis. Shows each command as it runs, then
# the analysis report.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/setup.sh
echo
echo "== The invented demo scenario (example_runs/demo/): each command as it runs"
MACROREAL=./build/macroreal bash example_runs/demo/run_demo.sh 2>&1
echo
echo "== Feasibility verdict (example_runs/demo/reach.txt)"
sed -n '/^Verdict/,/^$/p' example_runs/demo/reach.txt
echo "== The analysis report (example_runs/demo/analysis.txt)"
cat example_runs/demo/analysis.txt
