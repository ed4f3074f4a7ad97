package plot

import (
	"bytes"
	"encoding/csv"
	"encoding/xml"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"sagitta/core/analyze"
	"sagitta/core/field"
	"sagitta/core/optics"
)

// testSummary summarises n synthetic radially oriented targets (a
// tangential and a sagittal record each; every tenth a star) on a w x h
// frame with MTF from a Gaussian blur widening with height, plus one mixed
// point. Inputs for drawing, not check values.
func testSummary(t testing.TB, w, h int, pitchUM float64, n int, seed uint64, tilt float64) *field.Summary {
	t.Helper()
	geo := field.NewGeometry(w, h, pitchUM)
	freqs := []float64{10, 30}
	rng := rand.New(rand.NewPCG(seed, 9))
	var pts []field.Point
	for i := 0; i < n; i++ {
		x, y := float64(w)*rng.Float64(), float64(h)*rng.Float64()
		hh := geo.HeightMM(x, y)
		kind := "edge"
		if i%10 == 0 {
			kind = "star"
		}
		scale := 1 + tilt*(x-geo.CentreX)*pitchUM/1000
		for _, o := range []field.Orientation{field.Tangential, field.Sagittal} {
			sigma := (0.7 + 0.004*hh*hh) * scale
			if o == field.Sagittal {
				sigma = (0.7 + 0.03*hh) * scale
			}
			p := field.Point{ID: len(pts) + 1, Kind: kind, X: x, Y: y, HeightMM: hh, Orientation: o, MTF50: 0.18739 / sigma}
			for _, f := range freqs {
				c := f * pitchUM / 1000
				p.MTF = append(p.MTF, math.Exp(-2*math.Pi*math.Pi*sigma*sigma*c*c)+0.01*rng.NormFloat64())
			}
			pts = append(pts, p)
		}
	}
	pts = append(pts, field.Point{ID: len(pts) + 1, Kind: "edge", X: 100, Y: 90, HeightMM: geo.HeightMM(100, 90),
		Orientation: field.Mixed, MTF: []float64{0.7, 0.3}, MTF50: 0.15})
	s, err := field.Summarise(geo, pts, freqs)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// testTarget is a Gaussian-blurred edge (sigma 1.2 px): ESF from the normal
// CDF, LSF the Gaussian, MTF exp(-2 pi^2 sigma^2 f^2).
func testTarget() TargetData {
	const sigma = 1.2
	td := TargetData{Title: "Edge 7", Kind: "edge", Orientation: field.Tangential, HeightMM: 15.2,
		MTF50: 0.18739 / sigma, PitchUM: 6, FNumber: 8}
	for i := -64; i <= 64; i++ {
		x := float64(i) / 4
		td.ESFX, td.ESFV = append(td.ESFX, x), append(td.ESFV, 0.5*math.Erfc(-x/(sigma*math.Sqrt2)))
		td.LSFX, td.LSFV = append(td.LSFX, x), append(td.LSFV, math.Exp(-x*x/(2*sigma*sigma)))
	}
	for i := 0; i <= 100; i++ {
		f := float64(i) / 100
		td.Freq, td.MTF = append(td.Freq, f), append(td.MTF, math.Exp(-2*math.Pi*math.Pi*sigma*sigma*f*f))
	}
	return td
}

// testFigures returns one of each plot, by golden file name.
func testFigures(t testing.TB) map[string]*Figure {
	s := testSummary(t, 6000, 4000, 6, 60, 1, 0)
	s2 := testSummary(t, 6000, 4000, 6, 60, 2, 0.02)
	return map[string]*Figure{
		"field-curves":            FieldCurves(s, FieldOptions{Label: "sample.png", Band: true}),
		"compare":                 Compare([]Photo{{"f/2.8", s}, {"f/5.6", s2}}, CompareOptions{}),
		"mtf50-map":               Map(s, MapOptions{Label: "sample.png"}),
		"astigmatism":             Astigmatism(s, FieldOptions{Band: true}),
		"target":                  Target(testTarget(), TargetOptions{}),
		"colour-fringes":          LateralCA(testCA(0.0004, -0.0006), 21.63, FieldOptions{Label: "sample.png", Band: true}),
		"colour-fringes-compared": CompareCA([]CAPhoto{{"f/2.8", testCA(0.0004, -0.0006), 21.63}, {"f/5.6", testCA(0.0002, -0.0003), 21.63}}, CompareOptions{Band: true}),
	}
}

// testCA is colour fringes of a lens whose red and blue magnifications
// differ from green's by mr and mb on a 6 um pitch: points on 40 edges from
// 1 to 21 mm with a fixed pattern of scatter, straight curves through them
// with a band of 0.01 px.
func testCA(mr, mb float64) *analyze.LateralCA {
	ca := &analyze.LateralCA{Code: "ca-visible", Thresholds: []float64{0.5, 1.5}, Used: 40}
	const pxPerMM = 1000 / 6.0
	for i := range 40 {
		h := 1 + 20*float64(i)/39
		e := 0.02 * math.Sin(float64(7*i))
		ca.Points = append(ca.Points, analyze.CAPoint{ID: i + 1, HeightMM: h, RMinusGPx: mr*h*pxPerMM + e, BMinusGPx: mb*h*pxPerMM - e,
			RMinusGSE: 0.01, BMinusGSE: 0.01, OutlierRG: i == 17})
	}
	for _, p := range []struct {
		pair string
		m    float64
	}{{"R-G", mr}, {"B-G", mb}} {
		c := analyze.CACurve{Pair: p.pair, Coef: []float64{p.m * 21 * pxPerMM}}
		for k := 0; k <= 20; k++ {
			h := 21 * float64(k) / 20
			c.HeightMM, c.Px, c.SEPx = append(c.HeightMM, h), append(c.Px, p.m*h*pxPerMM), append(c.SEPx, 0.01)
		}
		c.MaxPx, c.MaxAtMM, c.MaxSEPx = c.Px[20], 21, 0.01
		ca.Curves = append(ca.Curves, c)
	}
	return ca
}

// TestFieldCurvesAxis: the height axis of a 36 x 24 mm frame runs from 0 to
// the corner, sqrt(18^2 + 12^2) = 21.63 mm (common practice), and every curve sample lies on it.
func TestFieldCurvesAxis(t *testing.T) {
	s := testSummary(t, 6000, 4000, 6, 80, 3, 0)
	f := FieldCurves(s, FieldOptions{})
	// A 2 x 2 grid: rows 10 then 30 lp/mm, columns sagittal then
	// tangential, the same axes in every panel.
	wantTitles := []string{"10 lp/mm · sagittal", "10 lp/mm · tangential", "30 lp/mm · sagittal", "30 lp/mm · tangential"}
	if len(f.Panels) != 4 || f.Columns != 2 {
		t.Fatalf("%d panels in %d columns, want 4 in 2", len(f.Panels), f.Columns)
	}
	for i, pn := range f.Panels {
		if pn.Title != wantTitles[i] {
			t.Errorf("panel %d titled %q, want %q", i, pn.Title, wantTitles[i])
		}
		if a, b := pn.X, f.Panels[0].X; a.Min != b.Min || a.Max != b.Max || a.Title != b.Title || pn.Y.Min != f.Panels[0].Y.Min || pn.Y.Max != f.Panels[0].Y.Max {
			t.Errorf("panel %q has axes %+v %+v, not those of the first", pn.Title, pn.X, pn.Y)
		}
	}
	x := f.Panels[0].X
	if x.Min != 0 || math.Abs(x.Max-21.63) > 0.005 || x.Title != HeightAxisTitle {
		t.Errorf("height axis %q %g..%g mm, want 0..21.63", x.Title, x.Min, x.Max)
	}
	if !strings.Contains(f.Description, "21.63") {
		t.Errorf("description does not give the corner: %q", f.Description)
	}
	for _, r := range f.Data.Rows {
		var h float64
		fmt.Sscan(r[4], &h)
		if h < 0 || h > x.Max {
			t.Errorf("table row at height %g outside the axis: %v", h, r)
		}
	}
	// Each panel holds its own frequency and orientation; kinds by marker.
	var sawStar, sawEdge bool
	for i, pn := range f.Panels {
		fr := strings.Split(wantTitles[i], " ")[0] + " lp/mm"
		or := strings.Fields(wantTitles[i])[3]
		for _, se := range pn.Series {
			if se.Marker == StarMarker {
				sawStar = true
			}
			if se.Marker == EdgeMarker {
				sawEdge = true
			}
			name := strings.ToLower(se.Name)
			if !strings.Contains(name, fr) || !(strings.Contains(name, or) || strings.HasPrefix(name, "mixed")) {
				t.Errorf("panel %q holds %q", pn.Title, se.Name)
			}
			if se.Width > 0 && strings.Contains(se.Name, "Sagittal") && se.Colour != SagittalColour {
				t.Errorf("%s not in the sagittal hue", se.Name)
			}
		}
	}
	if !sawStar || !sawEdge {
		t.Errorf("markers: star %v, edge %v", sawStar, sawEdge)
	}
}

// TestRender: each figure's SVG is well-formed XML with an accessible name
// (SVG 1.1 <title>, WAI-ARIA role="img" and aria-label); its PNG decodes at
// the requested scale and shows the same drawing (the orientation hues
// appear in both).
func TestRender(t *testing.T) {
	for name, f := range testFigures(t) {
		svg := f.SVG()
		dec := xml.NewDecoder(bytes.NewReader(svg))
		var root *xml.StartElement
		titles := 0
		for {
			tok, err := dec.Token()
			if err == io.EOF {
				break
			}
			if err != nil {
				t.Fatalf("%s: SVG is not well-formed XML: %v", name, err)
			}
			if se, ok := tok.(xml.StartElement); ok {
				if root == nil {
					c := se.Copy()
					root = &c
				}
				if se.Name.Local == "title" {
					titles++
				}
			}
		}
		attrs := map[string]string{}
		for _, a := range root.Attr {
			attrs[a.Name.Local] = a.Value
		}
		if root.Name.Local != "svg" || attrs["role"] != "img" || !strings.HasPrefix(attrs["aria-label"], f.Title) || titles < 2 {
			t.Errorf("%s: root %s role %q label %q, %d titles", name, root.Name.Local, attrs["role"], attrs["aria-label"], titles)
		}
		for _, scale := range []float64{1, 2} {
			b, err := f.PNG(scale)
			if err != nil {
				t.Fatalf("%s: %v", name, err)
			}
			img, err := png.Decode(bytes.NewReader(b))
			if err != nil {
				t.Fatalf("%s: PNG does not decode: %v", name, err)
			}
			w, h := f.size()
			if got := img.Bounds().Size(); got.X != int(math.Round(w*scale)) || got.Y != int(math.Round(h*scale)) {
				t.Errorf("%s at %g: %v, want %gx%g", name, scale, got, w*scale, h*scale)
			}
			if scale == 1 && name == "field-curves" {
				for _, c := range []color.NRGBA{SagittalColour, TangentialColour} {
					hex := fmt.Sprintf("#%02x%02x%02x", c.R, c.G, c.B)
					if !bytes.Contains(svg, []byte(hex)) || countColour(img, c) < 200 {
						t.Errorf("%s: colour %s in SVG %v, PNG pixels %d", name, hex, bytes.Contains(svg, []byte(hex)), countColour(img, c))
					}
				}
			}
		}
	}
	if _, err := (&Figure{}).PNG(-1); err == nil {
		t.Error("negative scale accepted")
	}
}

// countColour counts pixels within 2 levels of c.
func countColour(img image.Image, c color.NRGBA) int {
	n := 0
	b := img.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			p := color.NRGBAModel.Convert(img.At(x, y)).(color.NRGBA)
			if absDiff(p.R, c.R) <= 2 && absDiff(p.G, c.G) <= 2 && absDiff(p.B, c.B) <= 2 {
				n++
			}
		}
	}
	return n
}

