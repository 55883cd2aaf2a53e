#!/usr/bin/env bash
# Builds the wasm core (release) and its JS glue (wasm-bindgen --target web), then
# puts the entry module facade/loopwright.js (+ .d.ts) in front of the glue, which is
# renamed loopwright_glue.js: importers keep using <out-dir>/loopwright.js.
# Usage: scripts/build-wasm.sh [out-dir]   (default www/pkg, for the page)
set -euo pipefail
cd "$(dirname "$0")/.."
out=${1:-www/pkg}
cargo rustc --quiet --lib --crate-type cdylib --release --target wasm32-unknown-unknown --features wasm
# The name and producers sections are debugging and telemetry only (about 70 KB of the
# release file). To profile sizes, run twiggy on the file wasm-bindgen reads, which
# keeps its names: target/wasm32-unknown-unknown/release/loopwright.wasm.
wasm-bindgen --target web --remove-name-section --remove-producers-section \
  --out-dir "$out" --out-name loopwright \
  target/wasm32-unknown-unknown/release/loopwright.wasm
mv "$out/loopwright.js" "$out/loopwright_glue.js"
mv "$out/loopwright.d.ts" "$out/loopwright_glue.d.ts"
cp facade/loopwright.js facade/loopwright.d.ts "$out/"
echo "build: $out/loopwright_bg.wasm $(wc -c < "$out/loopwright_bg.wasm") bytes," \
  "$(gzip -9 -c "$out/loopwright_bg.wasm" | wc -c) gzipped" >&2
