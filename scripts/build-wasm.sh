#!/usr/bin/env bash
# Builds the wasm core (release) and its JS glue into www/pkg for the page.
set -euo pipefail
cd "$(dirname "$0")/.."
cargo rustc --quiet --lib --crate-type cdylib --release --target wasm32-unknown-unknown --features wasm
wasm-bindgen --target web --out-dir www/pkg --out-name loopwright \
  target/wasm32-unknown-unknown/release/loopwright.wasm
echo "build: www/pkg/loopwright_bg.wasm $(wc -c < www/pkg/loopwright_bg.wasm) bytes" >&2
