#!/usr/bin/env bash
# Installs the Debian packages Moderato needs to build, test and run.
# Usage: ./deps.sh [build|test|all]   (idempotent; uses apt-get, as root or via sudo)
set -euo pipefail

# scripts/check_deps.py (ctest house.deps) fails when the tests use a Python
# module or a program that no package here (or a required one) provides.
build_pkgs=(build-essential cmake ninja-build pkg-config libeigen3-dev libboost-math-dev nlohmann-json3-dev
            libssl-dev libpq-dev libzip-dev libexpat1-dev libsqlite3-dev qt6-base-dev qt6-svg-dev libqcustomplot-dev fonts-dejavu-core)
test_pkgs=(googletest libgtest-dev libgmock-dev libbenchmark-dev python3 python3-statsmodels python3-pandas
           python3-numpy python3-scipy python3-mpmath cmark-gfm xvfb xauth xdotool imagemagick fonts-dejavu-core time
           desktop-file-utils appstream shared-mime-info poppler-utils chromium file clang-format git
           clang-15 libfuzzer-15-dev python3-openpyxl postgresql-15)

want=("${build_pkgs[@]}")
case "${1:-all}" in
  build) ;;
  test|all) want+=("${test_pkgs[@]}") ;;
  *) echo "usage: $0 [build|test|all]" >&2; exit 2 ;;
esac

missing=()
for p in "${want[@]}"; do
  dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed" || missing+=("$p")
done
[ ${#missing[@]} -eq 0 ] && exit 0

echo "deps.sh: installing ${missing[*]}"
sudo=""
if [ "$(id -u)" -ne 0 ]; then
  command -v sudo >/dev/null || { echo "deps.sh: need root (or sudo) to install: ${missing[*]}" >&2; exit 1; }
  sudo="sudo"
fi
export DEBIAN_FRONTEND=noninteractive
$sudo apt-get update -qq
$sudo apt-get install -y -qq --no-install-recommends "${missing[@]}" >/dev/null
