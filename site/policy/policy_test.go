package policy

import (
	"strings"
	"testing"
)

func TestHash(t *testing.T) {
	// SHA-256 of the empty string, a published test vector (FIPS 180-4
	// examples; the digest e3b0c442...b855 in base64).
	if got, want := Hash(""), "sha256-47DEQpj8HBSa+/TImW+5JCeuQeRkm5NMpJWZG3hSuFU="; got != want {
		t.Fatalf("Hash(\"\") = %s, want %s", got, want)
	}
}

func TestNoConnections(t *testing.T) {
	for name, p := range map[string]string{"served": Served, "single file": SingleFile("a()", "b()")} {
		for _, want := range []string{"default-src 'none'", "connect-src 'none'", "base-uri 'none'", "form-action 'none'", "'wasm-unsafe-eval'"} {
			if !strings.Contains(p, want) {
				t.Errorf("%s policy lacks %q", name, want)
			}
		}
		for _, d := range strings.Split(p, ";") {
			f := strings.Fields(d)
			for _, src := range f[1:] {
				// Nothing remote: no schemes of the network, no wildcard.
				if strings.HasPrefix(src, "http") || strings.HasPrefix(src, "ws") || strings.Contains(src, "*") {
					t.Errorf("%s policy: %s allows %s", name, f[0], src)
				}
				if f[0] == "script-src" && (src == "'unsafe-inline'" || src == "'unsafe-eval'") {
					t.Errorf("%s policy: scripts allow %s", name, src)
				}
			}
		}
	}
	if p := SingleFile("a()"); !strings.Contains(p, "'"+Hash("a()")+"'") {
		t.Errorf("single-file policy lacks the script's hash: %s", p)
	}
}
