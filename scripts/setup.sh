#!/usr/bin/env bash
# Installs what building and testing loopwright needs and is missing on a fresh
# Debian machine with rustup and Node: the wasm32 target, the wasm-bindgen CLI at
# the exact version the crate pins, Chromium + chromedriver and Firefox ESR
# (Debian packages), LibreOffice Calc without GUI (Debian, for the spreadsheet-file
# tests), geckodriver (crates.io), cargo-fuzz (crates.io, for the nightly
# fuzz run) and the npm packages of the tests.
# Safe to run again: every step checks first.
set -euo pipefail
cd "$(dirname "$0")/.."

WASM_BINDGEN_VERSION=$(sed -n 's/^wasm-bindgen = { version = "=\([0-9.]*\)".*/\1/p' Cargo.toml)
[ -n "$WASM_BINDGEN_VERSION" ] || { echo "setup: cannot read the pinned wasm-bindgen version from Cargo.toml" >&2; exit 1; }
need_browsers=${LOOPWRIGHT_NEED_BROWSERS:-1}

say() { echo "setup: $*" >&2; }

if ! rustup target list --installed | grep -qx wasm32-unknown-unknown; then
  say "adding the wasm32-unknown-unknown target"
  rustup target add wasm32-unknown-unknown
fi

if ! wasm-bindgen --version 2>/dev/null | grep -q " $WASM_BINDGEN_VERSION\$"; then
  say "installing wasm-bindgen-cli $WASM_BINDGEN_VERSION (about 3 minutes)"
  cargo install wasm-bindgen-cli --version "$WASM_BINDGEN_VERSION" --force
fi

if [ "$need_browsers" = 1 ]; then
  missing=()
  [ -x /usr/bin/chromium ] || missing+=(chromium)
  [ -x /usr/bin/chromedriver ] || missing+=(chromium-driver)
  command -v firefox-esr >/dev/null 2>&1 || missing+=(firefox-esr)
  if [ ${#missing[@]} -gt 0 ]; then
    SUDO=""; [ "$(id -u)" = 0 ] || SUDO=sudo
    say "installing Debian packages: ${missing[*]}"
    $SUDO apt-get update -qq
    DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq "${missing[@]}" >/dev/null
  fi
  if ! command -v geckodriver >/dev/null 2>&1; then
    say "installing geckodriver from crates.io (about 2 minutes)"
    cargo install geckodriver
  fi
fi

# The spreadsheet engine that `make test-sheetfiles` opens the exported .ods and .xlsx
# files in (LibreOffice Calc without its GUI; Debian package, installed as root).
if [ "${LOOPWRIGHT_NEED_SHEETFILES:-$need_browsers}" = 1 ] && ! command -v soffice >/dev/null 2>&1; then
  SUDO=""; [ "$(id -u)" = 0 ] || SUDO=sudo
  say "installing Debian package libreoffice-calc-nogui (the spreadsheet-file tests; about 2 minutes)"
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq libreoffice-calc-nogui >/dev/null
fi

# The fuzz run of make test: a nightly toolchain (in the machine image) and cargo-fuzz.
CARGO_FUZZ_VERSION=0.13.2
if [ "${LOOPWRIGHT_NEED_FUZZ:-$need_browsers}" = 1 ]; then
  if ! rustup toolchain list | grep -q '^nightly'; then
    say "installing the nightly toolchain (the fuzz run of make test needs it)"
    rustup toolchain install nightly --profile minimal
  fi
  if ! cargo fuzz --version 2>/dev/null | grep -q " $CARGO_FUZZ_VERSION\$"; then
    say "installing cargo-fuzz $CARGO_FUZZ_VERSION from crates.io (about 2 minutes)"
    cargo install cargo-fuzz --version "$CARGO_FUZZ_VERSION" --locked
  fi
fi

VENV=${LOOPWRIGHT_VENV:-$HOME/.cache/loopwright/venv}
if [ "${LOOPWRIGHT_NEED_REFERENCE:-$need_browsers}" = 1 ] && \
   ! "$VENV/bin/python" -c "import sympy, numpy, scipy, control, eseries, mpmath, pypdf" >/dev/null 2>&1; then
  say "creating the reference-oracle venv in $VENV (sympy, numpy, scipy, control, eseries, mpmath; pypdf reads the printed report's text)"
  python3 -m venv "$VENV"
  "$VENV/bin/pip" install --quiet --disable-pip-version-check -r tests/reference/requirements.txt
fi

# npm packages of the JS tests and build tools; reinstalled when the lock file changes.
if ! cmp -s tests/js/package-lock.json tests/js/node_modules/.loopwright-lock 2>/dev/null; then
  say "installing the npm packages of tests/js (playwright-core, esbuild, typescript)"
  (cd tests/js && npm ci --no-audit --no-fund --loglevel=error && cp package-lock.json node_modules/.loopwright-lock)
fi
say "done"
