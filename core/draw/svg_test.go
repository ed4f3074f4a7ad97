package draw

import (
	"bytes"
	"encoding/base64"
	"encoding/xml"
	"errors"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"strings"
	"testing"
)

// parseXML checks that b is well-formed XML with encoding/xml (a reference
// parser) and returns its elements as "name attr=value ..." strings and the
// character data.
func parseXML(t *testing.T, b []byte) (elems []xml.StartElement, text string) {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(b))
	d.Strict = true
	var sb strings.Builder
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("not well-formed XML: %v\n%s", err, b)
		}
		switch v := tok.(type) {
		case xml.StartElement:
			elems = append(elems, v.Copy())
		case xml.CharData:
			sb.Write(v)
		}
	}
	return elems, sb.String()
}

// attr returns the value of attribute name (ignoring namespaces).
func attr(e xml.StartElement, name string) string {
	for _, a := range e.Attr {
		if a.Name.Local == name {
			return a.Value
		}
	}
	return ""
}

// An A4 page (ISO 216: 210 x 297 mm) in millimetres: width and height carry
// the unit and the viewBox is in millimetres (SVG 1.1 §7.7-7.8), so one user
// unit is one millimetre.
func TestSVGPageSize(t *testing.T) {
	c, err := NewSVG(210, 297, "mm")
	if err != nil {
		t.Fatal(err)
	}
	b := c.Bytes()
	for _, want := range []string{`width="210mm"`, `height="297mm"`, `viewBox="0 0 210 297"`} {
		if !bytes.Contains(b, []byte(want)) {
			t.Errorf("missing %s in %s", want, b)
		}
	}
	elems, _ := parseXML(t, b)
	if elems[0].Name.Local != "svg" || elems[0].Name.Space != "http://www.w3.org/2000/svg" {
		t.Errorf("root %v, want svg in the SVG namespace", elems[0].Name)
	}
	c, _ = NewSVG(640.5, 480, "px")
	if b := c.Bytes(); !bytes.Contains(b, []byte(`width="640.5px" height="480px" viewBox="0 0 640.5 480"`)) {
		t.Errorf("px page: %s", b)
	}
	var ue UnsupportedError
	if _, err := NewSVG(10, 10, "in"); !errors.As(err, &ue) {
		t.Errorf("unit in: %v, want UnsupportedError", err)
	}
	var ae ArgumentError
	if _, err := NewSVG(0, 10, "mm"); !errors.As(err, &ae) {
		t.Errorf("zero width: %v, want ArgumentError", err)
	}
}

// Text is escaped so that <, &, quotes and apostrophes survive (XML 1.0
// §2.4); control characters, which XML 1.0 forbids, become spaces.
func TestSVGEscaping(t *testing.T) {
	c, _ := NewSVG(100, 100, "px")
	c.SetTitle(`Field "curves" <sagittal & tangential>`)
	const s = `a<b & c>"d" 'e' µm ±1°`
	c.Text(10, 20, s, TextStyle{Size: 5})
	c.Text(10, 30, "bell\x07 tab\t end\xff", TextStyle{Size: 5})
	c.Group(`g"1`, `<group> & "title"`)
	c.End()
	elems, text := parseXML(t, c.Bytes())
	if !strings.Contains(text, s) {
		t.Errorf("text %q lost %q", text, s)
	}
	if !strings.Contains(text, "bell  tab  end\uFFFD") {
		t.Errorf("control characters not replaced: %q", text)
	}
	if got := attr(elems[0], "aria-label"); got != `Field "curves" <sagittal & tangential>` {
		t.Errorf("aria-label %q", got)
	}
	found := false
	for _, e := range elems {
		if e.Name.Local == "g" && attr(e, "id") == `g"1` && attr(e, "aria-label") == `<group> & "title"` {
			found = true
		}
	}
	if !found {
		t.Error("group id or label lost")
	}
}

