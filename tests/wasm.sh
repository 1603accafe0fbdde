#!/usr/bin/env bash
# core's unit tests compiled for wasm32 with simd128, as the browser app is built, and run in
# Node's V8 through WASI: the simd128 kernel is compared with the scalar tile there
# (verify::tests), and every other core test runs on wasm32 too.
set -euo pipefail
cd "$(dirname "$0")/.."
if ! rustup target list --installed 2>/dev/null | grep -qx wasm32-wasip1; then
  rustup target add wasm32-wasip1
fi
export CARGO_TARGET_WASM32_WASIP1_RUNNER="node --no-warnings $PWD/tests/wasm/run-wasi.mjs"
# `tests/wasm.sh bench`: the verify benchmark instead, the scalar and simd128 kernels side by side.
if [ "${1:-}" = bench ]; then
  shift
  CARGO_ENCODED_RUSTFLAGS="-Ctarget-feature=+simd128" \
    exec cargo bench -p hadamard-core --target wasm32-wasip1 --bench verify -- "$@"
fi
# FIXME: field::tests::the_largest_field_builds passes under WASI, then Node 20 dies of a
# segmentation fault before the module returns (with any tier: --liftoff-only, --no-liftoff);
# skipped here until that is understood. It runs natively with the rest.
CARGO_ENCODED_RUSTFLAGS="-Ctarget-feature=+simd128" \
  cargo test --release -p hadamard-core --target wasm32-wasip1 --lib -- --skip the_largest_field_builds "$@"
