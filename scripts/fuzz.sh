#!/usr/bin/env bash
# Builds the libFuzzer targets (tests/fuzz) in build-fuzz/ with clang++-15,
# coverage, AddressSanitizer and UndefinedBehaviorSanitizer (core only, no
# Qt), then runs each target for a bounded time over its committed seed
# corpus (tests/fuzz/corpus/<target>/) plus the inputs it found before
# (build-fuzz/corpus/<target>/). Prints executions, exec/s, cov and ft per
# target. Exits nonzero on any crash, leak, timeout, out-of-memory or
# internal error (a non-InputError exception aborts inside the target); the
# input that did it is saved as build-fuzz/artifacts/<target>-crash-...
#
# Usage: scripts/fuzz.sh [SECONDS_PER_TARGET (default 60)] [TARGET ...]
# Environment: FUZZ_BUILD_DIR (build-fuzz), FUZZ_JOBS (build jobs, 2),
#              FUZZ_CXX (clang++-15).
set -euo pipefail
cd "$(dirname "$0")/.."
seconds="${1:-60}"
[ $# -gt 0 ] && shift
targets=("$@")
[ ${#targets[@]} -eq 0 ] && targets=(fuzz_csv fuzz_project fuzz_recipe fuzz_writers fuzz_workbook)
build="${FUZZ_BUILD_DIR:-build-fuzz}"
cxx="${FUZZ_CXX:-clang++-15}"
command -v "$cxx" >/dev/null || { echo "fuzz.sh: $cxx not found (./deps.sh test installs clang-15)" >&2; exit 1; }

launcher=()
command -v ccache >/dev/null && launcher=(-DCMAKE_CXX_COMPILER_LAUNCHER=ccache)
# -O1 with line tables: readable reports and a quick build, as in the sanitizer build.
cmake -S . -B "$build" -G Ninja -DMODERATO_FUZZ=ON -DCMAKE_CXX_COMPILER="$cxx" -DCMAKE_BUILD_TYPE=Debug \
  "-DCMAKE_CXX_FLAGS_DEBUG=-O1 -gline-tables-only" -DMODERATO_BUILD_TESTS=OFF -DMODERATO_BUILD_GUI=OFF \
  "${launcher[@]}" >/dev/null
cmake --build "$build" -j "${FUZZ_JOBS:-2}" --target "${targets[@]}"

mkdir -p "$build/artifacts"
failed=()
printf '\n%-14s %12s %9s %7s %7s  %s\n' target executions exec/s cov ft result
for t in "${targets[@]}"; do
  work="$build/corpus/$t"
  mkdir -p "$work"
  dict=()
  [ -f "tests/fuzz/$t.dict" ] && dict=("-dict=tests/fuzz/$t.dict")
  log="$build/$t.log"
  status=0
  "$build/tests/fuzz/$t" -max_total_time="$seconds" -timeout=10 -rss_limit_mb=2048 -print_final_stats=1 \
    -artifact_prefix="$build/artifacts/$t-" "${dict[@]}" "$work" "tests/fuzz/corpus/$t" >"$log" 2>&1 || status=$?
  execs=$(sed -n 's/^stat::number_of_executed_units: *//p' "$log" | tail -1)
  rate=$(sed -n 's/^stat::average_exec_per_sec: *//p' "$log" | tail -1)
  cov=$(grep -Eo 'cov: [0-9]+' "$log" | tail -1 | cut -d' ' -f2)
  ft=$(grep -Eo 'ft: [0-9]+' "$log" | tail -1 | cut -d' ' -f2)
  result=ok
  if [ "$status" -ne 0 ] || grep -qE 'internal error|ERROR: (AddressSanitizer|LeakSanitizer|libFuzzer)|runtime error:' "$log"; then
    result="FAILED (exit $status; see $log)"
    failed+=("$t")
  fi
  printf '%-14s %12s %9s %7s %7s  %s\n' "$t" "${execs:-?}" "${rate:-?}" "${cov:-?}" "${ft:-?}" "$result"
done
if [ ${#failed[@]} -gt 0 ]; then
  echo "fuzz.sh: ${failed[*]} failed; reproduce with $build/tests/fuzz/<target> <artifact>" >&2
  for t in "${failed[@]}"; do grep -E -m5 -A3 'internal error|ERROR:|runtime error:' "$build/$t.log" >&2 || true; done
  exit 1
fi