// Paths, styles, groups and images come out as the SVG elements and
// attributes that mean the same thing, with four-decimal numbers.
func TestSVGElements(t *testing.T) {
	c, _ := NewSVG(200, 100, "mm")
	BeginGroup(c, "plot", "Sagittal MTF")
	var p Path
	p.MoveTo(1.23456789, 2)
	p.LineTo(3, -4.00004)
	p.CubicTo(5, 6, 7, 8, 9, 10)
	p.Close()
	c.Path(&p, Style{Fill: color.NRGBA{255, 0, 16, 128}, Stroke: color.Black, Width: 0.25,
		Dash: []float64{1, 0.5, 2}, Cap: CapRound, Join: JoinBevel, EvenOdd: true})
	c.Text(50, 60, "MTF50", TextStyle{Size: 3.5, Anchor: AnchorMiddle, Bold: true, Angle: -90, Colour: color.RGBA{0, 0, 255, 255}})
	img := image.NewGray(image.Rect(0, 0, 3, 2))
	img.Pix[4] = 77
	c.Image(10, 20, 30, 20, img)
	EndGroup(c)
	b := c.Bytes()
	elems, _ := parseXML(t, b)
	byName := map[string]xml.StartElement{}
	for _, e := range elems {
		byName[e.Name.Local] = e
	}
	path := byName["path"]
	checks := []struct{ got, want string }{
		{attr(path, "d"), "M1.2346 2L3 -4C5 6 7 8 9 10Z"},
		{attr(path, "fill"), "#ff0010"},
		{attr(path, "fill-opacity"), "0.502"}, // 128/255 to 4 decimals: 0.50196 -> 0.502
		{attr(path, "fill-rule"), "evenodd"},
		{attr(path, "stroke"), "#000000"},
		{attr(path, "stroke-width"), "0.25"},
		{attr(path, "stroke-dasharray"), "1 0.5 2 1 0.5 2"}, // odd list repeated (SVG 1.1 §11.4)
		{attr(path, "stroke-linecap"), "round"},
		{attr(path, "stroke-linejoin"), "bevel"},
		{attr(byName["text"], "text-anchor"), "middle"},
		{attr(byName["text"], "font-weight"), "bold"},
		{attr(byName["text"], "transform"), "rotate(-90 50 60)"},
		{attr(byName["text"], "fill"), "#0000ff"},
		{attr(byName["g"], "id"), "plot"},
		{attr(byName["image"], "width"), "30"},
		{attr(byName["svg"], "stroke-miterlimit"), "10"},
	}
	for _, ck := range checks {
		if ck.got != ck.want {
			t.Errorf("got %q, want %q", ck.got, ck.want)
		}
	}
	// The image is a PNG data URI that decodes to the same pixels.
	href := attr(byName["image"], "href")
	data, ok := strings.CutPrefix(href, "data:image/png;base64,")
	if !ok {
		t.Fatalf("image href %.40q", href)
	}
	raw, err := base64.StdEncoding.DecodeString(data)
	if err != nil {
		t.Fatal(err)
	}
	dec, err := png.Decode(bytes.NewReader(raw))
	if err != nil {
		t.Fatal(err)
	}
	if g := color.GrayModel.Convert(dec.At(1, 1)).(color.Gray).Y; g != 77 {
		t.Errorf("image pixel %d, want 77", g)
	}
	// Determinism: the same calls give the same bytes.
	c2, _ := NewSVG(200, 100, "mm")
	BeginGroup(c2, "plot", "Sagittal MTF")
	c2.Path(&p, Style{Fill: color.NRGBA{255, 0, 16, 128}, Stroke: color.Black, Width: 0.25,
		Dash: []float64{1, 0.5, 2}, Cap: CapRound, Join: JoinBevel, EvenOdd: true})
	c2.Text(50, 60, "MTF50", TextStyle{Size: 3.5, Anchor: AnchorMiddle, Bold: true, Angle: -90, Colour: color.RGBA{0, 0, 255, 255}})
	c2.Image(10, 20, 30, 20, img)
	if !bytes.Equal(b, c2.Bytes()) {
		t.Error("output not deterministic")
	}
}

// Bad geometry never reaches the output: subpaths with NaN or huge
// coordinates, zero-size images and text at NaN are dropped; an unclosed
// group is closed by Bytes.
func TestSVGDropsBadInput(t *testing.T) {
	c, _ := NewSVG(100, 100, "px")
	var p Path
	p.MoveTo(math.NaN(), 1)
	p.LineTo(2, 2)
	p.MoveTo(1, 1)
	p.LineTo(2e9, 2)
	p.MoveTo(5, 5)
	p.LineTo(6, 6)
	c.Path(&p, Style{Stroke: color.Black, Width: 1})
	c.Text(math.Inf(1), 1, "x", TextStyle{Size: 3})
	c.Image(0, 0, 0, 10, image.NewGray(image.Rect(0, 0, 1, 1)))
	c.Group("open", "")
	b := c.Bytes()
	elems, _ := parseXML(t, b)
	for _, e := range elems {
		switch e.Name.Local {
		case "path":
			if d := attr(e, "d"); d != "M5 5L6 6" {
				t.Errorf("path d=%q, want M5 5L6 6", d)
			}
		case "text", "image":
			t.Errorf("%s written for bad input", e.Name.Local)
		}
	}
}

// Numbers: at most four decimals, trailing zeros and "-0" trimmed.
func TestAppendNum(t *testing.T) {
	tests := []struct {
		in   float64
		want string
	}{
		{0, "0"}, {-0.0, "0"}, {-0.00001, "0"}, {1, "1"}, {2.5, "2.5"}, {-3.14159265, "-3.1416"},
		{595.275590551, "595.2756"}, {841.88976378, "841.8898"}, {1e9, "1000000000"}, {0.00005, "0.0001"},
	}
	for _, tc := range tests {
		if got := string(appendNum(nil, tc.in)); got != tc.want {
			t.Errorf("appendNum(%v) = %q, want %q", tc.in, got, tc.want)
		}
	}
}
