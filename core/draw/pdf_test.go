package draw

import (
	"bytes"
	"compress/zlib"
	"errors"
	"fmt"
	"image"
	"image/color"
	"io"
	"math"
	"regexp"
	"strconv"
	"strings"
	"testing"
)

// pdfObj returns the text of object n (between "n 0 obj" and "endobj") and
// its decompressed stream, if any, found through the file's own xref table.
func pdfObj(t *testing.T, b []byte, n int) (dict string, stream []byte) {
	t.Helper()
	offs := xrefOffsets(t, b)
	if n < 1 || n >= len(offs) {
		t.Fatalf("object %d not in xref (size %d)", n, len(offs))
	}
	rest := b[offs[n]:]
	end := bytes.Index(rest, []byte("endobj"))
	body := rest[:end]
	i := bytes.Index(body, []byte("stream\n"))
	if i < 0 {
		return string(body), nil
	}
	dict = string(body[:i])
	m := regexp.MustCompile(`/Length (\d+)`).FindStringSubmatch(dict)
	if m == nil {
		t.Fatalf("object %d: stream without /Length", n)
	}
	l, _ := strconv.Atoi(m[1])
	raw := body[i+7 : i+7+l]
	if !strings.Contains(dict, "/FlateDecode") {
		return dict, raw
	}
	z, err := zlib.NewReader(bytes.NewReader(raw))
	if err != nil {
		t.Fatalf("object %d: %v", n, err)
	}
	data, err := io.ReadAll(z)
	if err != nil {
		t.Fatalf("object %d: %v", n, err)
	}
	return dict, data
}

// pageContent returns the decompressed content stream of page i, found
// through the page tree (catalog object 1 -> /Pages -> /Kids -> /Contents).
func pageContent(t *testing.T, b []byte, i int) []byte {
	t.Helper()
	cat, _ := pdfObj(t, b, 1)
	m := regexp.MustCompile(`/Pages (\d+) 0 R`).FindStringSubmatch(cat)
	if m == nil {
		t.Fatalf("catalog %q has no /Pages", cat)
	}
	n, _ := strconv.Atoi(m[1])
	tree, _ := pdfObj(t, b, n)
	kids := regexp.MustCompile(`(\d+) 0 R`).FindAllStringSubmatch(tree[strings.Index(tree, "/Kids"):], -1)
	n, _ = strconv.Atoi(kids[i][1])
	page, _ := pdfObj(t, b, n)
	m = regexp.MustCompile(`/Contents (\d+) 0 R`).FindStringSubmatch(page)
	if m == nil {
		t.Fatalf("page %q has no /Contents", page)
	}
	n, _ = strconv.Atoi(m[1])
	_, data := pdfObj(t, b, n)
	return data
}

// xrefOffsets parses the cross-reference table at startxref (ISO 32000-1
// §7.5.4-7.5.5) and checks that every in-use entry points at "n 0 obj".
func xrefOffsets(t *testing.T, b []byte) []int {
	t.Helper()
	if !bytes.HasSuffix(b, []byte("%%EOF\n")) {
		t.Fatal("file does not end with the end-of-file marker")
	}
	m := regexp.MustCompile(`startxref\n(\d+)\n%%EOF\n$`).FindSubmatch(b)
	if m == nil {
		t.Fatal("no startxref")
	}
	x, _ := strconv.Atoi(string(m[1]))
	if !bytes.HasPrefix(b[x:], []byte("xref\n0 ")) {
		t.Fatalf("startxref %d does not point at xref", x)
	}
	line := b[x+5:]
	line = line[:bytes.IndexByte(line, '\n')]
	var first, count int
	if _, err := fmt.Sscanf(string(line), "%d %d", &first, &count); err != nil || first != 0 {
		t.Fatalf("xref subsection %q", line)
	}
	entries := b[x+5+len(line)+1:]
	offs := make([]int, count)
	for i := 0; i < count; i++ {
		e := string(entries[20*i : 20*i+20]) // each entry is exactly 20 bytes
		if !regexp.MustCompile(`^\d{10} \d{5} [nf]\r\n$`).MatchString(e) {
			t.Fatalf("xref entry %d malformed: %q", i, e)
		}
		offs[i], _ = strconv.Atoi(e[:10])
		if i == 0 {
			if e != "0000000000 65535 f\r\n" {
				t.Errorf("entry 0 %q, want the free-list head", e)
			}
			continue
		}
		if want := fmt.Sprintf("%d 0 obj\n", i); !bytes.HasPrefix(b[offs[i]:], []byte(want)) {
			t.Errorf("xref entry %d (offset %d) points at %.12q, want %q", i, offs[i], b[offs[i]:], want)
		}
	}
	if !bytes.Contains(b[x:], []byte(fmt.Sprintf("/Size %d", count))) {
		t.Errorf("trailer /Size differs from the xref count %d", count)
	}
	return offs
}

