#!/usr/bin/env bash
# Runs every test suite: the Rust engine and command line (`cargo test
# --release`), the designer page in headless Chromium (tests/browser), then
# the Python package, built with pip into a fresh virtual environment
# (target/python-venv) and tested with pytest.
#
# Needs the Rust toolchain, Python >= 3.10 with venv, Node.js and Debian's
# chromium (/usr/bin/chromium); Python packages come from PyPI as listed in
# python/pyproject.toml (the `test` extra), playwright-core from npm.
set -euo pipefail
cd "$(dirname "$0")"
PYTHON="${PYTHON:-python3}"
VENV="target/python-venv"

cargo test --release
# The binary the Python and browser tests compare against.
cargo build --release --bin lamella

# The designer page (`lamella serve`) end to end in headless Chromium.
if [ ! -d tests/browser/node_modules/playwright-core ]; then
  (cd tests/browser && npm ci --no-audit --no-fund)
fi
(cd tests/browser && node serve.test.mjs)

rm -rf "$VENV"
"$PYTHON" -m venv "$VENV"
"$VENV/bin/python" -m pip install --quiet --upgrade pip
# `pip install ./python` builds the package with maturin (its PEP 517 backend).
"$VENV/bin/python" -m pip install --quiet "./python[test]"
cd python/tests
"../../$VENV/bin/python" -m pytest -q -p no:cacheprovider "$@"
