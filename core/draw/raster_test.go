package draw

import (
	"errors"
	"image"
	"image/color"
	"math"
	"testing"

	"github.com/golang/freetype"
	"github.com/golang/freetype/truetype"
	"golang.org/x/image/font"
	"golang.org/x/image/font/gofont/goregular"
)

// newGray returns a white grey raster of w x h px at 1 px per unit.
func newGray(t testing.TB, w, h float64) *Raster {
	t.Helper()
	r, err := NewRaster(w, h, 1, color.GrayModel)
	if err != nil {
		t.Fatal(err)
	}
	return r
}

// darkness returns the ink coverage 1 - v/255 of pixel (x, y).
func darkness(r *Raster, x, y int) float64 {
	return 1 - float64(r.Pixels().(*image.Gray).GrayAt(x, y).Y)/255
}

// Area coverage (closed form: a pixel's coverage is the area of its unit
// square inside the shape). A black rectangle from x = 10.25 to 20.75 px
// covers 3/4 of column 10 ([10.25, 11)) and 3/4 of column 20 ([20, 20.75));
// one from 10.25 to 20.25 covers 1/4 of column 20.
func TestRasterRectCoverage(t *testing.T) {
	const tol = 1.0 / 255 // one 8-bit step
	tests := []struct {
		name   string
		x0, x1 float64
		col    int
		want   float64
	}{
		{"left of the shape", 10.25, 20.75, 9, 0},
		{"first column", 10.25, 20.75, 10, 0.75},
		{"inside", 10.25, 20.75, 15, 1},
		{"last column", 10.25, 20.75, 20, 0.75},
		{"right of the shape", 10.25, 20.75, 21, 0},
		{"last column, 20.25", 10.25, 20.25, 20, 0.25},
		// 10.9 px is not a multiple of 1/64 px: the rasteriser's 26.6 fixed
		// point moves it to 10.90625, within 1/128 px.
		{"first column, 10.9", 10.9, 20.25, 10, 0.1},
	}
	var p Path
	for _, tc := range tests {
		r := newGray(t, 32, 8)
		p.Reset()
		p.Rect(tc.x0, 0, tc.x1-tc.x0, 8)
		r.Path(&p, Style{Fill: color.Black})
		tol := tol
		if tc.x0*64 != math.Round(tc.x0*64) {
			tol += 1.0 / 128
		}
		if got := darkness(r, tc.col, 4); math.Abs(got-tc.want) > tol {
			t.Errorf("%s: column %d coverage %.4f, want %.4f", tc.name, tc.col, got, tc.want)
		}
	}
	p.Reset()
	p.Rect(10.25, 0, 10.5, 8)
	// The same in RGBA over a transparent page: alpha carries the coverage.
	c, _ := NewRaster(32, 8, 1, color.RGBAModel)
	c.Path(&p, Style{Fill: color.Black})
	if a := c.Pixels().(*image.RGBA).RGBAAt(10, 4).A; math.Abs(float64(a)/255-0.75) > tol {
		t.Errorf("RGBA alpha %d/255, want 0.75", a)
	}
}

// An edge placed at 37 mm on a 600 dpi page lies at 37/25.4*600 =
// 874.0157 px (1 in = 25.4 mm exactly), so a rectangle starting there covers
// 0.9843 of column 874.
func TestRasterEdgeAt37mm(t *testing.T) {
	r, err := NewRaster(50, 2, 600/MMPerInch, color.GrayModel)
	if err != nil {
		t.Fatal(err)
	}
	var p Path
	p.Rect(37, 0, 10, 2)
	r.Path(&p, Style{Fill: color.Black})
	want := 37 / 25.4 * 600 // 874.0157 px
	// Edge position from the coverage of the partly covered column.
	got := 874 + (1 - darkness(r, 874, 20))
	if math.Abs(got-want) > 1.0/64+1.0/255 {
		t.Errorf("edge at %.4f px, want %.4f", got, want)
	}
	if darkness(r, 873, 20) != 0 || darkness(r, 875, 20) != 1 {
		t.Errorf("neighbours of the edge: %.3f, %.3f", darkness(r, 873, 20), darkness(r, 875, 20))
	}
}

