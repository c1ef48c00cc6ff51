#!/usr/bin/env bash
# Takes assets/design_page.png: the "Design & hardware" page on the built-in demo (or
# a study), with playback and the robustness map computed, in a virtual X display.
# Needs the tools of scripts/screenshot.sh and the page's example launcher in release:
#   cargo build --release -p quenchless-app --example design_page
# Usage: scripts/screenshot_design.sh [study.ron] [out.png]
set -euo pipefail
cd "$(dirname "$0")/.."
BIN=./target/release/examples/design_page
[ -x "$BIN" ] || { echo "screenshot_design.sh: build first: cargo build --release -p quenchless-app --example design_page" >&2; exit 1; }
# The robustness map runs on a worker; give it time on a slow machine.
SCREENSHOT_APP="$BIN ${1:-}" SCREENSHOT_WAIT="${SCREENSHOT_WAIT:-12}" SCREENSHOT_DISPLAY="${SCREENSHOT_DISPLAY:-:98}" \
    exec scripts/screenshot.sh "${1:-sample_profiles/tweezer_expansion.ron}" "${2:-assets/design_page.png}"
