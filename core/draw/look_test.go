package draw

import (
	"bytes"
	"image"
	"image/color"
	"math"
	"os"
	"path/filepath"
	"testing"

	"sagitta/core/internal/look"
)

// testPage draws a page of w x h user units (meant for millimetres) that
// exercises every feature: filled and stroked rectangles at several angles,
// circles, dashed lines with each cap, joins, text at several sizes and
// angles, and an embedded grey gradient image.
func testPage(c Canvas, w, h float64) {
	black := color.Gray{0}
	// Frame and a 100 mm bar with a ruler.
	var p Path
	p.Rect(5, 5, w-10, h-10)
	c.Path(&p, Style{Stroke: black, Width: 0.3})
	p.Reset()
	p.Rect(20, 20, 100, 8)
	c.Path(&p, Style{Fill: black})
	for i := 0; i <= 10; i++ {
		p.Reset()
		p.MoveTo(20+10*float64(i), 30)
		p.LineTo(20+10*float64(i), 34)
		c.Path(&p, Style{Stroke: black, Width: 0.2})
	}
	c.Text(70, 40, "100 mm", TextStyle{Size: 4, Anchor: AnchorMiddle})

	// Rectangles at several angles.
	for i, a := range []float64{0, 5, 15, 30, 45, 60} {
		cx, cy := 30+float64(i)*28, 60.0
		s, co := math.Sincos(a * math.Pi / 180)
		p.Reset()
		corner := func(u, v float64) (float64, float64) { return cx + u*co - v*s, cy + u*s + v*co }
		x0, y0 := corner(-9, -9)
		x1, y1 := corner(9, -9)
		x2, y2 := corner(9, 9)
		x3, y3 := corner(-9, 9)
		p.Polygon(x0, y0, x1, y1, x2, y2, x3, y3)
		c.Path(&p, Style{Fill: color.Gray{40}})
		c.Text(cx, cy+16, fmtFloat(a)+"°", TextStyle{Size: 3.5, Anchor: AnchorMiddle})
	}

	// Circles: filled, stroked, translucent overlap.
	p.Reset()
	p.Circle(40, 100, 12)
	c.Path(&p, Style{Fill: color.RGBA{200, 30, 30, 255}})
	p.Reset()
	p.Circle(70, 100, 12)
	c.Path(&p, Style{Stroke: color.RGBA{30, 30, 200, 255}, Width: 1.5})
	p.Reset()
	p.Circle(95, 100, 12)
	c.Path(&p, Style{Fill: color.NRGBA{0, 150, 0, 128}, Stroke: black, Width: 0.5})
	p.Reset()
	p.Circle(110, 100, 12)
	c.Path(&p, Style{Fill: color.NRGBA{0, 0, 200, 128}})
	// A ring by the even-odd rule.
	p.Reset()
	p.Circle(150, 100, 12)
	p.Circle(150, 100, 7)
	c.Path(&p, Style{Fill: color.Gray{90}, EvenOdd: true})

	// Dashed lines with each cap, and joins.
	for i, cp := range []Cap{CapButt, CapRound, CapSquare} {
		y := 125 + float64(i)*8
		p.Reset()
		p.MoveTo(20, y)
		p.LineTo(120, y)
		c.Path(&p, Style{Stroke: black, Width: 2, Dash: []float64{6, 4}, Cap: cp})
	}
	p.Reset()
	p.MoveTo(20, 152)
	p.LineTo(120, 152)
	c.Path(&p, Style{Stroke: black, Width: 1.2, Dash: []float64{0, 3}, Cap: CapRound})
	for i, j := range []Join{JoinMiter, JoinRound, JoinBevel} {
		x := 135 + float64(i)*20
		p.Reset()
		p.MoveTo(x, 150)
		p.LineTo(x+7, 125)
		p.LineTo(x+14, 150)
		c.Path(&p, Style{Stroke: color.RGBA{120, 0, 120, 255}, Width: 3, Join: j})
	}
	p.Reset()
	p.MoveTo(20, 160)
	p.CubicTo(50, 140, 80, 190, 120, 160)
	c.Path(&p, Style{Stroke: color.RGBA{0, 110, 160, 255}, Width: 0.8, Dash: []float64{3, 1, 0.5, 1}})

	// Text at several sizes, bold, rotated, escaped.
	y := 180.0
	for _, sz := range []float64{2, 3, 4, 6, 9} {
		c.Text(20, y, "MTF 0.5 at 42 lp/mm (Size "+fmtFloat(sz)+")", TextStyle{Size: sz})
		y += sz * 1.5
	}
	c.Text(20, y+2, "Bold <&> \"quotes\" (parens) \\ µm ±5° – Ünïcödé ☺", TextStyle{Size: 4, Bold: true, Colour: color.RGBA{160, 0, 0, 255}})
	c.Text(w-12, 230, "rotated −90: reads bottom to top", TextStyle{Size: 4, Angle: -90, Anchor: AnchorEnd})
	c.Text(w-30, 180, "end-anchored", TextStyle{Size: 4, Anchor: AnchorEnd})
	c.Text(150, 200, "30°", TextStyle{Size: 5, Angle: 30})

	// A grey gradient image, 256 x 16 samples over 128 x 16 mm.
	g := image.NewGray(image.Rect(0, 0, 256, 16))
	for x := 0; x < 256; x++ {
		for yy := 0; yy < 16; yy++ {
			g.SetGray(x, yy, color.Gray{uint8(x)})
		}
	}
	c.Image(20, 250, 128, 16, g)
	// A small colour image with transparency, upscaled.
	rgba := image.NewNRGBA(image.Rect(0, 0, 4, 4))
	for i := 0; i < 16; i++ {
		rgba.SetNRGBA(i%4, i/4, color.NRGBA{uint8(60 * (i % 4)), uint8(60 * (i / 4)), 200, uint8(255 - 12*i)})
	}
	c.Image(160, 245, 24, 24, rgba)
}

// TestLook writes the test page as PDF, SVG and PNG into
// $SAGITTA_LOOK/draw (for looking at by eye); it is skipped otherwise.
func TestLook(t *testing.T) {
	dir := look.Need(t, "draw")
	const w, h = 210, 297
	pdf, err := NewPDF(w, h)
	if err != nil {
		t.Fatal(err)
	}
	testPage(pdf, w, h)
	svg, err := NewSVG(w, h, "mm")
	if err != nil {
		t.Fatal(err)
	}
	svg.SetTitle("Sagitta drawing test page")
	testPage(svg, w, h)
	r, err := NewRaster(w, h, 150/MMPerInch, color.RGBAModel)
	if err != nil {
		t.Fatal(err)
	}
	white := Style{Fill: color.White}
	var bg Path
	bg.Rect(0, 0, w, h)
	r.Path(&bg, white)
	testPage(r, w, h)
	var png bytes.Buffer
	if err := EncodePNG(&png, r.Pixels(), 150); err != nil {
		t.Fatal(err)
	}
	for name, b := range map[string][]byte{"page.pdf": pdf.Bytes(), "page.svg": svg.Bytes(), "page.png": png.Bytes()} {
		if err := os.WriteFile(filepath.Join(dir, name), b, 0o644); err != nil {
			t.Fatal(err)
		}
	}
}