// Raster sizes round to the nearest pixel: A4 (ISO 216: 210 x 297 mm) at
// 300 dpi is 210/25.4*300 = 2480.3 -> 2480 by 297/25.4*300 = 3507.9 -> 3508.
func TestRasterSize(t *testing.T) {
	tests := []struct {
		name         string
		w, h, dpi    float64
		wantW, wantH int
	}{
		{"A4 300 dpi", 210, 297, 300, 2480, 3508},
		{"A4 600 dpi", 210, 297, 600, 4961, 7016},         // 4960.6, 7015.7
		{"Letter 300 dpi", 215.9, 279.4, 300, 2550, 3300}, // 8.5 x 11 in
	}
	for _, tc := range tests {
		r, err := NewRaster(tc.w, tc.h, tc.dpi/MMPerInch, color.GrayModel)
		if err != nil {
			t.Fatal(err)
		}
		if b := r.Pixels().Bounds(); b.Dx() != tc.wantW || b.Dy() != tc.wantH {
			t.Errorf("%s: %d x %d px, want %d x %d", tc.name, b.Dx(), b.Dy(), tc.wantW, tc.wantH)
		}
	}
}

func TestRasterErrors(t *testing.T) {
	tests := []struct {
		name    string
		w, h, s float64
		model   color.Model
		want    any
	}{
		{"negative width", -1, 10, 1, color.GrayModel, ArgumentError("")},
		{"NaN height", 10, math.NaN(), 1, color.GrayModel, ArgumentError("")},
		{"zero scale", 10, 10, 0, color.GrayModel, ArgumentError("")},
		{"infinite scale", 10, 10, math.Inf(1), color.GrayModel, ArgumentError("")},
		{"too large", 297, 420, 2880 / MMPerInch, color.GrayModel, ArgumentError("")},
		{"rounds to nothing", 0.1, 10, 1, color.GrayModel, ArgumentError("")},
		{"CMYK", 10, 10, 1, color.CMYKModel, UnsupportedError("")},
	}
	for _, tc := range tests {
		_, err := NewRaster(tc.w, tc.h, tc.s, tc.model)
		var ae ArgumentError
		var ue UnsupportedError
		switch tc.want.(type) {
		case ArgumentError:
			if !errors.As(err, &ae) {
				t.Errorf("%s: error %v, want ArgumentError", tc.name, err)
			}
		case UnsupportedError:
			if !errors.As(err, &ue) {
				t.Errorf("%s: error %v, want UnsupportedError", tc.name, err)
			}
		}
	}
}

// Strokes: a horizontal line of width 3 px centred on y = 10 covers rows 9
// (from 8.5: one half), 10 and 11 fully... (closed form: [8.5, 11.5]).
func TestRasterStrokeWidth(t *testing.T) {
	r := newGray(t, 40, 20)
	var p Path
	p.MoveTo(5, 10)
	p.LineTo(35, 10)
	r.Path(&p, Style{Stroke: color.Black, Width: 3})
	for _, tc := range []struct {
		y    int
		want float64
	}{{7, 0}, {8, 0.5}, {9, 1}, {10, 1}, {11, 0.5}, {12, 0}} {
		if got := darkness(r, 20, tc.y); math.Abs(got-tc.want) > 2.0/255 {
			t.Errorf("row %d: coverage %.3f, want %.3f", tc.y, got, tc.want)
		}
	}
	// Butt caps end at the end points: column 4 is empty, column 5 full.
	if darkness(r, 4, 10) != 0 || darkness(r, 5, 10) != 1 || darkness(r, 35, 10) != 0 {
		t.Errorf("butt cap: %.3f %.3f %.3f", darkness(r, 4, 10), darkness(r, 5, 10), darkness(r, 35, 10))
	}
	// Square caps extend by half the width (ISO 32000-1 §8.4.3.3).
	r = newGray(t, 40, 20)
	r.Path(&p, Style{Stroke: color.Black, Width: 3, Cap: CapSquare})
	if got := darkness(r, 3, 10); math.Abs(got-0.5) > 2.0/255 {
		t.Errorf("square cap: column 3 coverage %.3f, want 0.5 (cap from 3.5)", got)
	}
}