func absDiff(a, b uint8) int {
	if a > b {
		return int(a - b)
	}
	return int(b - a)
}

// TestTables: every figure has a table whose CSV (RFC 4180) reads back
// with the same header and rows.
func TestTables(t *testing.T) {
	for name, f := range testFigures(t) {
		tb := f.Table()
		if tb.Caption == "" || len(tb.Columns) < 3 || len(tb.Rows) == 0 {
			t.Errorf("%s: table %q with %d columns, %d rows", name, tb.Caption, len(tb.Columns), len(tb.Rows))
			continue
		}
		recs, err := csv.NewReader(bytes.NewReader(tb.CSV())).ReadAll()
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		if len(recs) != len(tb.Rows)+1 || strings.Join(recs[0], "|") != strings.Join(tb.Columns, "|") {
			t.Errorf("%s: CSV has %d records, header %v", name, len(recs), recs[0])
		}
		for i, r := range tb.Rows {
			if len(r) != len(tb.Columns) {
				t.Errorf("%s: row %d has %d cells for %d columns", name, i, len(r), len(tb.Columns))
				break
			}
		}
		if len(f.Legend) == 0 {
			t.Errorf("%s has no legend", name)
		}
		for _, p := range f.Panels {
			if p.X.Title == "" || p.Y.Title == "" {
				t.Errorf("%s: an axis has no title", name)
			}
		}
	}
}

