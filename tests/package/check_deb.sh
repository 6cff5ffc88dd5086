#!/usr/bin/env bash
# Builds the Debian package of a finished build with CPack, then checks what
# is in it, that the installed programs run, and that the desktop files pass
# the freedesktop/AppStream validators.
#
# Usage: check_deb.sh BUILD_DIR VERSION APP_ID [CPACK]
#   VERSION is CMake's PROJECT_VERSION, APP_ID the desktop id (both come from
#   CMake, so nothing here is hard-coded).
set -uo pipefail

build=${1:?build dir}
version=${2:?version}
app_id=${3:?app id}
cpack=${4:-cpack}

failures=0
fail() { echo "FAIL: $*"; failures=$((failures + 1)); }
pass() { echo "ok:   $*"; }

tmp=$(mktemp -d "${TMPDIR:-/tmp}/moderato-package.XXXXXX")
trap 'rm -rf "$tmp"' EXIT

# The package is made from the installed targets, so they must be built; this
# is a no-op after the full build that test.sh runs first.
cmake --build "$build" --target moderato moderato-cli >"$tmp/build.log" 2>&1 ||
  { cat "$tmp/build.log"; echo "FAIL: could not build moderato and moderato-cli"; exit 1; }

# ------------------------------------------------------------------ cpack
if ! "$cpack" -G DEB -B "$tmp/out" --config "$build/CPackConfig.cmake" >"$tmp/cpack.log" 2>&1; then
  cat "$tmp/cpack.log"
  echo "FAIL: cpack -G DEB failed"
  exit 1
