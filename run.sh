#!/usr/bin/env bash
# Builds the Moderato workbench and opens a bundled sample project
# (installs what it needs first). Extra arguments go to the workbench,
# e.g. ./run.sh sample-projects/orchard-nitrogen/orchard-nitrogen.moderato
set -euo pipefail
cd "$(dirname "$0")"
./deps.sh build
build="${BUILD_DIR:-build}"
cmake -S . -B "$build" -G Ninja -DCMAKE_BUILD_TYPE=Release -DMODERATO_BUILD_TESTS=OFF -DMODERATO_BUILD_BENCHMARKS=OFF >/dev/null
cmake --build "$build" -j"$(nproc)" --target moderato moderato-cli
# A coffee roaster's weekly spend: does a deeper discount move spend more for loyalty members?
project="${1:-sample-projects/coffee-discount/coffee-discount.moderato}"
if [ -z "${DISPLAY:-}" ] && [ -z "${WAYLAND_DISPLAY:-}" ] && [ -z "${QT_QPA_PLATFORM:-}" ]; then
  echo "run.sh: built $build/app/moderato, but there is no display to show it on (DISPLAY is not set)." >&2
  echo "run.sh: on a desktop session run: $build/app/moderato $project" >&2
  echo "run.sh: headless, scripts/screenshots.sh saves screenshots of the workbench under Xvfb." >&2
  exit 1
fi
exec "$build/app/moderato" "$project"