// TestCompareCode: one colour per photo, in the panel of the curve's
// frequency and orientation; every line solid.
func TestCompareCode(t *testing.T) {
	f := testFigures(t)["compare"]
	if len(f.Panels) != 4 || f.Columns != 2 {
		t.Fatalf("%d panels in %d columns", len(f.Panels), f.Columns)
	}
	n := 0
	for _, pn := range f.Panels {
		for _, se := range pn.Series {
			n++
			photo := 0
			if strings.HasPrefix(se.Name, "f/5.6") {
				photo = 1
			}
			if se.Colour != PhotoColours[photo] {
				t.Errorf("%s in %v, want photo colour %d", se.Name, se.Colour, photo)
			}
			if se.Dash != nil || se.Width != LineWidth {
				t.Errorf("%s: dash %v width %g", se.Name, se.Dash, se.Width)
			}
			title := strings.ReplaceAll(pn.Title, " · ", ", ")
			if !strings.Contains(strings.ToLower(se.Name), strings.ToLower(strings.SplitN(title, ", ", 2)[1])) || !strings.Contains(se.Name, strings.SplitN(title, ", ", 2)[0]) {
				t.Errorf("panel %q holds %q", pn.Title, se.Name)
			}
		}
	}
	if n != 8 {
		t.Errorf("%d curves, want 2 photos x 2 frequencies x 2 orientations", n)
	}
}

