#!/usr/bin/env bash
# Builds Moderato and runs every test (installs what it needs first).
# Usage: ./test.sh [extra cmake options]   e.g. ./test.sh -DMODERATO_SANITIZE=ON
# BUILD_DIR selects the build folder (default build/); CTEST_EXCLUDE, a ctest
# regular expression, leaves out the tests it matches.
set -euo pipefail
cd "$(dirname "$0")"
./deps.sh test
build="${BUILD_DIR:-build}"
cmake -S . -B "$build" -G Ninja -DCMAKE_BUILD_TYPE=Release "$@" >/dev/null
cmake --build "$build" -j"$(nproc)"
exclude=()
[ -n "${CTEST_EXCLUDE:-}" ] && exclude=(-E "$CTEST_EXCLUDE")
ctest --test-dir "$build" --output-on-failure -j"$(nproc)" --timeout 1500 "${exclude[@]}"