// Joins of a stroked square (outline of [10, 30]^2, width 4 px): a miter
// fills the outer corner pixel (8, 8) fully; a bevel cuts the corner along
// the line x + y = 8 + 2*2 - ... leaving that pixel empty; a round join
// covers part of it.
func TestRasterJoins(t *testing.T) {
	tests := []struct {
		name     string
		j        Join
		min, max float64
	}{
		{"miter", JoinMiter, 0.99, 1},
		{"round", JoinRound, 0.05, 0.6}, // quarter disc of radius 2 centred at (10, 10): (8,8)-(9,9) partly covered
		{"bevel", JoinBevel, 0, 0.01},   // the bevel runs from (8, 10) to (10, 8): pixel (8,8) lies beyond it
	}
	for _, tc := range tests {
		r := newGray(t, 40, 40)
		var p Path
		p.Rect(10, 10, 20, 20)
		r.Path(&p, Style{Stroke: color.Black, Width: 4, Join: tc.j})
		got := darkness(r, 8, 8)
		if got < tc.min || got > tc.max {
			t.Errorf("%s: corner pixel coverage %.3f, want in [%.2f, %.2f]", tc.name, got, tc.min, tc.max)
		}
		// Every other corner is drawn the same way (the closed path joins
		// at its start too).
		for _, q := range [][2]int{{31, 8}, {31, 31}, {8, 31}} {
			if g := darkness(r, q[0], q[1]); math.Abs(g-got) > 0.02 {
				t.Errorf("%s: corner (%d, %d) coverage %.3f, (8, 8) has %.3f", tc.name, q[0], q[1], g, got)
			}
		}
	}
	// A sharp angle beyond the miter limit becomes a bevel: segments at 10
	// degrees have a miter ratio 1/sin(5 deg) = 11.5 > 10.
	r := newGray(t, 200, 60)
	var p Path
	p.MoveTo(10, 50)
	p.LineTo(180, 50)
	s, c := math.Sincos(10 * math.Pi / 180)
	p.LineTo(180-100*c, 50-100*s)
	r.Path(&p, Style{Stroke: color.Black, Width: 4})
	// A miter would reach 2*11.5 = 23 px beyond x = 180; a bevel stays
	// within 2 px of it.
	for x := 184; x < 200; x++ {
		for y := 40; y < 60; y++ {
			if darkness(r, x, y) > 0 {
				t.Fatalf("pixel (%d, %d) inked beyond the bevel", x, y)
			}
		}
	}
}

// Dashes: a 100 px line dashed 6 on, 4 off has ten dashes starting at
// multiples of 10 (the pattern restarts at the subpath start, ISO 32000-1
// §8.4.3.6), so inked columns total 60.
func TestRasterDash(t *testing.T) {
	r := newGray(t, 120, 10)
	var p Path
	p.MoveTo(10, 5)
	p.LineTo(110, 5)
	r.Path(&p, Style{Stroke: color.Black, Width: 2, Dash: []float64{6, 4}})
	total := 0.0
	for x := 0; x < 120; x++ {
		total += darkness(r, x, 5)
		on := (x-10)%10 < 6 && x >= 10 && x < 110
		if want := map[bool]float64{true: 1, false: 0}[on]; math.Abs(darkness(r, x, 5)-want) > 1.0/255 {
			t.Errorf("column %d coverage %.3f, want %v", x, darkness(r, x, 5), want)
		}
	}
	if math.Abs(total-60) > 0.05 {
		t.Errorf("inked length %.3f px, want 60", total)
	}
	// Zero-length dashes with round caps are dots of diameter Width.
	r = newGray(t, 120, 10)
	r.Path(&p, Style{Stroke: color.Black, Width: 2, Dash: []float64{0, 10}, Cap: CapRound})
	ink := 0.0
	for x := 0; x < 120; x++ {
		for y := 0; y < 10; y++ {
			ink += darkness(r, x, y)
		}
	}
	// Ten dots of area pi (radius 1), at 10, 20, ..., 100 (110 is the end).
	if want := 10 * math.Pi; math.Abs(ink-want) > 0.05*want {
		t.Errorf("dots: ink %.3f px^2, want %.3f", ink, want)
	}
	// With butt caps a zero-length dash has no area, so nothing shows (a
	// zero-length dash is visible only through round or square caps;
	// common practice of PDF and SVG renderers).
	r = newGray(t, 120, 10)
	r.Path(&p, Style{Stroke: color.Black, Width: 2, Dash: []float64{0, 10}})
	for x := 0; x < 120; x++ {
		for y := 0; y < 10; y++ {
			if darkness(r, x, y) != 0 {
				t.Fatalf("butt-capped zero dash inked (%d, %d)", x, y)
			}
		}
	}
}

