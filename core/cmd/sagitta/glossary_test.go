package main

import (
	"bufio"
	"bytes"
	"encoding/json"
	"encoding/xml"
	"fmt"
	"go/ast"
	"go/parser"
	"go/token"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"runtime"
	"strconv"
	"strings"
	"testing"

	"sagitta/core/analyze"
	"sagitta/core/sim/simcam"
)

// glossaryEntry is one line of core/plot/glossary.txt.
type glossaryEntry struct {
	name      string
	forbidden []string
	allowed   string
}

// readGlossary reads the project's glossary (format in the file's header).
func readGlossary(t *testing.T) []glossaryEntry {
	t.Helper()
	f, err := os.Open(filepath.Join("..", "..", "plot", "glossary.txt"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var out []glossaryEntry
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		line := strings.TrimSpace(sc.Text())
		if line == "" || strings.HasPrefix(line, "#") {
			continue
		}
		parts := strings.Split(line, " | ")
		if len(parts) < 2 || len(parts) > 3 {
			t.Fatalf("glossary line %q: want name | variants [| allowed phrase]", line)
		}
		e := glossaryEntry{name: parts[0]}
		for _, v := range strings.Split(parts[1], ";") {
			if v = strings.ToLower(strings.TrimSpace(v)); v != "" {
				e.forbidden = append(e.forbidden, v)
			}
		}
		if len(parts) == 3 {
			e.allowed = strings.ToLower(strings.TrimSpace(parts[2]))
		}
		out = append(out, e)
	}
	if len(out) < 5 {
		t.Fatalf("glossary has %d entries", len(out))
	}
	return out
}

// label is one user-visible text and where it came from.
type label struct{ where, text string }

// TestGlossary collects every user-visible label - the CLI's help and text
// output, the CSV header, the JSON's texts, the titles, axes, legends and
// notes of the plots written by --plots for simulated photos, every string
// literal of the Go code (messages not triggered here), the strings of the
// page (site/*.js string literals and site/index.html) and README -
// and fails when one of them uses a variant the glossary forbids.
func TestGlossary(t *testing.T) {
	gl := readGlossary(t)
	var labels []label
	add := func(where, text string) { labels = append(labels, label{where, text}) }

	// CLI help.
	for _, args := range [][]string{{"help"}, {"analyze", "-h"}, {"chart", "-h"}, {"plan", "-h"}, {"demo", "-h"}} {
		out, errOut, _ := runCLI(args...)
		add("sagitta "+strings.Join(args, " "), out+errOut)
	}
	out, errOut, code := runCLI("plan", "--focal-mm", "50", "--sensor", "36x24", "--paper", "A3")
	if code != 0 {
		t.Fatalf("plan: %s", errOut)
	}
	add("sagitta plan", out)

	// Two simulated photos, analysed once (natively; under WebAssembly
	// with -short, where this takes minutes, the other sources suffice).
	if runtime.GOOS == "js" && testing.Short() {
		t.Log("under WebAssembly with -short: the simulated photos are left out")
	} else {
		labels = append(labels, analysedLabels(t)...)
	}

	// Every string literal of the core and the wasm glue (messages and
	// warnings the simulated photos did not trigger), struct tags aside.
	for _, root := range []string{filepath.Join("..", ".."), filepath.Join("..", "..", "..", "wasm")} {
		for _, l := range goStrings(t, root) {
			labels = append(labels, l)
		}
	}

	// The page and README.
	site := filepath.Join("..", "..", "..", "site")
	jsFiles, _ := filepath.Glob(filepath.Join(site, "*.js"))
	if len(jsFiles) < 5 {
		t.Fatalf("%d page scripts found", len(jsFiles))
	}
	for _, p := range jsFiles {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		for _, s := range jsStrings(string(b)) {
			if !identifier.MatchString(s) { // class names, keys, ids
				add(filepath.Base(p), s)
			}
		}
	}
	for _, p := range []string{filepath.Join(site, "index.html"), filepath.Join("..", "..", "..", "README.md")} {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		text := string(b)
		if strings.HasSuffix(p, ".md") {
			text = codeSpan.ReplaceAllString(text, "`code`") // JSON keys, commands
		}
		for i, line := range strings.Split(text, "\n") {
			add(fmt.Sprintf("%s:%d", filepath.Base(p), i+1), line)
		}
	}

	bad := 0
	for _, l := range labels {
		low := strings.ToLower(l.text)
		for _, e := range gl {
			s := low
			if e.allowed != "" {
				s = strings.ReplaceAll(s, e.allowed, "")
			}
			for _, v := range e.forbidden {
				if strings.Contains(s, v) {
					bad++
					if bad <= 40 {
						t.Errorf("%s: %q says %q; the glossary's name is %q", l.where, clip(l.text, v), v, e.name)
					}
				}
			}
		}
	}
	if bad > 40 {
		t.Errorf("... %d forbidden variants in all", bad)
	}
	// The collection itself must see the labels it claims to.
	for _, want := range []string{"distance from the optical centre (mm)", "cy/px", "perfect lens", "set aside"} {
		found := false
		for _, l := range labels {
			if strings.Contains(strings.ToLower(l.text), strings.ToLower(want)) {
				found = true
				break
			}
		}
		if !found {
			t.Errorf("no label says %q", want)
		}
	}
}

var (
	codeSpan   = regexp.MustCompile("`[^`\n]*`")
	identifier = regexp.MustCompile(`^[a-z][a-z0-9]*([_-][a-z0-9]+)*$`)
)

// clip returns the part of text around v, for messages.
func clip(text, v string) string {
	i := strings.Index(strings.ToLower(text), v)
	lo, hi := max(0, i-40), min(len(text), i+len(v)+40)
	return text[lo:hi]
}

// simulatedPair writes two simulated photos of radially turned squares.
func simulatedPair(t *testing.T, dir string) []string {
	var files []string
	for i, name := range []string{"a.png", "b.png"} {
		const w, h = 900, 600
		lens := simcam.FieldLens{CentreX: w / 2, CentreY: h / 2, PitchUM: 8,
			SigmaT: []float64{0.6, 0, 0.2 / float64(i+1)}, SigmaS: []float64{0.6, 0.2}}
		sc := simcam.Scene{Background: 0.75}
		for j := 0; j < 6; j++ {
			for k := 0; k < 9; k++ {
				x, y := (float64(k)+0.5)*w/9, (float64(j)+0.5)*h/6
				sc.Polygons = append(sc.Polygons, simcam.Square(x, y, 60, math.Atan2(y-h/2, x-w/2)*180/math.Pi+5, 0.12))
			}
		}
		cam := simcam.Camera{W: w, H: h, Lens: lens, FullWellE: 10000, Seed: uint64(i + 1)}
		b, err := cam.Encode(sc)
		if err != nil {
			t.Fatal(err)
		}
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, b, 0o644); err != nil {
			t.Fatal(err)
		}
		files = append(files, p)
	}
	return files
}