// Page sizes in points (ISO 32000-1 §8.3.2.3: 1 pt = 1/72 in): A4 (ISO 216,
// 210 x 297 mm) is 595.2756 x 841.8898 pt to four decimals; US Letter
// (8.5 x 11 in) is 612 x 792 pt; A3 (297 x 420 mm) 841.8898 x 1190.5512.
func TestPDFMediaBox(t *testing.T) {
	tests := []struct {
		name string
		w, h float64
		want string
	}{
		{"A4", 210, 297, "[0 0 595.2756 841.8898]"},
		{"Letter", 215.9, 279.4, "[0 0 612 792]"},
		{"A3", 297, 420, "[0 0 841.8898 1190.5512]"},
	}
	for _, tc := range tests {
		c, err := NewPDF(tc.w, tc.h)
		if err != nil {
			t.Fatal(err)
		}
		b := c.Bytes()
		if !bytes.HasPrefix(b, []byte("%PDF-1.7\n")) {
			t.Errorf("%s: header %.9q", tc.name, b)
		}
		page, _ := pdfObj(t, b, 5)
		if !strings.Contains(page, "/MediaBox "+tc.want) {
			t.Errorf("%s: page %q, want MediaBox %s", tc.name, page, tc.want)
		}
		// The content stream maps millimetres, y down, onto points.
		content := pageContent(t, b, 0)
		want := "2.8346456693 0 0 -2.8346456693 0 " + strings.Fields(strings.Trim(tc.want, "[]"))[3] + " cm\n"
		if string(content) != want {
			t.Errorf("%s: content %q, want %q", tc.name, content, want)
		}
	}
	var ae ArgumentError
	for _, sz := range [][2]float64{{0, 10}, {1, 10}, {6000, 10}, {math.NaN(), 10}} {
		if _, err := NewPDF(sz[0], sz[1]); !errors.As(err, &ae) {
			t.Errorf("page %v mm: %v, want ArgumentError", sz, err)
		}
	}
}