// TestReferenceWording: one wording for the reference curve everywhere.
func TestReferenceWording(t *testing.T) {
	if w := ReferenceWording(2.8); w != "a perfect lens at f/2.8: diffraction (550 nm) × pixel area" {
		t.Errorf("wording %q", w)
	}
}

// TestTargetReference checks that the target plot draws the one reference
// curve, core/optics's perfect lens, and only when the f-number is known.
// (optics's own tests check it against Goodman and Boreman.)
func TestTargetReference(t *testing.T) {
	// The target plot draws the reference only when the f-number is known.
	td := testTarget()
	with := Target(td, TargetOptions{})
	td.FNumber = 0
	without := Target(td, TargetOptions{})
	if n1, n0 := len(with.Panels[2].Series), len(without.Panels[2].Series); n1 != 2 || n0 != 1 {
		t.Errorf("MTF panel series: %d with f-number, %d without", n1, n0)
	}
	ref, td := with.Panels[2].Series[0], testTarget() // x in cycles/pixel (no lp/mm option)
	want, err := optics.PerfectLens(td.FNumber, td.PitchUM, optics.WavelengthUM, ref.X)
	if err != nil || len(want) != len(ref.Y) || math.Abs(want[50]-ref.Y[50]) > 1e-12 {
		t.Errorf("reference curve is not optics.PerfectLens: %v", err)
	}
	// lp/mm axis: Nyquist at 0.5 cy/px / 0.006 mm = 83.3 lp/mm.
	lp := Target(testTarget(), TargetOptions{LPMM: true})
	if r := lp.Panels[2].Refs[0]; math.Abs(r.At-83.333) > 0.01 || !strings.Contains(lp.Panels[2].X.Title, "lp/mm") {
		t.Errorf("Nyquist at %g in %q", r.At, lp.Panels[2].X.Title)
	}
}

// TestTargetFromMeasurement carries a measurement's data over.
func TestTargetFromMeasurement(t *testing.T) {
	img := &analyze.Image{PitchUM: 4}
	img.Exif.FNumber = 5.6
	m := analyze.Measurement{Kind: "edge", ID: 12, Orientation: field.Sagittal, HeightMM: 9.5,
		Freq: []float64{0, 0.5}, MTF: []float64{1, 0.3}, MTF50: 0.21}
	m.ESF.X, m.ESF.V = []float64{-1, 1}, []float64{0, 1}
	td := TargetFromMeasurement(m, img)
	if td.Title != "Edge 12" || td.PitchUM != 4 || td.FNumber != 5.6 || td.MTF50 != 0.21 || len(td.ESFX) != 2 {
		t.Errorf("%+v", td)
	}
}

// TestGolden compares each figure's SVG with testdata/<name>.svg; run with
// UPDATE_GOLDEN=1 to rewrite them. A golden file without a figure fails.
func TestGolden(t *testing.T) {
	figs := testFigures(t)
	update := os.Getenv("UPDATE_GOLDEN") != ""
	for name, f := range figs {
		path := filepath.Join("testdata", name+".svg")
		got := f.SVG()
		if update {
			if err := os.MkdirAll("testdata", 0o755); err != nil {
				t.Fatal(err)
			}
			if err := os.WriteFile(path, got, 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		want, err := os.ReadFile(path)
		if err != nil {
			t.Fatalf("%v (run with UPDATE_GOLDEN=1 to create it)", err)
		}
		if !bytes.Equal(got, want) {
			gl, wl := strings.Split(string(got), "\n"), strings.Split(string(want), "\n")
			for i := 0; i < min(len(gl), len(wl)); i++ {
				if gl[i] != wl[i] {
					t.Errorf("%s differs from %s at line %d:\n got %.200s\nwant %.200s", name, path, i+1, gl[i], wl[i])
					break
				}
			}
			if len(gl) != len(wl) {
				t.Errorf("%s: %d lines, golden %d", name, len(gl), len(wl))
			}
		}
	}
	files, _ := filepath.Glob(filepath.Join("testdata", "*.svg"))
	for _, p := range files {
		if _, ok := figs[strings.TrimSuffix(filepath.Base(p), ".svg")]; !ok {
			t.Errorf("unused golden file %s", p)
		}
	}
}
