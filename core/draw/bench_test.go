package draw

import (
	"fmt"
	"image/color"
	"math"
	"math/rand/v2"
	"testing"
)

// squares draws n filled squares of side 10 mm at random angles and places
// (fixed seed) on a w x h mm page: the shape of a chart of slanted edges.
func squares(c Canvas, n int, w, h float64) {
	rng := rand.New(rand.NewPCG(1, 2))
	var p Path
	for i := 0; i < n; i++ {
		cx, cy := 10+rng.Float64()*(w-20), 10+rng.Float64()*(h-20)
		s, co := math.Sincos(rng.Float64() * math.Pi / 2)
		p.Reset()
		p.Polygon(cx-5*co+5*s, cy-5*s-5*co, cx+5*co+5*s, cy+5*s-5*co,
			cx+5*co-5*s, cy+5*s+5*co, cx-5*co-5*s, cy-5*s+5*co)
		c.Path(&p, Style{Fill: color.Black})
	}
}

// BenchmarkRasterSquares fills 200 tilted squares on a grey A4 page.
func BenchmarkRasterSquares(b *testing.B) {
	for _, dpi := range []float64{150, 300, 600} {
		b.Run(fmt.Sprintf("A4_%gdpi", dpi), func(b *testing.B) {
			r, err := NewRaster(210, 297, dpi/MMPerInch, color.GrayModel)
			if err != nil {
				b.Fatal(err)
			}
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				squares(r, 200, 210, 297)
			}
		})
	}
}

// BenchmarkRasterStrokes strokes 200 dashed and 200 solid lines on a grey
// A4 page at 300 dpi.
func BenchmarkRasterStrokes(b *testing.B) {
	r, err := NewRaster(210, 297, 300/MMPerInch, color.GrayModel)
	if err != nil {
		b.Fatal(err)
	}
	var p Path
	b.ReportAllocs()
	for b.Loop() {
		for i := 0; i < 200; i++ {
			y := 10 + float64(i)
			p.Reset()
			p.MoveTo(10, y)
			p.LineTo(200, y+20)
			r.Path(&p, Style{Stroke: color.Black, Width: 0.3, Dash: []float64{2, 1}})
			r.Path(&p, Style{Stroke: color.Black, Width: 0.2, Join: JoinRound})
		}
	}
}

// BenchmarkRasterText draws a 40-character label 100 times.
func BenchmarkRasterText(b *testing.B) {
	r, err := NewRaster(800, 600, 1, color.RGBAModel)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		for i := 0; i < 100; i++ {
			r.Text(10, 20+5*float64(i), "Sagittal MTF50 = 0.31 cycles/pixel at 12mm", TextStyle{Size: 12})
		}
	}
}

// BenchmarkPDFSquares writes an A4 PDF of 200 tilted squares, from NewPDF
// to Bytes.
func BenchmarkPDFSquares(b *testing.B) {
	for _, n := range []int{200, 2000} {
		b.Run(fmt.Sprint(n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				c, err := NewPDF(210, 297)
				if err != nil {
					b.Fatal(err)
				}
				squares(c, n, 210, 297)
				_ = c.Bytes()
			}
		})
	}
}

// BenchmarkSVGSquares writes an A4 SVG of 200 tilted squares.
func BenchmarkSVGSquares(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		c, err := NewSVG(210, 297, "mm")
		if err != nil {
			b.Fatal(err)
		}
		squares(c, 200, 210, 297)
		_ = c.Bytes()
	}
}
