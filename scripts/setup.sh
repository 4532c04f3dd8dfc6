#!/usr/bin/env bash
# Installs the Debian 12 packages macroreal needs (only those missing), then configures
# and builds into ./build. Run as root on a fresh machine; safe to re-run.
set -euo pipefail
cd "$(dirname "$0")/.."

packages=(cmake g++ make pkg-config libeigen3-dev libboost-dev nlohmann-json3-dev catch2
          libbenchmark-dev libnlopt-cxx-dev libcli11-dev libplplot-dev plplot-driver-cairo
          python3 python3-numpy python3-scipy python3-qutip)
missing=()
for p in "${packages[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
if ((${#missing[@]})); then
  echo "setup: installing ${missing[*]}" >&2
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -qq
  apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
fi

cmake -S . -B build -DCMAKE_BUILD_TYPE=Release >/dev/null
cmake --build build -j"$(nproc)"