// Content: paths, styles and text become the operators of ISO 32000-1
// §8.5 and §9.4; strings are escaped (§7.3.4.2) and WinAnsi-encoded.
func TestPDFContent(t *testing.T) {
	c, _ := NewPDF(100, 100)
	var p Path
	p.Rect(37, 10, 10.5, 2)
	c.Path(&p, Style{Fill: color.Black})
	p.Reset()
	p.MoveTo(1, 2)
	p.CubicTo(3, 4, 5, 6, 7, 8)
	c.Path(&p, Style{Stroke: color.RGBA{255, 0, 0, 255}, Width: 0.35, Dash: []float64{2, 1}, Cap: CapRound, Join: JoinRound})
	c.Path(&p, Style{Fill: color.NRGBA{0, 0, 255, 51}, Stroke: color.RGBA{255, 0, 0, 255}, Width: 0.35, EvenOdd: true})
	c.Text(10, 20, `a(b)c\ 5 €–µ☺`, TextStyle{Size: 3.5})
	c.Text(10, 30, "axis", TextStyle{Size: 4, Bold: true, Angle: -90})
	b := c.Bytes()
	content := pageContent(t, b, 0)
	for _, want := range []string{
		"37 10 m\n47.5 10 l\n47.5 12 l\n37 12 l\nh\nf\n",
		"1 0 0 RG\n0.35 w\n[2 1] 0 d\n1 J\n1 j\n1 2 m\n3 4 5 6 7 8 c\nS\n",
		"0 0 1 rg\n[] 0 d\n0 J\n0 j\n/GS1 gs\n1 2 m\n3 4 5 6 7 8 c\nB*\n",
		// Text: y-down CTM, so the text matrix flips y back: [1 0 0 -1 x y].
		"0 0 0 rg\n/GS2 gs\nBT /F1 3.5 Tf\n1 0 0 -1 10 20 Tm\n(a\\(b\\)c\\\\ 5 \x80\x96\xb5?) Tj ET\n",
		// Rotated -90: glyph x along (0, -1), glyph up along (-1, 0).
		"BT /F2 4 Tf\n0 -1 -1 0 10 30 Tm\n(axis) Tj ET\n",
	} {
		if !bytes.Contains(content, []byte(want)) {
			t.Errorf("content lacks %q\ncontent:\n%s", want, content)
		}
	}
	res, _ := pdfObj(t, b, 3)
	for _, want := range []string{"/GS1 << /Type /ExtGState /ca 0.2 /CA 1 >>", "/GS2 << /Type /ExtGState /ca 1 /CA 1 >>", "/F1 5 0 R", "/F2 6 0 R"} {
		if !strings.Contains(res, want) {
			t.Errorf("resources %q lack %q", res, want)
		}
	}
	f1, _ := pdfObj(t, b, 5)
	if !strings.Contains(f1, "/Subtype /Type1 /BaseFont /Helvetica /Encoding /WinAnsiEncoding") {
		t.Errorf("font %q", f1)
	}
	// Determinism.
	c2, _ := NewPDF(100, 100)
	p.Reset()
	p.Rect(37, 10, 10.5, 2)
	c2.Path(&p, Style{Fill: color.Black})
	if c3, _ := NewPDF(100, 100); true {
		c3.Path(&p, Style{Fill: color.Black})
		if !bytes.Equal(c2.Bytes(), c3.Bytes()) {
			t.Error("output not deterministic")
		}
	}
}

// Images become Flate-compressed image XObjects (ISO 32000-1 §8.9.5) whose
// decoded samples equal the source; transparency gives a soft mask.
func TestPDFImage(t *testing.T) {
	c, _ := NewPDF(100, 100)
	g := image.NewGray(image.Rect(0, 0, 5, 3))
	for i := range g.Pix {
		g.Pix[i] = uint8(17 * i)
	}
	c.Image(10, 20, 50, 30, g)
	rgba := image.NewNRGBA(image.Rect(0, 0, 2, 1))
	rgba.SetNRGBA(0, 0, color.NRGBA{255, 0, 0, 255})
	rgba.SetNRGBA(1, 0, color.NRGBA{0, 0, 255, 100})
	c.NewPage()
	c.Image(0, 0, 10, 10, rgba)
	b := c.Bytes()
	if c.Pages() != 2 {
		t.Errorf("%d pages, want 2", c.Pages())
	}
	pages, _ := pdfObj(t, b, 2)
	if !strings.Contains(pages, "/Count 2") {
		t.Errorf("page tree %q", pages)
	}
	dict, data := pdfObj(t, b, 5)
	if !strings.Contains(dict, "/Subtype /Image /Width 5 /Height 3 /ColorSpace /DeviceGray /BitsPerComponent 8 /Filter /FlateDecode") {
		t.Errorf("grey image dict %q", dict)
	}
	if !bytes.Equal(data, g.Pix) {
		t.Errorf("grey samples %v, want %v", data, g.Pix)
	}
	dict, data = pdfObj(t, b, 6)
	if !strings.Contains(dict, "/ColorSpace /DeviceRGB") || !strings.Contains(dict, "/SMask 7 0 R") {
		t.Errorf("RGB image dict %q", dict)
	}
	if !bytes.Equal(data, []byte{255, 0, 0, 0, 0, 255}) {
		t.Errorf("RGB samples %v", data)
	}
	if _, mask := pdfObj(t, b, 7); !bytes.Equal(mask, []byte{255, 100}) {
		t.Errorf("soft mask %v, want [255 100]", mask)
	}
	// Placement: the unit square maps onto (10, 20)-(60, 50) mm, first row
	// at the top (§8.9.4), so the y scale is negative.
	content := pageContent(t, b, 0)
	if !bytes.Contains(content, []byte("q\n50 0 0 -30 10 50 cm\n/Im1 Do\nQ\n")) {
		t.Errorf("image placement missing in %q", content)
	}
}
