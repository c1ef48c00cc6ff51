#!/usr/bin/env bash
# The Python package's tests: build and install crates/python in a fresh virtual
# environment (pip runs maturin, the pyproject's build backend, fetched from PyPI),
# then run its pytest suite. Called at the end of .ci/run.
set -euo pipefail
cd "$(dirname "$0")/.."

venv=target/python-tests-venv
rm -rf "$venv"
python3 -m venv "$venv"
"$venv/bin/pip" install --quiet --upgrade pip
"$venv/bin/pip" install --quiet ./crates/python pytest numpy
"$venv/bin/python" -m pytest -q crates/python/tests
