#!/usr/bin/env bash
# Takes the README screenshots of all four pages: assets/page_shape.png,
# assets/page_compare.png, assets/page_cycle.png (with its power map computed) and
# assets/design_page.png (playback and robustness map computed), in a virtual X display.
# Needs the tools of scripts/screenshot.sh and the page launcher in release:
#   cargo build --release -p quenchless-app --example design_page
# Usage: scripts/screenshot_pages.sh [study.ron]
set -euo pipefail
cd "$(dirname "$0")/.."
BIN=./target/release/examples/design_page
[ -x "$BIN" ] || { echo "screenshot_pages.sh: build first: cargo build --release -p quenchless-app --example design_page" >&2; exit 1; }
STUDY=${1:-sample_profiles/tweezer_expansion.ron}
for page in shape compare cycle design; do
    out=assets/page_$page.png
    [ "$page" = design ] && out=assets/design_page.png
    wait=4
    [ "$page" = cycle ] || [ "$page" = design ] && wait=12
    SCREENSHOT_APP="$BIN $STUDY $page" SCREENSHOT_WAIT="${SCREENSHOT_WAIT:-$wait}" \
        SCREENSHOT_DISPLAY="${SCREENSHOT_DISPLAY:-:97}" scripts/screenshot.sh "$STUDY" "$out"
done
