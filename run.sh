#!/usr/bin/env bash
# Builds Moderato and runs it on a bundled sample (installs what it needs first).
set -euo pipefail
cd "$(dirname "$0")"
./deps.sh build
build="${BUILD_DIR:-build}"
cmake -S . -B "$build" -G Ninja -DCMAKE_BUILD_TYPE=Release -DMODERATO_BUILD_TESTS=OFF -DMODERATO_BUILD_BENCHMARKS=OFF >/dev/null
cmake --build "$build" -j"$(nproc)" --target moderato-cli
# A coffee roaster's weekly spend: does a deeper discount move spend more for loyalty members?
exec "$build/app/moderato-cli" fit --data sample-projects/coffee-discount/spend.csv \
  --outcome weekly_spend --predictors discount_pct,loyalty_member --interaction discount_pct,loyalty_member \
  --se hc3 --format text
