#!/usr/bin/env bash
# Builds the two wasm modules (release) and their JS glue (wasm-bindgen --target web):
#   <out-dir>/       the full module (feature `wasm`): every area, the circuit solver
#                    and the worksheet; used by the page and the package's main entry;
#   <out-dir>/sheetfiles/  the spreadsheet-file module (feature `wasm-sheetfiles`):
#                    .ods/.xlsx export and import, entry facade/sheetfiles.js; loaded
#                    by the page only when a file is exported or imported;
#   <out-dir>/lite/  the lite module (feature `wasm-lite`): feedback, frequency and
#                    stability, network, distortion, noise; used by the embeddable
#                    panel and the package's `loopwright/lite` entry.
# In each, the entry module is put in front of the glue, which is renamed
# loopwright_glue.js: importers keep using loopwright.js. The full module's entry is
# facade/loopwright.js (which re-exports facade/lite.js); the lite module's entry is
# facade/lite.js itself; both use facade/guard.js. The glue's declarations get their
# parameter names in camelCase (wasm-bindgen writes the Rust names).
# Usage: scripts/build-wasm.sh [out-dir]   (default www/pkg, for the page)
set -euo pipefail
cd "$(dirname "$0")/.."
out=${1:-www/pkg}

# build <features> <cargo target dir> <out dir> <full|lite|sheetfiles> [cargo args…]
build() {
  cargo rustc --quiet --lib --crate-type cdylib --release --target wasm32-unknown-unknown \
    --features "$1" --target-dir "$2" "${@:5}"
  # The name and producers sections are debugging and telemetry only (about 70 KB of
  # the release file). To profile sizes, run twiggy on the file wasm-bindgen reads,
  # which keeps its names: <target dir>/wasm32-unknown-unknown/release/loopwright.wasm.
  wasm-bindgen --target web --remove-name-section --remove-producers-section \
    --out-dir "$3" --out-name loopwright \
    "$2/wasm32-unknown-unknown/release/loopwright.wasm"
  mv "$3/loopwright.js" "$3/loopwright_glue.js"
  # snake_case parameter names (`target_gain: number`) → camelCase (`targetGain: number`).
  perl -pe 's/([(,] ?)([a-z][a-z0-9]*(?:_[a-z0-9]+)+)(\??: )/$1 . camel($2) . $3/ge;
    sub camel { my $n = shift; $n =~ s{_([a-z0-9])}{\u$1}g; return $n }' \
    "$3/loopwright.d.ts" > "$3/loopwright_glue.d.ts"
  rm "$3/loopwright.d.ts"
  cp facade/guard.js "$3/"
  if [ "$4" = full ]; then
    cp facade/loopwright.js facade/loopwright.d.ts facade/lite.js facade/lite.d.ts "$3/"
  elif [ "$4" = sheetfiles ]; then
    cp facade/sheetfiles.js "$3/loopwright.js"
    cp facade/sheetfiles.d.ts "$3/loopwright.d.ts"
  else
    cp facade/lite.js "$3/loopwright.js"
    cp facade/lite.d.ts "$3/loopwright.d.ts"
  fi
  echo "build: $3/loopwright_bg.wasm $(wc -c < "$3/loopwright_bg.wasm") bytes," \
    "$(gzip -9 -c "$3/loopwright_bg.wasm" | wc -c) gzipped" >&2
}

build wasm target "$out" full
# A target dir of its own, so the two feature sets do not rebuild each other.
# The lite module is the page's first download: loopwright itself at opt-level "s"
# there (its dependencies as in Cargo.toml), the hot loops kept fast by `#[inline]`
# on their helpers; docs/wasm-size.md has the sizes and the speed against "3".
build wasm-lite target/lite "$out/lite" lite \
  --config 'profile.release.package.loopwright.opt-level="s"'
# The spreadsheet files (.ods, .xlsx): loaded by the page only on export or import.
build wasm-sheetfiles target/sheetfiles "$out/sheetfiles" sheetfiles
