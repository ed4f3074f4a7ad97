// Command pack builds Sagitta's single-file page, dist/sagitta.html: the
// page, its styles, its scripts, the worker and the core's WebAssembly in one
// HTML file that works opened from disk with no network.
//
//	pack -site site -wasm bin/sagitta.wasm -demo-wasm bin/sagitta-demo.wasm -wasm-exec bin/web/wasm_exec.js -o dist/sagitta.html
//
// What it does to site/index.html:
//   - the stylesheet link becomes an inline <style>;
//   - the module script app.js and every module it imports become one inline
//     module script (see modules.go);
//   - the worker (wasm_exec.js then worker.js) and the core (base64 of its
//     gzip) become inert data blocks, <script type="text/plain">, read by
//     engine.js: the worker starts from a Blob URL and the core is
//     decompressed with DecompressionStream, as no fetch is allowed;
//   - the Content-Security-Policy becomes the single-file policy, allowing
//     the one inline script by its SHA-256 hash (site/policy);
//   - the demo photo's WebAssembly (wasm/demo), base64 of its gzip, becomes
//     one more data block, decompressed only when the user asks for the
//     demo (engine.js).
package main

import (
	"bytes"
	"compress/gzip"
	"encoding/base64"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"html"
	"os"
	"path/filepath"
	"strings"

	"sagitta/site/policy"
)

func main() {
	site := flag.String("site", "site", "directory of the page's sources")
	wasm := flag.String("wasm", "bin/sagitta.wasm", "the core compiled to WebAssembly")
	demoWasm := flag.String("demo-wasm", "bin/sagitta-demo.wasm", "the demo photo's simulator compiled to WebAssembly")
	wasmExec := flag.String("wasm-exec", "bin/web/wasm_exec.js", "wasm_exec.js of the Go toolchain that built the core")
	out := flag.String("o", "dist/sagitta.html", "output file")
	workerScript := flag.String("worker-script", "", "instead of the page, write the served page's worker script (sagitta-worker.js) to this file")
	flag.Parse()
	if *workerScript != "" {
		if err := writeWorkerScript(*site, *wasmExec, *workerScript); err != nil {
			fmt.Fprintln(os.Stderr, "pack: "+err.Error())
			os.Exit(1)
		}
		return
	}
	page, err := build(*site, *wasm, *demoWasm, *wasmExec)
	if err == nil {
		err = os.MkdirAll(filepath.Dir(*out), 0o755)
	}
	if err == nil {
		err = os.WriteFile(*out, page, 0o644)
	}
	if err != nil {
		fmt.Fprintln(os.Stderr, "pack: "+err.Error())
		os.Exit(1)
	}
	fmt.Printf("%s: %d bytes\n", *out, len(page))
}

// The exact lines of site/index.html that pack replaces.
const (
	styleLink  = `<link rel="stylesheet" href="style.css">`
	appScript  = `<script type="module" src="app.js"></script>`
	htmlOpen   = `<html lang="en">`
	bodyClose  = `</body>`
	cspMetaFmt = `<meta http-equiv="Content-Security-Policy" content="%s">`
)

func build(site, wasmPath, demoWasmPath, wasmExecPath string) ([]byte, error) {
	read := func(p string) (string, error) {
		b, err := os.ReadFile(p)
		return string(b), err
	}
	index, err := read(filepath.Join(site, "index.html"))
	if err != nil {
		return nil, err
	}
	css, err := read(filepath.Join(site, "style.css"))
	if err != nil {
		return nil, err
	}
	worker, err := workerSource(site, wasmExecPath)
	if err != nil {
		return nil, err
	}
	wasm, err := os.ReadFile(wasmPath)
	if err != nil {
		return nil, err
	}
	demoWasm, err := os.ReadFile(demoWasmPath)
	if err != nil {
		return nil, err
	}
	demoGz, err := gzipBytes(demoWasm)
	if err != nil {
		return nil, err
	}
	app, err := joinModules(site, "app.js")
	if err != nil {
		return nil, err
	}
	app = "\n" + app
	gz, err := gzipBytes(wasm)
	if err != nil {
		return nil, err
	}
	for name, s := range map[string]string{"style.css": css, "worker": worker, "modules": app} {
		if strings.Contains(strings.ToLower(s), "</script") || strings.Contains(strings.ToLower(s), "</style") || strings.Contains(s, "<!--") {
			return nil, fmt.Errorf("%s holds text that would end its inline element early", name)
		}
	}
	servedMeta := fmt.Sprintf(cspMetaFmt, html.EscapeString(policy.Served))
	singleMeta := fmt.Sprintf(cspMetaFmt, html.EscapeString(policy.SingleFile(app)))
	data := "<script type=\"text/plain\" id=\"worker-source\">\n" + worker + "</script>\n" +
		"<script type=\"text/plain\" id=\"core-wasm-gzip\">" + base64.StdEncoding.EncodeToString(gz) + "</script>\n" +
		"<script type=\"text/plain\" id=\"demo-wasm-gzip\">" + base64.StdEncoding.EncodeToString(demoGz) + "</script>\n"
	for _, r := range []struct{ old, new string }{
		{servedMeta, singleMeta},
		{styleLink, "<style>\n" + css + "</style>"},
		{appScript, "<script type=\"module\">" + app + "</script>"},
		{htmlOpen, `<html lang="en" data-build="single-file">`},
		{bodyClose, data + bodyClose},
	} {
		if strings.Count(index, r.old) != 1 {
			return nil, fmt.Errorf("index.html must hold exactly one %s", r.old)
		}
		index = strings.Replace(index, r.old, r.new, 1)
	}
	return []byte(index), nil
}

// workerSource is the text every worker runs: Go's wasm_exec.js, then
// site/worker.js.
func workerSource(site, wasmExecPath string) (string, error) {
	worker, err := os.ReadFile(filepath.Join(site, "worker.js"))
	if err != nil {
		return "", err
	}
	wasmExec, err := os.ReadFile(wasmExecPath)
	if err != nil {
		return "", err
	}
	return string(wasmExec) + "\n" + string(worker), nil
}

// writeWorkerScript writes the served page's sagitta-worker.js: the worker's
// source as a string (self.sagittaWorkerSource), loaded by the page as a
// script so that workers start from Blob URLs, with no request once the page
// is running (engine.js).
func writeWorkerScript(site, wasmExecPath, out string) error {
	src, err := workerSource(site, wasmExecPath)
	if err != nil {
		return err
	}
	lit, err := json.Marshal(src)
	if err != nil {
		return err
	}
	text := "// Generated by make wasm (site/pack): the measuring worker's source (wasm_exec.js, then worker.js).\n" +
		"self.sagittaWorkerSource = " + string(lit) + ";\n"
	return os.WriteFile(out, []byte(text), 0o644)
}

func gzipBytes(b []byte) ([]byte, error) {
	var buf bytes.Buffer
	zw, err := gzip.NewWriterLevel(&buf, gzip.BestCompression)
	if err != nil {
		return nil, err
	}
	if _, err := zw.Write(b); err != nil {
		return nil, err
	}
	if err := zw.Close(); err != nil {
		return nil, err
	}
	if buf.Len() == 0 {
		return nil, errors.New("empty core")
	}
	return buf.Bytes(), nil
}
