package main

import (
	"bytes"
	"compress/gzip"
	"encoding/base64"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"sagitta/site/policy"
)

func TestParseModule(t *testing.T) {
	tests := []struct {
		name, src   string
		imports     string // "from:exported>local,..." per import, ";" between
		exports     string
		errContains string
	}{
		{"plain", "import { a, b } from './x.js';\nexport function f() {}\nexport const c = 1;\n", "x.js:a>a,b>b", "f,c", ""},
		{"renamed, multi-line", "import {\n  a as z,\n  b,\n} from './x-y.js';\nexport async function g() {}\nexport class K {}\nexport let v;\n", "x-y.js:a>z,b>b", "g,K,v", ""},
		{"default export", "export default 1;\n", "", "", "unsupported"},
		{"namespace import", "import * as x from './x.js';\n", "", "", "unsupported"},
		{"bare specifier", "import { a } from 'x';\n", "", "", "unsupported"},
		{"export list", "const a = 1;\nexport { a };\n", "", "", "unsupported"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			m, err := parseModule("m.js", tc.src)
			if tc.errContains != "" {
				if err == nil || !strings.Contains(err.Error(), tc.errContains) {
					t.Fatalf("error %v, want one containing %q", err, tc.errContains)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			var imps []string
			for _, d := range m.imports {
				var ns []string
				for _, n := range d.names {
					ns = append(ns, n[0]+">"+n[1])
				}
				imps = append(imps, d.from+":"+strings.Join(ns, ","))
			}
			if got := strings.Join(imps, ";"); got != tc.imports {
				t.Errorf("imports %q, want %q", got, tc.imports)
			}
			if got := strings.Join(m.exports, ","); got != tc.exports {
				t.Errorf("exports %q, want %q", got, tc.exports)
			}
			if strings.Contains(m.body, "export ") || strings.Contains(m.body, "import ") {
				t.Errorf("body keeps a declaration:\n%s", m.body)
			}
		})
	}
}

func writeFiles(t *testing.T, files map[string]string) string {
	t.Helper()
	dir := t.TempDir()
	for name, body := range files {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

func TestJoinModules(t *testing.T) {
	dir := writeFiles(t, map[string]string{
		"app.js":  "import { b } from './b.js';\nimport { a } from './a.js';\nconsole.log(a, b);\n",
		"b.js":    "import { a as x } from './a.js';\nexport const b = x + 1;\n",
		"a.js":    "export const a = 1;\n",
		"bad.js":  "import { nope } from './a.js';\n",
		"cyc1.js": "import { c2 } from './cyc2.js';\nexport const c1 = 1;\n",
		"cyc2.js": "import { c1 } from './cyc1.js';\nexport const c2 = 1;\n",
	})
	out, err := joinModules(dir, "app.js")
	if err != nil {
		t.Fatal(err)
	}
	ia, ib, iapp := strings.Index(out, "const $a ="), strings.Index(out, "const $b ="), strings.Index(out, "const $app =")
	if !(ia >= 0 && ia < ib && ib < iapp) {
		t.Fatalf("modules out of order:\n%s", out)
	}
	for _, want := range []string{"const { a: x } = $a;", "const { b } = $b;", "return { b };"} {
		if !strings.Contains(out, want) {
			t.Errorf("missing %q in:\n%s", want, out)
		}
	}
	if _, err := joinModules(dir, "bad.js"); err == nil || !strings.Contains(err.Error(), "does not export") {
		t.Errorf("missing export: error %v", err)
	}
	if _, err := joinModules(dir, "cyc1.js"); err == nil || !strings.Contains(err.Error(), "cycle") {
		t.Errorf("cycle: error %v", err)
	}
}

// TestBuildRealPage packs the real page with a stand-in core and checks
// that the result holds everything inline, under a policy that allows
// exactly its one script, and the core intact.
func TestBuildRealPage(t *testing.T) {
	core := []byte("\x00asm stand-in core bytes")
	demo := []byte("\x00asm stand-in demo bytes")
	tmp := writeFiles(t, map[string]string{"core.wasm": string(core), "demo.wasm": string(demo), "wasm_exec.js": "globalThis.Go = class {};\n"})
	page, err := build("..", filepath.Join(tmp, "core.wasm"), filepath.Join(tmp, "demo.wasm"), filepath.Join(tmp, "wasm_exec.js"))
	if err != nil {
		t.Fatal(err)
	}
	html := string(page)
	scripts := regexp.MustCompile(`(?s)<script type="module">(.*?)</script>`).FindAllStringSubmatch(html, -1)
	if len(scripts) != 1 {
		t.Fatalf("%d inline module scripts, want 1", len(scripts))
	}
	if !strings.Contains(html, "content=\""+strings.ReplaceAll(policy.SingleFile(scripts[0][1]), "'", "&#39;")+"\"") {
		t.Errorf("the policy does not allow the inline script by its hash")
	}
	if n := len(regexp.MustCompile(`<script[^>]*\ssrc=|<link[^>]*stylesheet`).FindAllString(html, -1)); n != 0 {
		t.Errorf("%d external scripts or stylesheets remain", n)
	}
	for id, want := range map[string][]byte{"core-wasm-gzip": core, "demo-wasm-gzip": demo} {
		m := regexp.MustCompile(`<script type="text/plain" id="` + id + `">([^<]*)</script>`).FindStringSubmatch(html)
		if m == nil {
			t.Fatalf("no %s block", id)
		}
		gz, err := base64.StdEncoding.DecodeString(m[1])
		if err != nil {
			t.Fatal(err)
		}
		zr, err := gzip.NewReader(bytes.NewReader(gz))
		if err != nil {
			t.Fatal(err)
		}
		got, _ := io.ReadAll(zr)
		if !bytes.Equal(got, want) {
			t.Errorf("%s round trip: %q", id, got)
		}
	}
	if !strings.Contains(html, `id="worker-source">`+"\nglobalThis.Go = class {};\n") {
		t.Errorf("the worker block does not start with wasm_exec.js")
	}
	if !strings.Contains(html, `data-build="single-file"`) {
		t.Errorf("no single-file mark")
	}
}

// The served page carries the same policy in its <meta> as the server
// sends in its header.
func TestIndexHasServedPolicy(t *testing.T) {
	b, err := os.ReadFile("../index.html")
	if err != nil {
		t.Fatal(err)
	}
	want := strings.ReplaceAll(policy.Served, "'", "&#39;")
	if !strings.Contains(string(b), `<meta http-equiv="Content-Security-Policy" content="`+want+`">`) {
		t.Errorf("index.html lacks the served policy %s", policy.Served)
	}
}
