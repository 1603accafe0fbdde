#!/usr/bin/env bash
# Installs what a fresh machine lacks for the test suite; each step is skipped when already done.
# Idempotent, and safe to run on every test run.
set -euo pipefail
cd "$(dirname "$0")/.."

# The wasm32 target for the browser app (server/build.rs also installs it when missing).
if ! rustup target list --installed 2>/dev/null | grep -qx wasm32-unknown-unknown; then
  rustup target add wasm32-unknown-unknown
fi
# wasm32-wasip1, to run core's unit tests in Node's V8 with simd128 (tests/wasm.sh).
if ! rustup target list --installed 2>/dev/null | grep -qx wasm32-wasip1; then
  rustup target add wasm32-wasip1
fi

# Debian's Chromium for the browser tests.
if ! command -v chromium >/dev/null 2>&1; then
  apt-get update -qq
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends chromium chromium-driver
fi

# The outside references the cross-checks use: numpy, scipy, galois, sympy (and pytest to run them).
if ! python3 -c 'import numpy, scipy, galois, sympy, pytest' >/dev/null 2>&1; then
  python3 -m pip install -q --disable-pip-version-check numpy scipy galois sympy pytest
fi

# venv with pip, for the Python package's fresh virtual environment (tests/python-package.sh).
if ! python3 -c 'import venv, ensurepip' >/dev/null 2>&1; then
  apt-get update -qq
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends python3-venv
fi

# playwright-core (no browser download) for the browser tests.
if [ -f tests/browser/package-lock.json ] && [ ! -d tests/browser/node_modules/playwright-core ]; then
  (cd tests/browser && npm ci --no-audit --no-fund --loglevel=error)
fi
