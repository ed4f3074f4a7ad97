# Sagitta build and test entry points. `make test` installs what it needs.
SHELL := /bin/bash
GO ?= go
GOROOT_DIR := $(shell $(GO) env GOROOT)
WASM_EXEC := $(GOROOT_DIR)/lib/wasm/go_js_wasm_exec
BIN := bin
WEB := $(BIN)/web
WASM := $(BIN)/sagitta.wasm
DEMO_WASM := $(BIN)/sagitta-demo.wasm
DIST := dist/sagitta.html
DEMO := $(BIN)/demo.jpg
TESTDIR := site/test
TESTOUT := $(BIN)/test
ADDR ?= 127.0.0.1:8080

.PHONY: all build test test-go test-wasm test-browser test-fuzz test-race mutants lint-js vet run bench bench-go deps tools clean demo wasm dist browser-deps FORCE

all: build

deps:
	$(GO) mod download

build: deps
	mkdir -p $(BIN)
	$(GO) build -o $(BIN)/sagitta ./core/cmd/sagitta

vet: deps
	$(GO) vet ./...
	GOOS=js GOARCH=wasm $(GO) vet ./wasm/...
	@test -z "$$(gofmt -l core wasm site 2>/dev/null)" || { echo "gofmt needed:"; gofmt -l core wasm site; exit 1; }

# Debian tools the tests use as independent references (poppler's pdfinfo
# and pdftoppm read our PDFs; libraw's unprocessed_raw and raw-identify read
# our DNGs; ImageMagick blurs and reduces an edge for core/edge's outside
# reference and decodes JPEG for core/decode/jpegdec, whose files with
# restart markers come from libjpeg-turbo-progs' cjpeg). Installed when missing; tests that need them skip only when
# they cannot be had.
tools:
	@command -v pdftoppm >/dev/null 2>&1 || { (apt-get install -y poppler-utils >/dev/null 2>&1 || (apt-get update >/dev/null && apt-get install -y poppler-utils >/dev/null)) || echo "warning: poppler-utils could not be installed"; }
	@command -v unprocessed_raw >/dev/null 2>&1 || { (apt-get install -y libraw-bin >/dev/null 2>&1 || (apt-get update >/dev/null && apt-get install -y libraw-bin >/dev/null)) || echo "warning: libraw-bin could not be installed"; }
	@command -v convert-im6.q16 >/dev/null 2>&1 || command -v magick >/dev/null 2>&1 || { (apt-get install -y imagemagick >/dev/null 2>&1 || (apt-get update >/dev/null && apt-get install -y imagemagick >/dev/null)) || echo "warning: imagemagick could not be installed"; }
	@command -v cjpeg >/dev/null 2>&1 || { (apt-get install -y libjpeg-turbo-progs >/dev/null 2>&1 || (apt-get update >/dev/null && apt-get install -y libjpeg-turbo-progs >/dev/null)) || echo "warning: libjpeg-turbo-progs could not be installed"; }

test-go: deps tools
	$(GO) test -count=1 ./...

# Core's tests compiled to WebAssembly and run under Node, so the browser
# build cannot silently diverge from the native one.
test-wasm: deps
	GOOS=js GOARCH=wasm $(GO) build -o /dev/null ./wasm
	GOOS=js GOARCH=wasm $(GO) build -o /dev/null ./wasm/demo
	@! GOOS=js GOARCH=wasm $(GO) list -deps ./wasm | grep -q '^sagitta/core/sim' || { echo "the measuring engine (wasm/) must not import the simulator (core/sim): the demo has its own build, wasm/demo"; exit 1; }
	GOOS=js GOARCH=wasm $(GO) test -count=1 -short -exec="$(WASM_EXEC)" ./core/... ./wasm