// A circle of radius 20 px has area pi r^2 = 1256.64 px^2 (closed form); the
// four-cubic approximation is within 0.03 % in radius.
func TestRasterCircleArea(t *testing.T) {
	r := newGray(t, 64, 64)
	var p Path
	p.Circle(31.3, 32.6, 20)
	r.Path(&p, Style{Fill: color.Black})
	ink := 0.0
	for x := 0; x < 64; x++ {
		for y := 0; y < 64; y++ {
			ink += darkness(r, x, y)
		}
	}
	if want := math.Pi * 400; math.Abs(ink-want)/want > 0.002 {
		t.Errorf("circle area %.2f px^2, want %.2f", ink, want)
	}
}

// Shapes partly or wholly off the canvas are clipped, not wrapped or
// mis-rasterised (freetype's rasteriser needs non-negative coordinates).
func TestRasterOffCanvas(t *testing.T) {
	r := newGray(t, 20, 20)
	var p Path
	p.Rect(-10.5, -10.5, 20, 20) // covers [0, 9.5)^2 on the canvas
	r.Path(&p, Style{Fill: color.Black})
	p.Reset()
	p.MoveTo(-1e8, 15)
	p.LineTo(1e8, 15.5) // a nearly horizontal huge line, width 1
	r.Path(&p, Style{Stroke: color.Black, Width: 1, Dash: []float64{1, 1}})
	p.Reset()
	p.MoveTo(math.NaN(), 3)
	p.LineTo(5, 5)
	r.Path(&p, Style{Stroke: color.Black, Width: 1})
	ink := 0.0
	for x := 0; x < 20; x++ {
		for y := 0; y < 12; y++ {
			ink += darkness(r, x, y)
		}
	}
	if want := 9.5 * 9.5; math.Abs(ink-want) > 0.05 {
		t.Errorf("clipped square ink %.3f, want %.3f", ink, want)
	}
	if darkness(r, 0, 0) != 1 || darkness(r, 9, 5) < 0.49 || darkness(r, 9, 5) > 0.51 {
		t.Errorf("clipped square: (0,0) %.3f, (9,5) %.3f", darkness(r, 0, 0), darkness(r, 9, 5))
	}
	// The dashed line lies at y = 15.25 on the canvas (slope 2.5e-9), so
	// its 1 px stroke covers 3/4 of row 15, and the dashes half of that.
	row := 0.0
	for x := 0; x < 20; x++ {
		row += darkness(r, x, 15)
	}
	if want := 20 * 0.75 * 0.5; math.Abs(row-want) > 0.1 {
		t.Errorf("dashed huge line: row ink %.2f, want %.2f", row, want)
	}
}

// Images: a block placed on whole pixels with one sample per pixel is copied
// exactly; placed at twice the size, each sample covers 2 x 2 pixels.
func TestRasterImage(t *testing.T) {
	src := image.NewGray(image.Rect(0, 0, 4, 3))
	for i := range src.Pix {
		src.Pix[i] = uint8(20 * i)
	}
	r := newGray(t, 20, 20)
	r.Image(2, 5, 4, 3, src)
	r.Image(10, 10, 8, 6, src)
	g := r.Pixels().(*image.Gray)
	for y := 0; y < 3; y++ {
		for x := 0; x < 4; x++ {
			if got, want := g.GrayAt(2+x, 5+y).Y, src.GrayAt(x, y).Y; got != want {
				t.Errorf("copy (%d, %d) = %d, want %d", x, y, got, want)
			}
			for k := 0; k < 4; k++ {
				if got, want := g.GrayAt(10+2*x+k%2, 10+2*y+k/2).Y, src.GrayAt(x, y).Y; got != want {
					t.Errorf("scaled (%d, %d) = %d, want %d", x, y, got, want)
				}
			}
		}
	}
	if g.GrayAt(1, 5).Y != 255 || g.GrayAt(6, 5).Y != 255 || g.GrayAt(2, 8).Y != 255 {
		t.Error("image drawn outside its rectangle")
	}
	// RGBA canvas with a translucent source: source-over.
	c, _ := NewRaster(4, 4, 1, color.RGBAModel)
	var bg Path
	bg.Rect(0, 0, 4, 4)
	c.Path(&bg, Style{Fill: color.White})
	half := image.NewNRGBA(image.Rect(0, 0, 1, 1))
	half.SetNRGBA(0, 0, color.NRGBA{0, 0, 0, 128})
	c.Image(0, 0, 4, 4, half)
	if v := c.Pixels().(*image.RGBA).RGBAAt(2, 2); math.Abs(float64(v.R)-127) > 1 || v.A != 255 {
		t.Errorf("50 %% black over white = %v, want about 127 opaque", v)
	}
}

