#!/usr/bin/env bash
# Takes assets/design_page.png: the "Design & hardware" page on the built-in demo (or
# a study), with playback and the robustness map computed, in a virtual X display.
# Installs nothing. Needs: xvfb imagemagick x11-utils xdotool
#   (apt-get install -y --no-install-recommends xvfb imagemagick x11-utils xdotool)
# and the page's example launcher in release:
#   cargo build --release -p quenchless-app --example design_page
# Usage: scripts/screenshot_design.sh [study.ron] [out.png]
set -euo pipefail
cd "$(dirname "$0")/.."
STUDY=${1:-}
OUT=${2:-assets/design_page.png}
for tool in Xvfb xdpyinfo xdotool import; do
    command -v "$tool" >/dev/null || { echo "screenshot_design.sh: $tool not found; install xvfb imagemagick x11-utils xdotool" >&2; exit 1; }
done
BIN=./target/release/examples/design_page
[ -x "$BIN" ] || { echo "screenshot_design.sh: build first: cargo build --release -p quenchless-app --example design_page" >&2; exit 1; }
APP=("$BIN")
[ -n "$STUDY" ] && APP+=("$STUDY")
DISPLAY_NUM=${SCREENSHOT_DISPLAY:-:98}
export DISPLAY=$DISPLAY_NUM
XDG_RUNTIME_DIR=$(mktemp -d)
export XDG_RUNTIME_DIR
# A private config dir: no recovery prompt or preferences from a real session.
XDG_DATA_HOME=$(mktemp -d)
export XDG_DATA_HOME
Xvfb "$DISPLAY_NUM" -screen 0 1600x1000x24 -nolisten tcp &
XPID=$!
APID=
cleanup() {
    set +e
    if [ -n "$APID" ]; then kill "$APID" 2>/dev/null; wait "$APID" 2>/dev/null; fi
    kill "$XPID" 2>/dev/null
    wait "$XPID" 2>/dev/null
    rm -rf "$XDG_RUNTIME_DIR" "$XDG_DATA_HOME"
}
trap cleanup EXIT
for _ in $(seq 100); do xdpyinfo >/dev/null 2>&1 && break; sleep 0.1; done
"${APP[@]}" &
APID=$!
WIN=
for _ in $(seq 100); do
    WIN=$(xdotool search --name '^Quenchless' 2>/dev/null | head -n 1 || true)
    [ -n "$WIN" ] && break
    sleep 0.2
done
[ -n "$WIN" ] || { echo "screenshot_design.sh: the Quenchless window did not appear" >&2; exit 1; }
xdotool windowsize "$WIN" 1600 1000 windowmove "$WIN" 0 0 || true
# The robustness map runs on a worker; give it time on a slow machine.
sleep "${SCREENSHOT_WAIT:-12}"
mkdir -p "$(dirname "$OUT")"
import -window "$WIN" "$OUT"
echo "wrote $OUT"
