# Sagitta build and test entry points. `make test` installs what it needs.
SHELL := /bin/bash
GO ?= go
GOROOT_DIR := $(shell $(GO) env GOROOT)
WASM_EXEC := $(GOROOT_DIR)/lib/wasm/go_js_wasm_exec
BIN := bin
DEMO := $(BIN)/demo.jpg

.PHONY: all build test test-go test-wasm vet run bench deps tools clean demo

all: build

deps:
	$(GO) mod download

build: deps
	mkdir -p $(BIN)
	$(GO) build -o $(BIN)/sagitta ./core/cmd/sagitta

vet: deps
	$(GO) vet ./...
	@test -z "$$(gofmt -l core wasm site 2>/dev/null)" || { echo "gofmt needed:"; gofmt -l core wasm site; exit 1; }

# Debian tools the tests use as independent references (poppler's pdfinfo
# and pdftoppm read our PDFs). Installed when missing; tests that need them
# skip only when they cannot be had.
tools:
	@command -v pdftoppm >/dev/null 2>&1 || { (apt-get install -y poppler-utils >/dev/null 2>&1 || (apt-get update >/dev/null && apt-get install -y poppler-utils >/dev/null)) || echo "warning: poppler-utils could not be installed"; }

test-go: deps tools
	$(GO) test -count=1 ./...

# Core's tests compiled to WebAssembly and run under Node, so the browser
# build cannot silently diverge from the native one.
test-wasm: deps
	GOOS=js GOARCH=wasm $(GO) build -o /dev/null ./wasm
	GOOS=js GOARCH=wasm $(GO) test -count=1 -short -exec="$(WASM_EXEC)" ./core/...

test: vet test-go test-wasm

$(DEMO): build
	$(BIN)/sagitta demo -o $(DEMO)

demo: $(DEMO)

run: $(DEMO)
	$(BIN)/sagitta analyze $(DEMO)

bench: deps
	$(GO) test -run '^$$' -bench . -benchmem ./core/...

clean:
	rm -rf $(BIN) dist