// Text: the glyph outlines drawn by the raster writer are those of the Go
// font as rendered by freetype's own renderer (github.com/golang/freetype,
// a general-purpose reference): unhinted at the same size and origin, the
// two masks agree to within a small mean difference.
func TestRasterTextMatchesFreetype(t *testing.T) {
	const size, x0, y0 = 24.0, 5.0, 30.0
	text := "Sagitta MTF 0.5@42 lp/mm"
	r := newGray(t, 360, 40)
	r.Text(x0, y0, text, TextStyle{Size: size})

	f, err := truetype.Parse(goregular.TTF)
	if err != nil {
		t.Fatal(err)
	}
	ref := image.NewGray(image.Rect(0, 0, 360, 40))
	for i := range ref.Pix {
		ref.Pix[i] = 255
	}
	ctx := freetype.NewContext()
	ctx.SetDPI(72)
	ctx.SetFont(f)
	ctx.SetFontSize(size)
	ctx.SetHinting(font.HintingNone)
	ctx.SetClip(ref.Bounds())
	ctx.SetDst(ref)
	ctx.SetSrc(image.Black)
	end, err := ctx.DrawString(text, freetype.Pt(int(x0), int(y0)))
	if err != nil {
		t.Fatal(err)
	}
	// Advance: freetype's pen moves by the same advance widths.
	if got, want := TextWidth(text, TextStyle{Size: size}), float64(end.X)/64-x0; math.Abs(got-want) > 0.1 {
		t.Errorf("TextWidth %.3f px, freetype advance %.3f px", got, want)
	}
	g := r.Pixels().(*image.Gray)
	sum, ink := 0.0, 0.0
	for i := range g.Pix {
		sum += math.Abs(float64(g.Pix[i]) - float64(ref.Pix[i]))
		ink += 255 - float64(ref.Pix[i])
	}
	if ink == 0 {
		t.Fatal("reference text is empty")
	}
	if rel := sum / ink; rel > 0.1 {
		t.Errorf("text masks differ by %.1f %% of the ink", 100*rel)
	} else {
		t.Logf("text masks differ by %.2f %% of the ink", 100*rel)
	}
}

// Grey and RGBA rasters draw the same shapes: the grey value equals the luma
// of the RGBA result over white (Go's color.GrayModel weights).
func TestRasterGrayMatchesRGBA(t *testing.T) {
	g := newGray(t, 100, 60)
	c, _ := NewRaster(100, 60, 1, color.RGBAModel)
	var bg Path
	bg.Rect(0, 0, 100, 60)
	c.Path(&bg, Style{Fill: color.White})
	for _, cv := range []Canvas{g, c} {
		var p Path
		p.Circle(30, 30, 17.3)
		cv.Path(&p, Style{Fill: color.RGBA{200, 40, 10, 255}, Stroke: color.Black, Width: 1.5})
		cv.Text(50, 40, "Tangential", TextStyle{Size: 12, Colour: color.RGBA{0, 0, 180, 255}})
	}
	maxd := 0.0
	for y := 0; y < 60; y++ {
		for x := 0; x < 100; x++ {
			want := color.GrayModel.Convert(c.Pixels().At(x, y)).(color.Gray).Y
			got := g.Pixels().(*image.Gray).GrayAt(x, y).Y
			maxd = math.Max(maxd, math.Abs(float64(got)-float64(want)))
		}
	}
	if maxd > 2 {
		t.Errorf("grey and RGBA differ by up to %v levels", maxd)
	}
}