# A short fuzz run of every decoder (8 s each) and the race detector on the
# packages that run goroutines.
FUZZTIME ?= 8s
# Go's fuzzing engine can stop with a bare "context deadline exceeded" when
# -fuzztime runs out while it is still minimising a newly interesting input
# (no failing input is written then); .ci/fuzz.sh runs such a target again
# (up to twice) and fails on anything else.
test-fuzz: deps
	for t in FuzzDecode FuzzDecodePNG FuzzDecodeJPEG FuzzDecodeTIFF; do \
	  GO=$(GO) FUZZTIME=$(FUZZTIME) sh .ci/fuzz.sh ./core/decode "$$t" || exit 1; done
	GO=$(GO) FUZZTIME=$(FUZZTIME) sh .ci/fuzz.sh ./core/exif FuzzParse
	GO=$(GO) FUZZTIME=$(FUZZTIME) sh .ci/fuzz.sh ./core/raw FuzzDecode
	GO=$(GO) FUZZTIME=$(FUZZTIME) sh .ci/fuzz.sh ./core/decode/jpegdec FuzzDecode

# The goroutines live in core/decode (luminance rows, the fitted tone curve),
# core/internal/coarse (the reduced views' rows), core/analyze (edges
# and sine patterns measured in parallel) and core/sim/simcam (rendering);
# the selected tests drive each of them on small images.
test-race: deps
	$(GO) test -race -short -count=1 ./core/decode ./core/internal/coarse
	$(GO) test -race -short -count=1 -run 'TestStarOnlyPhoto|TestNoChart|TestChromaSubsampledJPEG' ./core/analyze
	$(GO) test -race -short -count=1 -run 'TestDeterministic|TestNoSeams|TestStarModulation|TestGratingInterior' ./core/sim/simcam

test: vet lint-js test-go test-wasm test-fuzz test-race test-browser

# Mutation check of the measurement code (not part of make test): each small
# change listed in core/internal/mutants/mutants.txt must make a test fail.
mutants: deps
	core/internal/mutants/run.sh

# The page's JavaScript: every script parses (node --check), and imports and
# exports between its modules agree, none unused (site/test/lint.mjs; plain
# Node, no packages).
lint-js:
	node $(TESTDIR)/lint.mjs site

# The page's engine: the core compiled to WebAssembly, wasm_exec.js from the
# same Go toolchain, the core as base64 of its gzip in a script and the
# worker's source in another (the page may not fetch; see site/engine.js).
# The demo photo's simulator is a WebAssembly of its own (wasm/demo), so the
# measuring engine does not carry it; the page loads it only for the demo.
wasm: $(WASM) $(DEMO_WASM) $(WEB)/wasm_exec.js $(WEB)/sagitta-wasm.js $(WEB)/sagitta-demo-wasm.js $(WEB)/sagitta-worker.js

$(WASM): FORCE
	mkdir -p $(BIN)
	GOOS=js GOARCH=wasm $(GO) build -trimpath -o $@.tmp ./wasm
	cmp -s $@.tmp $@ && rm $@.tmp || mv $@.tmp $@

$(DEMO_WASM): FORCE
	mkdir -p $(BIN)
	GOOS=js GOARCH=wasm $(GO) build -trimpath -o $@.tmp ./wasm/demo
	cmp -s $@.tmp $@ && rm $@.tmp || mv $@.tmp $@

$(WEB)/sagitta-demo-wasm.js: $(DEMO_WASM)
	mkdir -p $(WEB)
	{ echo '// Generated by make wasm: the demo photo (bin/sagitta-demo.wasm) as base64 of its gzip.'; \
	  printf 'self.sagittaDemoGzip = "'; gzip -9 -n -c $< | base64 -w0; printf '";\n'; } > $@
	@echo "demo: $$(stat -c %s $<) bytes raw, $$(gzip -9 -n -c $< | wc -c) bytes gzip"

$(WEB)/wasm_exec.js: $(GOROOT_DIR)/lib/wasm/wasm_exec.js
	mkdir -p $(WEB)
	cp $< $@

