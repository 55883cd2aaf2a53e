# loopwright: `make serve` builds and serves the page; `make test` runs every test.
# Both install what is missing first (scripts/setup.sh).

SHELL := /bin/bash
PORT ?= 8080
PY := $(or $(LOOPWRIGHT_VENV),$(HOME)/.cache/loopwright/venv)/bin/python
export CARGO_TERM_COLOR := never

.PHONY: serve test lint bench bench-quick bench-compare setup setup-page build single package test-native test-fuzz test-reference test-browser test-page test-package test-sheetfiles

serve: setup-page build
	node scripts/serve.mjs www $(PORT)

setup-page:
	LOOPWRIGHT_NEED_BROWSERS=0 ./scripts/setup.sh

setup:
	./scripts/setup.sh

build:
	./scripts/build-wasm.sh

single: build
	node scripts/build-single.mjs

package:
	./scripts/build-package.sh

test: setup lint test-native test-sheetfiles test-fuzz test-reference test-browser single package bench-quick test-page test-package
	@echo "make test: all suites passed"

# Gates: the committed formatting (rustfmt.toml, biome.json) and lints with warnings denied.
lint:
	cargo fmt --check
	cargo clippy --all-targets --features wasm -- -D warnings
	tests/js/node_modules/.bin/biome check .

test-native:
	cargo build --no-default-features
	cargo test
	# The boundary's unit tests that need no JS engine (src/wasm/: the result walk,
	# the options reader's pure parts), natively.
	cargo test --features wasm --lib wasm::
	cargo test --bench core

# The worksheet as .ods/.xlsx files (feature sheetfiles): its lints, unit and doc
# tests, round trips and malformed files (tests/sheet_files.rs), and every exported
# value recomputed by LibreOffice Calc (tests/sheet_files_engine.rs; soffice from setup.sh).
test-sheetfiles:
	cargo clippy --all-targets --features wasm,sheetfiles -- -D warnings
	cargo clippy --features wasm-sheetfiles -- -D warnings
	cargo test --features sheetfiles --lib sheet::files
	cargo test --features sheetfiles --doc sheet::files
	LOOPWRIGHT_REQUIRE_SOFFICE=1 cargo test --features sheetfiles --test sheet_files --test sheet_files_engine

# The worksheet's formula fuzz target (fuzz/fuzz_targets/formula.rs, nightly + cargo-fuzz)
# for FUZZ_SECONDS, from the committed seeds in fuzz/corpus/formula; what it finds on
# the way goes to a scratch corpus, so the committed one stays as it is. A long run:
#   make test-fuzz FUZZ_SECONDS=3600
FUZZ_SECONDS ?= 60
# Then the spreads reader's target (fuzz/fuzz_targets/spread.rs) from fuzz/corpus/spread.
FUZZ_SPREAD_SECONDS ?= 20
test-fuzz:
	scratch=$$(mktemp -d) && \
	cargo +nightly fuzz run formula "$$scratch" fuzz/corpus/formula -- \
	  -max_total_time=$(FUZZ_SECONDS) -timeout=10 -rss_limit_mb=2048 -print_final_stats=1; \
	status=$$?; rm -rf "$$scratch"; [ $$status -eq 0 ] || exit $$status; \
	scratch=$$(mktemp -d) && \
	cargo +nightly fuzz run spread "$$scratch" fuzz/corpus/spread -- \
	  -max_total_time=$(FUZZ_SPREAD_SECONDS) -timeout=10 -rss_limit_mb=2048 -print_final_stats=1; \
	status=$$?; rm -rf "$$scratch"; exit $$status

test-reference:
	@for script in tests/reference/*.py; do $(PY) $$script --check || exit 1; done

test-browser: export WASM_BINDGEN_TEST_TIMEOUT = 300
test-browser:
	CHROMEDRIVER=/usr/bin/chromedriver cargo test --target wasm32-unknown-unknown --features wasm --test 'wasm_*'
	GECKODRIVER=$$(command -v geckodriver) cargo test --target wasm32-unknown-unknown --features wasm --test 'wasm_*'

test-page:
	cd tests/js && GECKODRIVER=$$(command -v geckodriver) node --test format.test.mjs page.test.mjs page-fixes.test.mjs page-choose.test.mjs loader.test.mjs sheet.test.mjs sheetfiles.test.mjs stage-view.test.mjs stage-fixes.test.mjs firefox.test.mjs

# package.test.mjs: the packed package as a user installs it; hostile.test.mjs: the
# hostile-call campaign over every export (LOOPWRIGHT_HOSTILE_LONG=1 for the long run).
test-package:
	cd tests/js && node --test package.test.mjs batch.test.mjs paste.test.mjs hostile.test.mjs

bench: setup single package
	cargo bench --bench core
	node bench/run.mjs

bench-quick:
	node bench/run.mjs --quick

# Every bench case of another checkout (BASE, its package built with `make package`)
# beside this one's, interleaved in one run: bench/COMPARE.md. E.g. main at d3ae4e5:
#   git worktree add /tmp/orig d3ae4e5 && make -C /tmp/orig package && make bench-compare
BASE ?= /tmp/orig
RUNS ?= 5
bench-compare: package
	node bench/compare.mjs $(BASE) --runs $(RUNS) --out bench/COMPARE.md
