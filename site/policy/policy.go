// Package policy holds the Content-Security-Policy of Sagitta's page, shared
// by the local server (site/serve), which sends it as a header on every
// response, and the single-file builder (site/pack), which writes it into
// the page's <meta http-equiv="Content-Security-Policy">.
//
// The policy forbids every network connection (connect-src 'none', no
// remote scripts, styles, images, fonts, frames or forms), so the photos a
// user drops cannot leave the machine even by mistake: the browser enforces
// it. Directives are those of Content Security Policy Level 3
// (https://www.w3.org/TR/CSP3/); 'wasm-unsafe-eval' lets the page compile
// its own WebAssembly (WebAssembly JavaScript Interface, CSP integration).
package policy

import (
	"crypto/sha256"
	"encoding/base64"
	"strings"
)

// Served is the policy of the page served by `make run`: scripts and styles
// only from the page's own origin, workers from Blob URLs.
const Served = "default-src 'none'; script-src 'self' 'wasm-unsafe-eval'; worker-src blob:; " +
	"connect-src 'none'; img-src 'self' blob: data:; style-src 'self' 'unsafe-inline'; " +
	"base-uri 'none'; form-action 'none'"

// SingleFile returns the policy of the single-file page, whose scripts are
// inline: each is allowed by the SHA-256 hash of its text (CSP3, section
// 8.4 "script-src" source expressions). Workers start from Blob URLs.
func SingleFile(inlineScripts ...string) string {
	var src []string
	for _, s := range inlineScripts {
		src = append(src, "'"+Hash(s)+"'")
	}
	return "default-src 'none'; script-src " + strings.Join(src, " ") + " 'wasm-unsafe-eval'; " +
		"worker-src blob:; connect-src 'none'; img-src blob: data:; style-src 'unsafe-inline'; " +
		"base-uri 'none'; form-action 'none'"
}

// Hash returns the CSP hash source of an inline script's text:
// "sha256-" followed by the base64 of the SHA-256 digest of its UTF-8 bytes.
func Hash(script string) string {
	sum := sha256.Sum256([]byte(script))
	return "sha256-" + base64.StdEncoding.EncodeToString(sum[:])
}
