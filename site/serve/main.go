// Command serve is the tiny local web server behind `make run`: it serves
// Sagitta's page to this machine only (it binds a loopback address), with
// the page's Content-Security-Policy as a header on every response, so that
// workers loaded from URLs obey it too.
//
//	serve [-addr 127.0.0.1:8080] [-site site] [-gen bin/web] [-dist dist]
//
// It serves the files at the top of -site (the page's sources), then of -gen
// (files made by the build: wasm_exec.js, sagitta-wasm.js), and
// /sagitta.html from -dist (the single-file page, offered as a download).
// Nothing else: no directory listings, no subdirectories, GET and HEAD only.
// It prints the page's URL on its first line of output.
package main

import (
	"errors"
	"flag"
	"fmt"
	"net"
	"net/http"
	"os"
	"path"
	"path/filepath"
	"strings"

	"sagitta/site/policy"
)

func main() {
	addr := flag.String("addr", "127.0.0.1:8080", "loopback address and port to listen on (port 0: any free port)")
	site := flag.String("site", "site", "directory of the page's sources")
	gen := flag.String("gen", "bin/web", "directory of generated page files")
	dist := flag.String("dist", "dist", "directory of the single-file page")
	flag.Parse()
	if err := run(*addr, *site, *gen, *dist); err != nil {
		fmt.Fprintln(os.Stderr, "serve: "+err.Error())
		os.Exit(1)
	}
}

func run(addr, site, gen, dist string) error {
	host, _, err := net.SplitHostPort(addr)
	if err != nil {
		return err
	}
	if ip := net.ParseIP(host); host != "localhost" && (ip == nil || !ip.IsLoopback()) {
		return fmt.Errorf("%s is not a loopback address: this server only serves this machine", host)
	}
	ln, err := net.Listen("tcp", addr)
	if err != nil {
		return err
	}
	fmt.Printf("http://%s/\n", ln.Addr())
	return http.Serve(ln, handler(site, gen, dist))
}

// contentTypes are the only kinds of file served.
var contentTypes = map[string]string{
	".html": "text/html; charset=utf-8",
	".js":   "text/javascript; charset=utf-8",
	".css":  "text/css; charset=utf-8",
	".svg":  "image/svg+xml",
	".png":  "image/png",
}

// handler serves the page's files with the security headers.
func handler(site, gen, dist string) http.Handler {
	return http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		h := w.Header()
		h.Set("Content-Security-Policy", policy.Served)
		h.Set("X-Content-Type-Options", "nosniff")
		h.Set("Referrer-Policy", "no-referrer")
		h.Set("Cache-Control", "no-store")
		if r.Method != http.MethodGet && r.Method != http.MethodHead {
			h.Set("Allow", "GET, HEAD")
			http.Error(w, "method not allowed", http.StatusMethodNotAllowed)
			return
		}
		name := strings.TrimPrefix(path.Clean(r.URL.Path), "/")
		if name == "" {
			name = "index.html"
		}
		ctype, ok := contentTypes[path.Ext(name)]
		if !ok || strings.ContainsAny(name, "/\\") || strings.HasPrefix(name, ".") {
			http.NotFound(w, r)
			return
		}
		dirs := []string{site, gen}
		if name == "sagitta.html" {
			dirs = []string{dist}
			h.Set("Content-Disposition", `attachment; filename="sagitta.html"`)
		}
		for _, d := range dirs {
			f, err := os.Open(filepath.Join(d, name))
			if errors.Is(err, os.ErrNotExist) {
				continue
			}
			if err != nil {
				http.Error(w, "cannot read "+name, http.StatusInternalServerError)
				return
			}
			defer f.Close()
			st, err := f.Stat()
			if err != nil || st.IsDir() {
				http.NotFound(w, r)
				return
			}
			h.Set("Content-Type", ctype)
			http.ServeContent(w, r, name, st.ModTime(), f)
			return
		}
		http.NotFound(w, r)
	})
}
