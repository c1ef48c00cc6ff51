#!/usr/bin/env bash
# The developer checks: formatting, clippy (pedantic, warnings as errors), all tests.
# CI (.ci/run) runs the same test command plus the QuTiP reference re-derivation.
set -euo pipefail
cd "$(dirname "$0")/.."
cargo fmt --all -- --check
cargo clippy --workspace --all-targets -- -D warnings
cargo test --workspace --all-targets