// jsonStrings calls f with every string value (not key) of v.
func jsonStrings(v any, f func(string)) {
	switch x := v.(type) {
	case string:
		f(x)
	case []any:
		for _, e := range x {
			jsonStrings(e, f)
		}
	case map[string]any:
		for _, e := range x {
			jsonStrings(e, f)
		}
	}
}

// svgTexts returns the text of an SVG's <text> and <title> elements and its
// aria-label attributes.
func svgTexts(t *testing.T, b []byte) []string {
	var out []string
	dec := xml.NewDecoder(bytes.NewReader(b))
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			return out
		}
		if err != nil {
			t.Fatal(err)
		}
		switch x := tok.(type) {
		case xml.StartElement:
			for _, a := range x.Attr {
				if a.Name.Local == "aria-label" {
					out = append(out, a.Value)
				}
			}
		case xml.CharData:
			if s := strings.TrimSpace(string(x)); s != "" {
				out = append(out, s)
			}
		}
	}
}

// jsStrings returns the string literals of a JavaScript source ('...',
// "..." and the literal parts of `...` templates), skipping comments.
// Regular-expression literals are not told apart from division; the page's
// scripts hold no quote inside one.
func jsStrings(src string) []string {
	var out []string
	for i := 0; i < len(src); i++ {
		switch c := src[i]; {
		case c == '/' && i+1 < len(src) && src[i+1] == '/':
			for i < len(src) && src[i] != '\n' {
				i++
			}
		case c == '/' && i+1 < len(src) && src[i+1] == '*':
			end := strings.Index(src[i+2:], "*/")
			if end < 0 {
				return out
			}
			i += end + 3
		case c == '\'' || c == '"' || c == '`':
			var b strings.Builder
			for i++; i < len(src) && src[i] != c; i++ {
				if src[i] == '\\' && i+1 < len(src) {
					i++
					b.WriteByte(src[i])
					continue
				}
				if c == '`' && src[i] == '$' && i+1 < len(src) && src[i+1] == '{' {
					depth := 0
					for ; i < len(src); i++ {
						if src[i] == '{' {
							depth++
						} else if src[i] == '}' {
							depth--
							if depth == 0 {
								break
							}
						}
					}
					b.WriteString(" … ")
					continue
				}
				b.WriteByte(src[i])
			}
			out = append(out, b.String())
		}
	}
	return out
}

