package draw

import (
	"bytes"
	"image"
	"image/color"
	"image/png"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"testing"
)

// These tests check the writers' output with independent programs: Debian's
// poppler-utils (pdfinfo, pdftoppm) and librsvg (rsvg-convert). Each test
// skips when its program is not on PATH (and so always under js/wasm).

// needTool skips t unless the named program is on PATH.
func needTool(t *testing.T, name string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		t.Skipf("%s not on PATH", name)
	}
	return p
}

// run runs a program and fails t on an error or on any message on stderr.
func run(t *testing.T, name string, args ...string) string {
	t.Helper()
	var out, errb bytes.Buffer
	cmd := exec.Command(name, args...)
	cmd.Stdout, cmd.Stderr = &out, &errb
	if err := cmd.Run(); err != nil {
		t.Fatalf("%s %s: %v\n%s", name, strings.Join(args, " "), err, errb.String())
	}
	if errb.Len() > 0 {
		t.Errorf("%s reports: %s", name, errb.String())
	}
	return out.String()
}

// renderPDF renders page 1 of a PDF with pdftoppm at dpi as a grey image.
func renderPDF(t *testing.T, pdf []byte, dpi int) *image.Gray {
	t.Helper()
	needTool(t, "pdftoppm")
	dir := t.TempDir()
	in := filepath.Join(dir, "in.pdf")
	if err := os.WriteFile(in, pdf, 0o644); err != nil {
		t.Fatal(err)
	}
	run(t, "pdftoppm", "-r", itoa(dpi), "-gray", "-png", "-singlefile", in, filepath.Join(dir, "out"))
	return readGray(t, filepath.Join(dir, "out.png"))
}

// renderSVG renders an SVG with rsvg-convert at dpi as a grey image.
func renderSVG(t *testing.T, svg []byte, dpi int) *image.Gray {
	t.Helper()
	needTool(t, "rsvg-convert")
	dir := t.TempDir()
	in := filepath.Join(dir, "in.svg")
	if err := os.WriteFile(in, svg, 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "out.png")
	run(t, "rsvg-convert", "-d", itoa(dpi), "-p", itoa(dpi), "-b", "white", "-o", out, in)
	return readGray(t, out)
}

func itoa(v int) string { return fmtFloat(float64(v)) }

// readGray decodes a PNG file into grey values (Go's luma weights).
func readGray(t *testing.T, name string) *image.Gray {
	t.Helper()
	f, err := os.Open(name)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	g := image.NewGray(img.Bounds())
	for y := g.Rect.Min.Y; y < g.Rect.Max.Y; y++ {
		for x := g.Rect.Min.X; x < g.Rect.Max.X; x++ {
			g.Set(x, y, color.GrayModel.Convert(img.At(x, y)))
		}
	}
	return g
}

// rowInk returns the summed darkness (1 - v/255) of row y from x0 to x1, and
// the first and last columns darker than one half.
func rowInk(g *image.Gray, y, x0, x1 int) (ink float64, first, last int) {
	first, last = -1, -1
	for x := x0; x < x1; x++ {
		d := 1 - float64(g.GrayAt(x, y).Y)/255
		ink += d
		if d > 0.5 {
			if first < 0 {
				first = x
			}
			last = x
		}
	}
	return ink, first, last
}

