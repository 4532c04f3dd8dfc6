#!/usr/bin/env bash
# The main job on the bundled demo: installs and builds if needed, then predicts the
# three-time Leggett-Garg test of the invented demo protocol.
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/setup.sh
./build/macroreal predict protocols/lg3_thermal.json
