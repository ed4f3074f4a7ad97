# Sagitta build and test entry points. `make test` installs what it needs.
SHELL := /bin/bash
GO ?= go
GOROOT_DIR := $(shell $(GO) env GOROOT)
WASM_EXEC := $(GOROOT_DIR)/lib/wasm/go_js_wasm_exec
BIN := bin
DEMO := $(BIN)/demo.png

.PHONY: all build test test-go test-wasm vet run bench deps clean demo

all: build

deps:
	$(GO) mod download

build: deps
	mkdir -p $(BIN)
	$(GO) build -o $(BIN)/sagitta ./core/cmd/sagitta

vet: deps
	$(GO) vet ./...
	@test -z "$$(gofmt -l core wasm site 2>/dev/null)" || { echo "gofmt needed:"; gofmt -l core wasm site; exit 1; }

test-go: deps
	$(GO) test -count=1 ./...

# Core's tests compiled to WebAssembly and run under Node, so the browser
# build cannot silently diverge from the native one.
test-wasm: deps
	GOOS=js GOARCH=wasm $(GO) test -count=1 -short -exec="$(WASM_EXEC)" ./core/...

test: vet test-go test-wasm

$(DEMO): build
	$(BIN)/sagitta demo -o $(DEMO)

demo: $(DEMO)

run: $(DEMO)
	$(BIN)/sagitta analyze --pitch-um 6 $(DEMO)

bench: deps
	$(GO) test -run '^$$' -bench . -benchmem ./core/...

clean:
	rm -rf $(BIN) dist
