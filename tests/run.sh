#!/usr/bin/env bash
# Runs every test: the Rust suites (unit, CLI, HTTP over loopback with a real SQLite file), core's
# unit tests in wasm32 with simd128 (Node), the cross-checks against numpy/scipy/galois/sympy,
# and the browser tests in headless Chromium.
# Installs what is missing first (tests/setup.sh). The last line is `N passed, N failed`.
set -uo pipefail
cd "$(dirname "$0")/.."
bash tests/setup.sh || { echo "setup failed"; echo "0 passed, 1 failed"; exit 1; }

passed=0
failed=0
step() {
  local name=$1; shift
  echo "==> $name"
  if "$@"; then passed=$((passed + 1)); echo "ok: $name"; else failed=$((failed + 1)); echo "FAILED: $name"; fi
}

# One release build serves every suite: the tests are mostly arithmetic on large matrices.
step "cargo test (workspace, release)" cargo test --workspace --release
step "core in wasm32 with simd128 (Node, WASI)" bash tests/wasm.sh
export HADAMARD_BIN="$PWD/target/release/hadamard"
if [ -d tests/python ]; then
  step "cross-checks (pytest: numpy, scipy, galois, sympy)" python3 -m pytest -q tests/python
fi
step "Python package (abi3 wheel in a fresh venv, pytest)" bash tests/python-package.sh
if [ -f tests/browser/run.mjs ]; then
  step "browser tests (headless Chromium)" node tests/browser/run.mjs
fi

echo "suites: $passed passed, $failed failed"
echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ]
