//go:build js && wasm

package main

import (
	"os"
	"regexp"
	"slices"
	"strings"
	"testing"
)

// TestFunctionsMatchPage checks the page's side of the protocol against the
// lists of core functions (functions.go, and wasm/demo's): the names protocol.js declares
// in CALLS and the adapters worker.js keeps in its CALLS table are exactly
// the list's call names, and worker.js names no core global of its own.
func TestFunctionsMatchPage(t *testing.T) {
	var want []string
	globals := map[string]bool{}
	for _, f := range functions {
		if globals[f.Global] {
			t.Errorf("%s listed twice", f.Global)
		}
		globals[f.Global] = true
		if f.Call != "" {
			want = append(want, f.Call)
		}
	}
	// The demo photo's build (wasm/demo) has its own list, in the same
	// shape; its calls reach the same worker.js.
	for _, m := range regexp.MustCompile(`\{"(sagitta[A-Za-z]+)", "([a-z]+)", [A-Za-z]+\}`).FindAllStringSubmatch(read(t, "demo/main.go"), -1) {
		if globals[m[1]] {
			t.Errorf("%s is in both builds", m[1])
		}
		want = append(want, m[2])
	}
	if !slices.Contains(want, "demo") {
		t.Error("wasm/demo/main.go lists no call \"demo\"")
	}
	slices.Sort(want)

	protocol := read(t, "../site/protocol.js")
	m := regexp.MustCompile(`export const CALLS = Object\.freeze\(\[([^\]]*)\]\)`).FindStringSubmatch(protocol)
	if m == nil {
		t.Fatal("site/protocol.js declares no CALLS = Object.freeze([...])")
	}
	var declared []string
	for _, q := range regexp.MustCompile(`'([a-z]+)'`).FindAllStringSubmatch(m[1], -1) {
		declared = append(declared, q[1])
	}
	slices.Sort(declared)
	if !slices.Equal(declared, want) {
		t.Errorf("site/protocol.js CALLS %v, the core's list %v", declared, want)
	}

	worker := read(t, "../site/worker.js")
	i := strings.Index(worker, "const CALLS = {\n")
	j := strings.Index(worker[i+1:], "\n};\n")
	if i < 0 || j < 0 {
		t.Fatal("site/worker.js has no CALLS table")
	}
	var adapters []string
	for _, q := range regexp.MustCompile(`(?m)^  ([a-z]+): `).FindAllStringSubmatch(worker[i:i+1+j], -1) {
		adapters = append(adapters, q[1])
	}
	slices.Sort(adapters)
	if !slices.Equal(adapters, want) {
		t.Errorf("site/worker.js CALLS %v, the core's list %v", adapters, want)
	}
	// Core globals are reached through sagittaFunctions, except those of
	// the list without a call name (the messages of a photo use them).
	own := map[string]bool{"sagittaFunctions": true, "sagittaReady": true}
	for _, f := range functions {
		if f.Call == "" {
			own[f.Global] = true
		}
	}
	for _, g := range regexp.MustCompile(`sagitta[A-Z][A-Za-z]*`).FindAllString(worker, -1) {
		if !own[g] {
			t.Errorf("site/worker.js names %s itself; reach it through sagittaFunctions", g)
		}
	}
}

func read(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}
