#!/usr/bin/env bash
# Builds and runs every test: the default suite, then the long statistical studies
# (CTest label `long`).
set -euo pipefail
cd "$(dirname "$0")/.."
bash scripts/setup.sh
ctest --test-dir build -LE long --output-on-failure -j"$(nproc)"
ctest --test-dir build -L long --output-on-failure -j"$(nproc)"
