#!/usr/bin/env bash
# Builds the Python package (python/) into an abi3 wheel with maturin from PyPI, in a fresh
# virtual environment, installs the wheel there and runs the package's tests (pytest, with the
# docstring examples). pip's own cache makes the installs after the first one local.
# HADAMARD_BIN, when set (tests/run.sh sets it), lets the tests compare with the CLI's --json.
set -euo pipefail
cd "$(dirname "$0")/.."
root=$PWD
venv=$root/target/python-package/venv
wheels=$root/target/python-package/wheels

python3 -m venv --clear "$venv"
"$venv/bin/python" -m pip install -q --disable-pip-version-check "maturin>=1.9,<2" numpy scipy pytest
rm -rf "$wheels"
# The root target directory: the wheel reuses the dependencies the workspace build compiled.
CARGO_TARGET_DIR=$root/target "$venv/bin/maturin" build --release -q -m python/Cargo.toml -o "$wheels"
"$venv/bin/python" -m pip install -q --disable-pip-version-check --no-deps "$wheels"/hadamard_registry-*.whl
# From the tests folder, so `hadamard_registry` is the installed wheel, not the source folder.
cd python/tests
"$venv/bin/python" -m pytest -q -c ../pytest.ini --rootdir . .
