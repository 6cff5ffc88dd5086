#!/usr/bin/env bash
# Formats the C++ sources with the repository's .clang-format, or with
# --check lists the files that differ and fails (ctest house.format).
# Usage: scripts/format.sh [--check]
set -euo pipefail
cd "$(dirname "$0")/.."
mapfile -t files < <(git ls-files -- 'core/*.cpp' 'core/*.hpp' 'ui/*.cpp' 'ui/*.hpp' 'app/*.cpp' 'app/*.hpp' \
                                     'tests/*.cpp' 'tests/*.hpp')
# Files deleted in the work tree but not yet in the index are skipped.
present=()
for f in "${files[@]}"; do [ -f "$f" ] && present+=("$f"); done
if [ "${1:-}" = "--check" ]; then
  bad=()
  for f in "${present[@]}"; do
    clang-format --style=file "$f" | cmp -s - "$f" || bad+=("$f")
  done
  if [ ${#bad[@]} -gt 0 ]; then
    printf 'not formatted: %s\n' "${bad[@]}"
    echo "format.sh: ${#bad[@]} file(s) differ from .clang-format; run scripts/format.sh" >&2
    exit 1
  fi
  echo "format.sh: ${#present[@]} files follow .clang-format"
else
  clang-format --style=file -i "${present[@]}"
fi