// pdfinfo (poppler-utils) reads our files without complaint and reports the
// page sizes of ISO 216 A4, 595.276 x 841.89 pts, and of US Letter, 612 x
// 792 pts (ISO 32000-1: 1 pt = 1/72 in).
func TestPDFInfo(t *testing.T) {
	needTool(t, "pdfinfo")
	tests := []struct {
		name string
		w, h float64
		want string
	}{
		{"A4", 210, 297, "Page size:       595.276 x 841.89 pts (A4)"},
		{"Letter", 215.9, 279.4, "Page size:       612 x 792 pts (letter)"},
	}
	for _, tc := range tests {
		c, _ := NewPDF(tc.w, tc.h)
		testPage(c, tc.w, tc.h)
		c.NewPage()
		c.Text(10, 10, "second page", TextStyle{Size: 5})
		name := filepath.Join(t.TempDir(), "f.pdf")
		if err := os.WriteFile(name, c.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		out := run(t, "pdfinfo", name)
		if !strings.Contains(out, tc.want) || !strings.Contains(out, "Pages:           2") {
			t.Errorf("%s: pdfinfo says\n%s\nwant %q and 2 pages", tc.name, out, tc.want)
		}
	}
}

// A black bar 100 mm long, rendered by pdftoppm at 300 dpi, is 100/25.4*300
// = 1181.1 px long and starts at 20 mm = 236.2 px. Poppler snaps the edges
// of axis-aligned rectangles to whole pixels (its stroke adjustment), so the
// dark run is 1181 px; a parallelogram with slanted ends, 100 mm long on
// every row, is anti-aliased instead, and its mean ink per row measures the
// length to a fraction of a pixel.
func TestPDFBarLength(t *testing.T) {
	c, _ := NewPDF(150, 60)
	var p Path
	p.Rect(20, 10, 100, 10)
	c.Path(&p, Style{Fill: color.Black})
	p.Reset()
	p.Polygon(20, 30, 120, 30, 123, 50, 23, 50)
	c.Path(&p, Style{Fill: color.Black})
	g := renderPDF(t, c.Bytes(), 300)
	want := 100 / 25.4 * 300
	ink, first, last := rowInk(g, 177, 0, g.Rect.Dx()) // 15 mm = 177.2 px
	t.Logf("pdftoppm: bar ink %.2f px, dark run %d..%d (%d px), want %.2f", ink, first, last, last-first+1, want)
	if math.Abs(ink-want) > 1 || math.Abs(float64(last-first+1)-want) > 1 {
		t.Errorf("bar measures %.2f px (run %d px), want %.2f within 1 px", ink, last-first+1, want)
	}
	if x0 := 20 / 25.4 * 300; math.Abs(float64(first)-x0) > 1 {
		t.Errorf("bar starts at column %d, want %.2f", first, x0)
	}
	// Rows 32 to 48 mm of the parallelogram.
	sum, n := 0.0, 0
	for y := 378; y < 567; y++ { // 32 mm = 377.95 px, 48 mm = 566.93 px
		ink, _, _ := rowInk(g, y, 0, g.Rect.Dx())
		sum += ink
		n++
	}
	t.Logf("pdftoppm: slanted bar mean ink %.3f px per row, want %.3f", sum/float64(n), want)
	if math.Abs(sum/float64(n)-want) > 0.25 {
		t.Errorf("slanted bar measures %.3f px, want %.3f within 0.25 px", sum/float64(n), want)
	}
}

// noText is a Canvas that passes everything but text on to another.
type noText struct{ Canvas }

func (noText) Text(float64, float64, string, TextStyle) {}

// The same drawing through all three writers: the PDF rendered by pdftoppm
// and the SVG rendered by rsvg-convert agree with our raster at the same
// resolution. Without text (the writers use different fonts by design) the
// mean absolute difference must stay below 1 % of full scale and the edges
// of the 100 mm bar and of a circle within 1 px; with text, the difference
// is reported.
func TestWritersAgree(t *testing.T) {
	if testing.Short() {
		t.Skip("renders three A4 pages")
	}
	const w, h, dpi = 210, 297, 150
	for _, withText := range []bool{false, true} {
		wrap := func(c Canvas) Canvas {
			if withText {
				return c
			}
			return noText{c}
		}
		r, err := NewRaster(w, h, dpi/MMPerInch, color.GrayModel)
		if err != nil {
			t.Fatal(err)
		}
		testPage(wrap(r), w, h)
		ours := r.Pixels().(*image.Gray)
		pdf, _ := NewPDF(w, h)
		testPage(wrap(pdf), w, h)
		svg, _ := NewSVG(w, h, "mm")
		testPage(wrap(svg), w, h)
		for _, other := range []struct {
			name   string
			render func() *image.Gray
		}{
			{"pdftoppm", func() *image.Gray { return renderPDF(t, pdf.Bytes(), dpi) }},
			{"rsvg-convert", func() *image.Gray { return renderSVG(t, svg.Bytes(), dpi) }},
		} {
			if _, err := exec.LookPath(strings.Fields(other.name)[0]); err != nil {
				t.Logf("%s not on PATH: skipped", other.name)
				continue
			}
			g := other.render()
			mad := meanAbsDiff(ours, g)
			t.Logf("text %v: %s vs raster: mean absolute difference %.3f %% of full scale", withText, other.name, 100*mad)
			if !withText && mad > 0.01 {
				t.Errorf("%s vs raster: mean absolute difference %.3f %%, want < 1 %%", other.name, 100*mad)
			}
			if withText && mad > 0.03 {
				t.Errorf("%s vs raster with text: mean absolute difference %.3f %%, want < 3 %%", other.name, 100*mad)
			}
			// Edges: the 100 mm bar (row at 24 mm) and the red disc
			// centred at (40, 100) mm, radius 12 mm.
			for _, row := range []struct {
				name string
				ymm  float64
			}{{"bar", 24}, {"disc", 100}} {
				y := int(row.ymm / 25.4 * dpi)
				_, f0, l0 := rowInk(ours, y, 0, 400)
				_, f1, l1 := rowInk(g, y, 0, 400)
				if abs(f0-f1) > 1 || abs(l0-l1) > 1 {
					t.Errorf("%s: %s edges at %d..%d px, raster %d..%d", other.name, row.name, f1, l1, f0, l0)
				}
			}
		}
	}
}

func abs(v int) int {
	if v < 0 {
		return -v
	}
	return v
}

// meanAbsDiff returns the mean absolute difference of two grey images over
// their common area, as a fraction of full scale.
func meanAbsDiff(a, b *image.Gray) float64 {
	w, h := min(a.Rect.Dx(), b.Rect.Dx()), min(a.Rect.Dy(), b.Rect.Dy())
	sum := 0.0
	for y := 0; y < h; y++ {
		for x := 0; x < w; x++ {
			sum += math.Abs(float64(a.GrayAt(x, y).Y) - float64(b.GrayAt(x, y).Y))
		}
	}
	return sum / float64(w*h) / 255
}

// Text widths: pdftotext -bbox (poppler-utils) measures the PDF's words with
// poppler's built-in metrics of the standard Helvetica font. A line of
// Helvetica must be within 3 % of TextWidth's Go Regular width, the
// difference the package doc admits; digits are 0.556 em in both
// (Helvetica's digit width, as poppler reports it here).
func TestPDFTextWidth(t *testing.T) {
	needTool(t, "pdftotext")
	lines := []string{"0123456789", "MTF50 sagittal tangential", "Sagitta Simulated Camera, 50 mm f/2.8", "lp/mm cycles/pixel Nyquist"}
	c, _ := NewPDF(300, 100)
	for i, s := range lines {
		c.Text(10, 20+15*float64(i), s, TextStyle{Size: 10})
	}
	name := filepath.Join(t.TempDir(), "w.pdf")
	if err := os.WriteFile(name, c.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	out := run(t, "pdftotext", "-bbox", name, "-")
	re := regexp.MustCompile(`<word xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)"`)
	// The rightmost xMax of each row (rows keyed by yMin), in points,
	// ordered from the top of the page like lines.
	right := map[float64]float64{}
	for _, m := range re.FindAllStringSubmatch(out, -1) {
		y0, _ := strconv.ParseFloat(m[2], 64)
		x1, _ := strconv.ParseFloat(m[3], 64)
		right[y0] = math.Max(right[y0], x1)
	}
	if len(right) != len(lines) {
		t.Fatalf("pdftotext found %d lines, want %d:\n%s", len(right), len(lines), out)
	}
	ys := make([]float64, 0, len(right))
	for y := range right {
		ys = append(ys, y)
	}
	sort.Float64s(ys)
	for i, s := range lines {
		goW := TextWidth(s, TextStyle{Size: 10})
		helv := right[ys[i]]/PtPerMM - 10 // the text starts at x = 10 mm
		rel := (helv - goW) / goW
		t.Logf("%q: Helvetica %.2f mm, Go Regular %.2f mm (%+.2f %%)", s, helv, goW, 100*rel)
		if math.Abs(rel) > 0.03 {
			t.Errorf("%q: Helvetica %.2f mm differs from TextWidth %.2f mm by %.1f %%", s, helv, goW, 100*rel)
		}
	}
}
