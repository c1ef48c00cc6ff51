#!/usr/bin/env bash
# Takes assets/screenshot.png of the app on a sample study, in a virtual X display.
# Installs nothing. Needs: xvfb imagemagick x11-utils xdotool
#   (apt-get install -y --no-install-recommends xvfb imagemagick x11-utils xdotool)
# and a release build: the `quenchless` binary, or else the app's example launcher.
# Usage: scripts/screenshot.sh [study.ron] [out.png]
# SCREENSHOT_APP replaces the launcher; SCREENSHOT_WAIT the seconds to wait (4).
set -euo pipefail
cd "$(dirname "$0")/.."
STUDY=${1:-sample_profiles/tweezer_expansion.ron}
OUT=${2:-assets/screenshot.png}
for tool in Xvfb xdpyinfo xdotool import; do
    command -v "$tool" >/dev/null || { echo "screenshot.sh: $tool not found; install xvfb imagemagick x11-utils xdotool" >&2; exit 1; }
done
if [ -n "${SCREENSHOT_APP:-}" ]; then
    # Another launcher (scripts/screenshot_design.sh), as words without spaces.
    read -r -a APP <<< "$SCREENSHOT_APP"
elif [ -x ./target/release/quenchless ]; then
    APP=(./target/release/quenchless open "$STUDY")
elif [ -x ./target/release/examples/open_study ]; then
    APP=(./target/release/examples/open_study "$STUDY")
else
    echo "screenshot.sh: build first: cargo build --release (or -p quenchless-app --examples)" >&2
    exit 1
fi
DISPLAY_NUM=${SCREENSHOT_DISPLAY:-:99}
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
[ -n "$WIN" ] || { echo "screenshot.sh: the Quenchless window did not appear" >&2; exit 1; }
xdotool windowsize "$WIN" 1600 1000 windowmove "$WIN" 0 0 || true
sleep "${SCREENSHOT_WAIT:-4}"
mkdir -p "$(dirname "$OUT")"
import -window "$WIN" "$OUT"
echo "wrote $OUT"
