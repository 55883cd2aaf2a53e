#!/usr/bin/env bash
# Builds the wasm core (release) and its JS glue (wasm-bindgen --target web).
# Usage: scripts/build-wasm.sh [out-dir]   (default www/pkg, for the page)
set -euo pipefail
cd "$(dirname "$0")/.."
out=${1:-www/pkg}
cargo rustc --quiet --lib --crate-type cdylib --release --target wasm32-unknown-unknown --features wasm
wasm-bindgen --target web --out-dir "$out" --out-name loopwright \
  target/wasm32-unknown-unknown/release/loopwright.wasm
echo "build: $out/loopwright_bg.wasm $(wc -c < "$out/loopwright_bg.wasm") bytes" >&2