fi
shopt -s nullglob
debs=("$tmp"/out/*.deb)
shopt -u nullglob
if [ ${#debs[@]} -ne 1 ]; then
  cat "$tmp/cpack.log"
  echo "FAIL: expected exactly one .deb in $tmp/out, found ${#debs[@]}"
  exit 1
fi
deb=${debs[0]}
arch=$(dpkg --print-architecture)
# dpkg-deb: Debian's file name convention <package>_<version>_<architecture>.deb
[ "$(basename "$deb")" = "moderato_${version}_${arch}.deb" ] &&
  pass "file name $(basename "$deb") ($(stat -c %s "$deb") bytes)" ||
  fail "file name $(basename "$deb"), expected moderato_${version}_${arch}.deb"

# ------------------------------------------------------------------ control fields (dpkg-deb --info)
dpkg-deb --info "$deb" >"$tmp/info.txt" || fail "dpkg-deb --info could not read the package"
field() { dpkg-deb --field "$deb" "$1"; }
[ "$(field Package)" = moderato ] && pass "Package: moderato" || fail "Package: $(field Package)"
[ "$(field Version)" = "$version" ] && pass "Version: $version" || fail "Version: $(field Version), expected $version"
[ "$(field Architecture)" = "$arch" ] && pass "Architecture: $arch" || fail "Architecture: $(field Architecture)"
[ "$(field Section)" = science ] && pass "Section: science" || fail "Section: $(field Section)"
[ -n "$(field Maintainer)" ] && pass "Maintainer: $(field Maintainer)" || fail "no Maintainer field"
[ -n "$(field Description)" ] && pass "Description present" || fail "no Description field"
depends=$(field Depends)
echo "      Depends: $depends"
# dpkg-shlibdeps fills Depends from the linked libraries: the workbench links
# Qt 6 Widgets and both programs link the C++ runtime (common practice: the
# Debian package names of those libraries).
for lib in libqt6widgets6 libstdc++6 libc6; do
  grep -q "\b$lib\b" <<<"$depends" && pass "Depends names $lib" || fail "Depends lacks $lib: $depends"
done

# ------------------------------------------------------------------ contents (dpkg-deb --contents)
dpkg-deb --contents "$deb" | awk '{print $NF}' | sed 's|^\./|/|' >"$tmp/contents.txt"
expected=(
  /usr/bin/moderato
  /usr/bin/moderato-cli
  "/usr/share/applications/$app_id.desktop"
  /usr/share/mime/packages/moderato.xml
  "/usr/share/metainfo/$app_id.metainfo.xml"
  "/usr/share/icons/hicolor/scalable/apps/$app_id.svg"
  /usr/share/doc/moderato/copyright
  /usr/share/doc/moderato/README.md
  /usr/share/doc/moderato/LICENSE
  /usr/share/moderato/sample-projects/coffee-discount/coffee-discount.moderato
  /usr/share/moderato/sample-projects/coffee-discount/spend.csv
)
for f in "${expected[@]}"; do
  grep -qxF "$f" "$tmp/contents.txt" && pass "contains $f" || fail "missing $f"
done
# Every sample project folder in the source tree is shipped.
src_dir=$(sed -n 's/^CMAKE_HOME_DIRECTORY:INTERNAL=//p' "$build/CMakeCache.txt")
for p in "$src_dir"/sample-projects/*/*.moderato; do
  rel=${p#"$src_dir"/sample-projects/}
  grep -qxF "/usr/share/moderato/sample-projects/$rel" "$tmp/contents.txt" &&
    pass "contains sample project $rel" || fail "missing sample project $rel"
done
# Only the application: no test programs, static libraries, headers or the generator.
unwanted=$(grep -E '_tests$|\.a$|/include/|generate\.py$|/lib/cmake/' "$tmp/contents.txt" || true)
[ -z "$unwanted" ] && pass "no tests, static libraries, headers or generator script" ||
  fail "unexpected files: $unwanted"
[ "$(grep -c '^/usr/bin/.' "$tmp/contents.txt")" -eq 2 ] && pass "exactly two programs in /usr/bin" ||
  fail "programs in /usr/bin: $(grep '^/usr/bin/.' "$tmp/contents.txt" | tr '\n' ' ')"

# ------------------------------------------------------------------ unpack and run (dpkg -x)
root="$tmp/root"
dpkg -x "$deb" "$root" || fail "dpkg -x failed"
run_version() {  # program, expected first word
  local out rc
  out=$(env -u DISPLAY -u WAYLAND_DISPLAY -u QT_QPA_PLATFORM "$root/usr/bin/$1" --version 2>&1)
  rc=$?
  [ $rc -eq 0 ] && pass "$1 --version exits 0 without a display" || fail "$1 --version exit code $rc: $out"
  # The version comes from CMake's project(VERSION); the name is the program's own.
  [ "$out" = "$2 $version" ] && pass "$1 --version prints '$out'" || fail "$1 --version printed '$out', expected '$2 $version'"
}
run_version moderato-cli moderato-cli
run_version moderato Moderato
help=$(env -u DISPLAY -u WAYLAND_DISPLAY -u QT_QPA_PLATFORM "$root/usr/bin/moderato" --help 2>&1)
grep -q -- "--version" <<<"$help" && grep -q "\[file\]" <<<"$help" &&
  pass "moderato --help works without a display" || fail "moderato --help printed: $help"

# The installed sample data are intact: each project records the SHA-256 of its
# data files (sha256sum, coreutils, is the outside reference for the digest).
samples="$root/usr/share/moderato/sample-projects"
while IFS=$'\t' read -r project path digest; do
  actual=$(sha256sum "$(dirname "$project")/$path" 2>/dev/null | cut -d' ' -f1)
  [ "$actual" = "$digest" ] && pass "sample data $path matches its recorded SHA-256" ||
    fail "sample data $path: SHA-256 ${actual:-missing}, project records $digest"
done < <(/usr/bin/python3 - "$samples" <<'EOF'
import json, pathlib, sys
for p in sorted(pathlib.Path(sys.argv[1]).glob("*/*.moderato")):
    for d in json.loads(p.read_text())["datasets"]:
        print(f"{p}\t{d['path']}\t{d['sha256']}")
EOF
)
# The installed command-line program reads an installed sample dataset.
if env -u DISPLAY "$root/usr/bin/moderato-cli" columns --data "$samples/coffee-discount/spend.csv" >"$tmp/columns.txt" 2>&1; then
  pass "moderato-cli columns reads the installed coffee-discount data"
else
  fail "moderato-cli columns failed: $(cat "$tmp/columns.txt")"
fi

# ------------------------------------------------------------------ desktop integration
desktop="$root/usr/share/applications/$app_id.desktop"
metainfo="$root/usr/share/metainfo/$app_id.metainfo.xml"
mime="$root/usr/share/mime/packages/moderato.xml"

# freedesktop Desktop Entry spec via desktop-file-validate
if command -v desktop-file-validate >/dev/null; then
  out=$(desktop-file-validate "$desktop" 2>&1)
  rc=$?
  if [ $rc -ne 0 ] || grep -q "error:" <<<"$out"; then
    fail "desktop-file-validate (exit $rc): $out"
  elif [ -n "$out" ]; then
    pass "desktop-file-validate: no errors"; echo "$out"
  else
    pass "desktop-file-validate: no messages"
  fi
else
  echo "SKIP: desktop-file-validate is not installed (Debian package desktop-file-utils); .desktop not validated"
fi

# AppStream spec via appstreamcli (no network: URLs are not fetched)
if command -v appstreamcli >/dev/null; then
  if out=$(appstreamcli validate --no-net "$metainfo" 2>&1); then
    pass "appstreamcli validate: $(tail -n1 <<<"$out")"
    grep -E '^[EWI]:' <<<"$out" || true
  else
    fail "appstreamcli validate: $out"
  fi
  # The same validator on the unpacked tree checks that the metainfo, the
  # .desktop file it launches and the icon fit together.
  if out=$(appstreamcli validate-tree --no-net "$root/usr" 2>&1); then
    pass "appstreamcli validate-tree: $(tail -n1 <<<"$out")"
  else
    fail "appstreamcli validate-tree: $out"
  fi
else
  echo "SKIP: appstreamcli is not installed (Debian package appstream); metainfo not validated"
fi

# freedesktop shared-mime-info spec via update-mime-database: the package file
# compiles, and the database maps *.moderato to our type, a kind of JSON.
mime_type=$(sed -n 's/.*<mime-type type="\([^"]*\)".*/\1/p' "$mime")
if command -v update-mime-database >/dev/null; then
  mkdir -p "$tmp/mime/packages" && cp "$mime" "$tmp/mime/packages/"
  # (XDG_DATA_DIRS names the temporary folder so the tool does not remark that
  # it is outside the search path; any other output is a complaint.)
  if out=$(XDG_DATA_DIRS="$tmp" update-mime-database "$tmp/mime" 2>&1) && [ -z "$out" ]; then
    pass "update-mime-database compiles moderato.xml without messages"
  else
    fail "update-mime-database: $out"
  fi
  grep -qxF "50:$mime_type:*.moderato" "$tmp/mime/globs2" && pass "glob *.moderato -> $mime_type" ||
    fail "globs2 lacks *.moderato -> $mime_type: $(cat "$tmp/mime/globs2" 2>/dev/null)"
  grep -qxF "$mime_type application/json" "$tmp/mime/subclasses" && pass "$mime_type is a subclass of application/json" ||
    fail "subclasses: $(cat "$tmp/mime/subclasses" 2>/dev/null)"
else
  echo "SKIP: update-mime-database is not installed (Debian package shared-mime-info); MIME file not compiled"
fi

# The pieces name each other consistently (Desktop Entry spec: Icon names an
# icon theme entry, MimeType lists types; AppStream spec: launchable names the
# .desktop file).
grep -qxF "Icon=$app_id" "$desktop" && pass "Icon=$app_id matches the installed icon" || fail "Icon= does not name $app_id"
grep -q "^MimeType=.*$mime_type;" "$desktop" && pass "MimeType lists $mime_type" || fail "MimeType lacks $mime_type"
grep -q "^Exec=moderato " "$desktop" && pass "Exec runs moderato" || fail "Exec does not run moderato"
grep -qF "<launchable type=\"desktop-id\">$app_id.desktop</launchable>" "$metainfo" &&
  pass "metainfo launches $app_id.desktop" || fail "metainfo launchable is not $app_id.desktop"
grep -qF "<id>$app_id</id>" "$metainfo" && pass "metainfo id is $app_id" || fail "metainfo id is not $app_id"
grep -qF "<release version=\"$version\"" "$metainfo" && pass "metainfo has a release entry for $version" ||
  fail "metainfo has no release entry for $version"

echo
if [ $failures -ne 0 ]; then
  echo "$failures check(s) failed"
  exit 1
fi
echo "all package checks passed"
