package main

import (
	"net/http/httptest"
	"os"
	"path/filepath"
	"testing"

	"sagitta/site/policy"
)

func TestHandler(t *testing.T) {
	site, gen, dist := t.TempDir(), t.TempDir(), t.TempDir()
	write := func(dir, name, body string) {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write(site, "index.html", "<p>page")
	write(site, "app.js", "app()")
	write(site, "notes.go", "package x")
	write(gen, "wasm_exec.js", "go()")
	write(dist, "sagitta.html", "<p>single")
	os.Mkdir(filepath.Join(site, "test"), 0o755)
	write(filepath.Join(site, "test"), "x.js", "secret")
	h := handler(site, gen, dist)
	tests := []struct {
		name, method, path string
		status             int
		body, ctype        string
	}{
		{"index", "GET", "/", 200, "<p>page", "text/html; charset=utf-8"},
		{"script", "GET", "/app.js", 200, "app()", "text/javascript; charset=utf-8"},
		{"generated", "GET", "/wasm_exec.js", 200, "go()", "text/javascript; charset=utf-8"},
		{"single file", "GET", "/sagitta.html", 200, "<p>single", "text/html; charset=utf-8"},
		{"source of other kind", "GET", "/notes.go", 404, "", ""},
		{"subdirectory", "GET", "/test/x.js", 404, "", ""},
		{"escape", "GET", "/../go.mod", 404, "", ""},
		{"missing", "GET", "/none.js", 404, "", ""},
		{"post", "POST", "/", 405, "", ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			rec := httptest.NewRecorder()
			h.ServeHTTP(rec, httptest.NewRequest(tc.method, tc.path, nil))
			if rec.Code != tc.status {
				t.Fatalf("status %d, want %d", rec.Code, tc.status)
			}
			if got := rec.Header().Get("Content-Security-Policy"); got != policy.Served {
				t.Errorf("CSP header %q", got)
			}
			if tc.status != 200 {
				return
			}
			if rec.Body.String() != tc.body {
				t.Errorf("body %q, want %q", rec.Body.String(), tc.body)
			}
			if got := rec.Header().Get("Content-Type"); got != tc.ctype {
				t.Errorf("content type %q, want %q", got, tc.ctype)
			}
		})
	}
}

func TestRefusesNonLoopback(t *testing.T) {
	for _, addr := range []string{"0.0.0.0:0", ":0", "192.0.2.1:0"} {
		if err := run(addr, ".", ".", "."); err == nil {
			t.Errorf("run(%q) accepted a non-loopback address", addr)
		}
	}
}
