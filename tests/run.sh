#!/usr/bin/env bash
# Runs every test: the gate (formatting, clippy, the benches build), the Rust suites (unit, CLI,
# HTTP over loopback with a real SQLite file), core's unit tests in wasm32 with simd128 (Node),
# the cross-checks against numpy/scipy/galois/sympy, and the browser tests in headless Chromium.
# Installs what is missing first (tests/setup.sh).
#
# The count is of tests, not suites: each suite's own runner says how many of its tests passed
# and failed, and those are added up. A suite whose runner fails without reporting a failed test
# (a build error, a crash, a missing file) counts as one failed test. If the build fails, the
# suites that need the binary are not run against a stale one: each counts as failed. The last
# line reads `N passed, N failed`.
set -uo pipefail
cd "$(dirname "$0")/.."
logs=$(mktemp -d)
trap 'rm -rf "$logs"' EXIT

passed=0
failed=0
broken=()

# Adds the counts a runner printed in LOG (cargo's `test result:` lines, pytest's summary, or a
# closing `N passed, N failed` line); prints "P F".
counts() {
  python3 - "$1" <<'PY'
import re, sys
text = open(sys.argv[1], encoding="utf-8", errors="replace").read()
text = re.sub(r"\x1b\[[0-9;]*m", "", text)
p = f = 0
cargo = re.findall(r"^test result: \w+\. (\d+) passed; (\d+) failed", text, re.M)
if cargo:
    p = sum(int(a) for a, _ in cargo); f = sum(int(b) for _, b in cargo)
else:
    lines = [l for l in text.splitlines() if re.search(r"\d+ (passed|failed)", l)]
    if lines:
        last = lines[-1]
        m = re.search(r"(\d+) passed", last); p = int(m.group(1)) if m else 0
        m = re.search(r"(\d+) failed", last); f = int(m.group(1)) if m else 0
        m = re.search(r"(\d+) errors?\b", last); f += int(m.group(1)) if m else 0
print(p, f)
PY
}

# suite NAME CMD...: runs CMD, shows its output, adds its tests to the totals.
suite() {
  local name=$1; shift
  local log="$logs/$(echo "$name" | tr -c 'a-zA-Z0-9' '_').log"
  echo "==> $name"
  "$@" 2>&1 | tee "$log"
  local rc=${PIPESTATUS[0]}
  read -r p f < <(counts "$log")
  if [ "$rc" -ne 0 ] && [ "$f" -eq 0 ]; then f=1; fi
  passed=$((passed + p)); failed=$((failed + f))
  if [ "$rc" -ne 0 ]; then broken+=("$name"); echo "FAILED: $name ($p passed, $f failed)"; else echo "ok: $name ($p passed)"; fi
  return "$rc"
}

# check NAME CMD...: one pass/fail test (the gate's checks).
check() {
  local name=$1; shift
  echo "==> $name"
  if "$@"; then passed=$((passed + 1)); echo "ok: $name"; else failed=$((failed + 1)); broken+=("$name"); echo "FAILED: $name"; return 1; fi
}

# skip NAME WHY: a suite that could not run counts as failed, with the reason.
skip() { failed=$((failed + 1)); broken+=("$1 ($2)"); echo "FAILED: $1: $2"; }

if ! bash tests/setup.sh; then
  echo "setup failed"; echo "0 passed, 1 failed"; exit 1
fi

# The gate.
check "cargo fmt --check" cargo fmt --all --check
check "cargo clippy -D warnings (workspace, all targets)" \
  env SKIP_WEB_BUILD=1 cargo clippy --workspace --all-targets --release --quiet -- -D warnings

# One release build serves every suite: the tests are mostly arithmetic on large matrices.
if check "build (workspace, tests and benches, release)" \
  sh -c 'cargo build --workspace --release --all-targets --quiet'; then
  built=1
else
  built=0
fi

if [ "$built" -eq 1 ]; then
  suite "cargo test (workspace, release)" cargo test --workspace --release
  suite "core in wasm32 with simd128 (Node, WASI)" bash tests/wasm.sh
  export HADAMARD_BIN="$PWD/target/release/hadamard"
  for need in tests/python/conftest.py tests/browser/run.mjs; do
    [ -f "$need" ] || skip "$need" "the suite's file is missing"
  done
  [ -f tests/python/conftest.py ] &&
    suite "cross-checks (pytest: numpy, scipy, galois, sympy)" python3 -m pytest -q tests/python
  suite "Python package (abi3 wheel in a fresh venv, pytest)" bash tests/python-package.sh
  suite "Slurm: sharded searches on a one-node cluster" bash tests/slurm/run.sh
  [ -f tests/browser/run.mjs ] &&
    suite "browser tests (headless Chromium)" node tests/browser/run.mjs
else
  for s in "cargo test" "core in wasm32" "cross-checks (pytest)" "Python package" "Slurm" "browser tests"; do
    skip "$s" "not run: the build failed, and the binary would be stale"
  done
fi

if [ "${#broken[@]}" -gt 0 ]; then
  echo "failed suites and checks:"; printf '  %s\n' "${broken[@]}"
fi
echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ]