// goStrings returns the string literals of the non-test Go files under
// root, without struct tags.
func goStrings(t *testing.T, root string) []label {
	var out []label
	err := filepath.WalkDir(root, func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() || !strings.HasSuffix(p, ".go") || strings.HasSuffix(p, "_test.go") {
			return err
		}
		fset := token.NewFileSet()
		f, err := parser.ParseFile(fset, p, nil, parser.SkipObjectResolution)
		if err != nil {
			return err
		}
		tags := map[*ast.BasicLit]bool{}
		ast.Inspect(f, func(n ast.Node) bool {
			if fd, ok := n.(*ast.Field); ok && fd.Tag != nil {
				tags[fd.Tag] = true
			}
			if bl, ok := n.(*ast.BasicLit); ok && bl.Kind == token.STRING && !tags[bl] {
				if v, err := strconv.Unquote(bl.Value); err == nil {
					out = append(out, label{fset.Position(bl.Pos()).String(), v})
				}
			}
			return true
		})
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	if len(out) < 50 {
		t.Fatalf("only %d Go strings found under %s", len(out), root)
	}
	return out
}

// analysedLabels returns the labels of two simulated photos' analysis: the
// JSON's texts and plots (from --json --plots), and the text report and CSV
// header written from the same result.
func analysedLabels(t *testing.T) []label {
	var labels []label
	add := func(where, text string) { labels = append(labels, label{where, text}) }
	var out, errOut string
	var code int
	dir := t.TempDir()
	files := simulatedPair(t, dir)
	plots := filepath.Join(dir, "plots")
	out, errOut, code = runCLI(append([]string{"analyze", "--pitch-um", "8", "--json", "--plots", plots}, files...)...)
	if code != 0 {
		t.Fatalf("analyze: %s", errOut)
	}
	var js any
	if err := json.Unmarshal([]byte(out), &js); err != nil {
		t.Fatal(err)
	}
	jsonStrings(js, func(s string) { add("JSON text", s) })
	var res analyze.Result
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	var text, csv bytes.Buffer
	if err := writeText(&text, res); err != nil {
		t.Fatal(err)
	}
	add("sagitta analyze (text)", text.String())
	if err := analyze.WriteCSV(&csv, res); err != nil {
		t.Fatal(err)
	}
	add("CSV header", strings.SplitN(csv.String(), "\n", 2)[0])
	svgs, _ := filepath.Glob(filepath.Join(plots, "*.svg"))
	if len(svgs) < 8 {
		t.Fatalf("%d plots written", len(svgs))
	}
	for _, p := range svgs {
		b, err := os.ReadFile(p)
		if err != nil {
			t.Fatal(err)
		}
		for _, s := range svgTexts(t, b) {
			add("plot "+filepath.Base(p), s)
		}
	}

	return labels
}
