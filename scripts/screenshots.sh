#!/usr/bin/env bash
# Screenshots of the workbench for the README: starts the built `moderato`
# under a virtual X server (Xvfb), opens sample projects, switches the
# analysis sections with their shortcuts (Ctrl+1 Specify, Ctrl+2 Estimates,
# Ctrl+3 Probe, Ctrl+4 Checks, Ctrl+5 Memo) and saves one PNG per section.
#
#   scripts/screenshots.sh [path/to/moderato] [output folder]
#
# Defaults: build/app/moderato and docs/screenshots/. Builds nothing itself.
# Needs Xvfb, xdotool and ImageMagick's import. The app runs with its own
# temporary settings folder, so the user's recent files and window state are
# never touched.
#
# Which screenshots: SHOTS, a space-separated list of project:section pairs.
# The default is the set the README and the user guide show, so a plain run
# regenerates docs/screenshots/. PROJECTS (sample names) and SECTIONS
# (specify estimates probe checks memo), when either is given, replace SHOTS
# with every section of SECTIONS (default all five) for every project of
# PROJECTS (default the default's projects). Files are named
# <project>-<section number>-<section>.png, so a run replaces the earlier
# screenshot of the same project and section.
#
# Other environment: SETTLE (seconds to wait after opening a project,
# default 3), PAUSE (seconds after switching a section, default 1.5),
# COLOURS (palette size of the saved PNGs, default 256, which keeps them
# small for the repository; 0 keeps full colour).
set -euo pipefail

root="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
app="${1:-$root/build/app/moderato}"
out="${2:-$root/docs/screenshots}"
settle="${SETTLE:-3}"
pause="${PAUSE:-1.5}"
colours="${COLOURS:-256}"
sections=(specify estimates probe checks memo)
default_shots="coffee-discount:specify coffee-discount:estimates coffee-discount:probe coffee-discount:memo
orchard-nitrogen:probe orchard-nitrogen:checks volunteer-onboarding:probe helpdesk-staffing:probe
trial-conversion:probe turbine-repairs:estimates turbine-repairs:probe"
read -r -a shots <<<"$(printf '%s' "${SHOTS:-$default_shots}" | tr '\n\t' '  ')"
if [ -n "${PROJECTS:-}" ] || [ -n "${SECTIONS:-}" ]; then
    read -r -a some_projects <<<"${PROJECTS:-coffee-discount orchard-nitrogen volunteer-onboarding trial-conversion}"
    read -r -a some_sections <<<"${SECTIONS:-${sections[*]}}"
    shots=()
    for p in "${some_projects[@]}"; do
        for s in "${some_sections[@]}"; do shots+=("$p:$s"); done
    done
fi
width=1600
height=1000

die() {
    echo "screenshots.sh: $*" >&2
    exit 2
}
need() { command -v "$1" >/dev/null 2>&1 || die "'$1' is missing; install the Debian package '$2'"; }
need Xvfb xvfb
need xdotool xdotool
need import imagemagick
[[ "$colours" =~ ^[0-9]+$ ]] || die "COLOURS must be a whole number (0 = full colour)"
[ -x "$app" ] || die "no moderato executable at '$app' (build it first: cmake --build build --target moderato)"
app="$(cd "$(dirname "$app")" && pwd)/$(basename "$app")"
# The projects in order of first mention, each with its wanted sections.
projects=()
declare -A wanted=()
for shot in "${shots[@]}"; do
    name="${shot%%:*}"
    section="${shot#*:}"
    if [ "$name" = "$shot" ] || [ -z "$name" ]; then die "'$shot' is not project:section"; fi
    case " ${sections[*]} " in *" $section "*) ;; *) die "no section '$section' in '$shot' (sections: ${sections[*]})" ;; esac
    [ -f "$root/sample-projects/$name/$name.moderato" ] || die "no sample project '$root/sample-projects/$name/$name.moderato'"
    [ -n "${wanted[$name]:-}" ] || projects+=("$name")
    wanted[$name]="${wanted[$name]:-} $section"
done
[ "${#projects[@]}" -gt 0 ] || die "nothing to capture (SHOTS is empty)"

# A display number nobody uses.
display=
for n in $(seq 91 160); do
    if [ ! -e "/tmp/.X11-unix/X$n" ] && [ ! -e "/tmp/.X$n-lock" ]; then
        display=":$n"
        break
    fi
done
[ -n "$display" ] || die "no free X display number between :91 and :160"

work="$(mktemp -d)"
xvfb_pid=
app_pid=
cleanup() {
    if [ -n "$app_pid" ]; then kill "$app_pid" 2>/dev/null || true; wait "$app_pid" 2>/dev/null || true; fi
    if [ -n "$xvfb_pid" ]; then kill "$xvfb_pid" 2>/dev/null || true; wait "$xvfb_pid" 2>/dev/null || true; fi
    rm -rf "$work"
}
trap cleanup EXIT

Xvfb "$display" -screen 0 "${width}x${height}x24" -nolisten tcp >"$work/xvfb.log" 2>&1 &
xvfb_pid=$!
for _ in $(seq 100); do
    [ -e "/tmp/.X11-unix/X${display#:}" ] && break
    kill -0 "$xvfb_pid" 2>/dev/null || { cat "$work/xvfb.log" >&2; die "Xvfb did not start on $display"; }
    sleep 0.1
done
[ -e "/tmp/.X11-unix/X${display#:}" ] || die "Xvfb did not start on $display"

export DISPLAY="$display"
export QT_QPA_PLATFORM=xcb
export XDG_CONFIG_HOME="$work/config" XDG_DATA_HOME="$work/data" XDG_CACHE_HOME="$work/cache"
export XDG_RUNTIME_DIR="$work/runtime"
mkdir -p "$XDG_RUNTIME_DIR" && chmod 700 "$XDG_RUNTIME_DIR"
mkdir -p "$out"

saved=0
for name in "${projects[@]}"; do
    project="$root/sample-projects/$name/$name.moderato"
    "$app" "$project" >"$work/$name.log" 2>&1 &
    app_pid=$!
    # The title names the project once it is open ("<name>.moderato — Moderato").
    wid="$(timeout 30 xdotool search --sync --onlyvisible --name "$name.*Moderato" 2>/dev/null | head -n 1 || true)"
    if [ -z "$wid" ]; then
        cat "$work/$name.log" >&2
        die "the Moderato window for $name did not appear within 30 s"
    fi
    # No window manager runs here: place, size and focus the window ourselves.
    xdotool windowmove "$wid" 0 0 windowsize "$wid" "$width" "$height"
    xdotool windowfocus --sync "$wid" 2>/dev/null || xdotool windowfocus "$wid"
    sleep "$settle"
    for i in "${!sections[@]}"; do
        case "${wanted[$name]} " in *" ${sections[$i]} "*) ;; *) continue ;; esac
        xdotool key --clearmodifiers "ctrl+$((i + 1))"
        sleep "$pause"
        file="$out/$name-$((i + 1))-${sections[$i]}.png"
        if [ "$colours" -gt 0 ]; then
            import -window root -colors "$colours" "PNG8:$file"
        else
            import -window root "$file"
        fi
        echo "saved $file"
        saved=$((saved + 1))
    done
    kill "$app_pid" 2>/dev/null || true
    wait "$app_pid" 2>/dev/null || true
    app_pid=
done
echo "$saved screenshots in $out"
