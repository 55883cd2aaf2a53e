#!/usr/bin/env bash
# Builds the npm package into pkg/ from pkg-config/ and the release wasm, then packs
# a tarball pkg/loopwright-<version>.tgz with `npm pack`.
set -euo pipefail
cd "$(dirname "$0")/.."
version=$(sed -n 's/^version = "\(.*\)"/\1/p' Cargo.toml | head -n 1)
rm -rf pkg && mkdir -p pkg/web pkg/bin
./scripts/build-wasm.sh pkg/web
# pkg/web/sheetfiles/ (the spreadsheet-file module) is the `loopwright/sheetfiles` entry.
sed "s/@VERSION@/$version/" pkg-config/package.json.in > pkg/package.json
cp pkg-config/node.mjs pkg-config/lite.mjs pkg-config/sheetfiles.mjs pkg-config/README.md pkg-config/CHANGELOG.md pkg/
cp pkg-config/bin/loopwright-batch.mjs pkg/bin/
(cd pkg && npm pack --silent >/dev/null)
echo "package: pkg/loopwright-$version.tgz" >&2