$(WEB)/sagitta-wasm.js: $(WASM)
	mkdir -p $(WEB)
	{ echo '// Generated by make wasm: the core (bin/sagitta.wasm) as base64 of its gzip.'; \
	  printf 'self.sagittaCoreGzip = "'; gzip -9 -n -c $< | base64 -w0; printf '";\n'; } > $@
	@echo "core: $$(stat -c %s $<) bytes raw, $$(gzip -9 -n -c $< | wc -c) bytes gzip"

$(WEB)/sagitta-worker.js: $(WEB)/wasm_exec.js site/worker.js
	$(GO) run ./site/pack -site site -wasm-exec $(WEB)/wasm_exec.js -worker-script $@

# One self-contained page that works opened from disk with no network.
dist: $(DIST)

$(DIST): wasm FORCE
	$(GO) run ./site/pack -site site -wasm $(WASM) -demo-wasm $(DEMO_WASM) -wasm-exec $(WEB)/wasm_exec.js -o $@

# Build the page and serve it on this machine only (ADDR=127.0.0.1:PORT to change).
run: wasm dist
	@echo "Sagitta's page (Ctrl-C to stop):"
	$(GO) run ./site/serve -addr $(ADDR) -site site -gen $(WEB) -dist dist

# Browser tests: Debian's Chromium and playwright-core (site/test/package-lock.json); ImageMagick
# makes the CMYK JPEG of the hostile-input test.
browser-deps:
	@test -x /usr/bin/chromium || { apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium; }
	@test -d $(TESTDIR)/node_modules/playwright-core || (cd $(TESTDIR) && npm ci --no-audit --no-fund)
	@test -x /usr/bin/convert || { DEBIAN_FRONTEND=noninteractive apt-get install -y -qq imagemagick >/dev/null 2>&1 || echo "warning: imagemagick could not be installed (the CMYK JPEG of load.test.mjs is skipped)"; }

test-browser: browser-deps build wasm dist
	mkdir -p $(TESTOUT)
	$(GO) build -o $(BIN)/serve ./site/serve
	$(GO) build -o $(BIN)/testphoto ./site/testphoto
	cd $(TESTDIR) && SAGITTA_ROOT=$(CURDIR) node --test --test-concurrency=1 *.test.mjs

$(DEMO): build
	$(BIN)/sagitta demo -o $(DEMO)

demo: $(DEMO)

# One markdown table: the native analysis per stage (time, bytes allocated,
# peak resident memory) of simulated 24 and 50 MP chart JPEGs (q95, with
# noise; rendered once into $TMPDIR/sagitta-bench), and the command-line
# tool's whole run on each (core/analyze/stages_bench_test.go); then the
# page's rows (site/test/bench.mjs: headless Chromium, drop -> first targets
# shown and drop -> result, 6, 24 and 50 MP, one worker and all of them, and
# the workers' memory). Times are printed, never asserted. BENCH_SIZES=24 for
# the 24 MP photos alone.
BENCH_SIZES ?= 24,50
bench: build
	@$(GO) test -run '^$$' -bench '^BenchmarkStageTable$$' -benchtime 1x -timeout 60m ./core/analyze \
	  -args -sizes $(BENCH_SIZES) -cli $(CURDIR)/$(BIN)/sagitta | grep '^|'
	@$(MAKE) -s browser-deps wasm dist >/dev/null && $(GO) build -o $(BIN)/serve ./site/serve && $(GO) build -o $(BIN)/testphoto ./site/testphoto
	@cd $(TESTDIR) && SAGITTA_ROOT=$(CURDIR) SAGITTA_BENCH_MP=6,$(BENCH_SIZES) node bench.mjs 2>/dev/null

# Every Go benchmark of the core.
bench-go: deps
	$(GO) test -run '^$$' -bench . -benchmem ./core/...

clean:
	rm -rf $(BIN) dist $(TESTDIR)/out
