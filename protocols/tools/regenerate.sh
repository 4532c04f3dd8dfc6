#!/bin/sh
# Rewrites the built protocol files of protocols/ from their builders
# (lib/protocol/protocol_library.cpp) and then checks them. Usage, from the repository root:
#   protocols/tools/regenerate.sh [build-folder]     (default: build)
# The check alone is part of the default test run (test_protocol "[library]").
set -e
build=${1:-build}
cmake --build "$build" --target test_protocol -j2
MACROREAL_WRITE_PROTOCOLS="$(pwd)/protocols" "$build/tests/test_protocol" "[library]"
"$build/tests/test_protocol" "[library]"
