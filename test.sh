#!/usr/bin/env bash
# Runs every test suite: the Rust engine and command line (`cargo test
# --release`), then the Python package, built with pip into a fresh virtual
# environment (target/python-venv) and tested with pytest.
#
# Needs the Rust toolchain and Python >= 3.10 with venv; Python packages come
# from PyPI as listed in python/pyproject.toml (the `test` extra).
set -euo pipefail
cd "$(dirname "$0")"
PYTHON="${PYTHON:-python3}"
VENV="target/python-venv"

cargo test --release
# The binary the Python tests compare against.
cargo build --release --bin lamella

rm -rf "$VENV"
"$PYTHON" -m venv "$VENV"
"$VENV/bin/python" -m pip install --quiet --upgrade pip
# `pip install ./python` builds the package with maturin (its PEP 517 backend).
"$VENV/bin/python" -m pip install --quiet "./python[test]"
cd python/tests
"../../$VENV/bin/python" -m pytest -q -p no:cacheprovider "$@"
