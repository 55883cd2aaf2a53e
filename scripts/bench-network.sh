#!/usr/bin/env bash
# Benchmark of the network area in WebAssembly under Node, beside numpy doing the
# same Monte Carlo vectorised (the issue's figures: 1 000 000 trials of the
# closed-loop gain in under 50 ms; the E192 best-pair search over three decades in
# under 2 ms). A benchmark, not a timed test: it prints, it does not fail on speed.
# Usage: scripts/bench-network.sh   (builds the release wasm once, about a minute)
set -euo pipefail
cd "$(dirname "$0")/.."
out=target/bench-network
cargo rustc --quiet --lib --crate-type cdylib --release --target wasm32-unknown-unknown --features wasm
wasm-bindgen --target nodejs --out-dir "$out" --out-name loopwright \
  target/wasm32-unknown-unknown/release/loopwright.wasm
node bench/network.mjs "$out/loopwright.js"
PY=${PY:-$HOME/.cache/loopwright/venv/bin/python}
"$PY" bench/network_numpy.py
