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

# A one-node Slurm cluster for tests/slurm/run.sh: munge, slurmctld, slurmd and the clients
# (iproute2 for its network namespace). The test starts its own daemons with its own
# configuration, so the packages' services must not start: a policy-rc.d that says no is put in
# place for the install when the machine has none.
if ! command -v munged >/dev/null 2>&1 || ! command -v slurmctld >/dev/null 2>&1 \
  || ! command -v slurmd >/dev/null 2>&1 || ! command -v sbatch >/dev/null 2>&1 \
  || ! command -v ip >/dev/null 2>&1; then
  policy=
  if [ ! -e /usr/sbin/policy-rc.d ]; then
    printf '#!/bin/sh\nexit 101\n' > /usr/sbin/policy-rc.d
    chmod 755 /usr/sbin/policy-rc.d
    policy=1
  fi
  apt-get update -qq
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends \
    munge slurmctld slurmd slurm-client iproute2
  if [ -n "$policy" ]; then rm -f /usr/sbin/policy-rc.d; fi
fi

# kubernetes-validate (with the Kubernetes API schemas inside) for the Kubernetes recipe's test.
if ! python3 -c 'import kubernetes_validate, yaml' >/dev/null 2>&1; then
  python3 -m pip install -q --disable-pip-version-check kubernetes-validate pyyaml
fi
