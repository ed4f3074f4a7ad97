package sine

import (
	"image/color"
	"math"
	"testing"

	"sagitta/core/draw"
	"sagitta/core/plane"
	"sagitta/core/sim/simcam"
)

// TestFind renders a photo with two stars, a grating and some slanted
// squares, and checks that Find reports exactly the stars (centres within
// 1 px) and the grating, and nothing for the squares.
func TestFind(t *testing.T) {
	if testing.Short() {
		t.Skip("heavy")
	}
	stars := []simcam.Star{
		{X: 200.4, Y: 210.7, Radius: 130, Cycles: 36, Mean: 0.4, Amplitude: 0.3},
		{X: 650, Y: 480, Radius: 110, Cycles: 60, Mean: 0.45, Amplitude: 0.32, PhaseDeg: 11},
	}
	gr := simcam.Grating{Corners: alignedRect(620, 170, 200, 120, 30), FreqCyPx: 0.12, DirectionDeg: 30, Mean: 0.42, Amplitude: 0.3}
	sc := simcam.Scene{Background: 0.7, Stars: stars, Gratings: []simcam.Grating{gr},
		Polygons: []simcam.Polygon{simcam.Square(120, 560, 110, 5, 0.1), simcam.Square(330, 560, 90, -8, 0.12),
			simcam.Square(420, 380, 70, 12, 0.15)}}
	p := render(t, 900, 700, simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.8, Sigma2: 0.8}}, sc)
	cands := Find(p, FindOptions{})
	var nStar, nGrating int
	for _, c := range cands {
		switch c.Kind {
		case KindStar:
			nStar++
			found := false
			for _, s := range stars {
				if math.Hypot(c.X-s.X, c.Y-s.Y) < 1 {
					found = true
				}
			}
			if !found {
				t.Errorf("star candidate at (%.1f, %.1f) is no star", c.X, c.Y)
			}
		case KindGrating:
			nGrating++
			if !inside(gr.Corners, c.X, c.Y) || axisDist(c.DirectionDeg, gr.DirectionDeg) > 3 {
				t.Errorf("grating candidate at (%.1f, %.1f) direction %.1f is not the grating", c.X, c.Y, c.DirectionDeg)
			}
		}
	}
	if nStar != 2 || nGrating != 1 {
		t.Errorf("found %d stars and %d gratings, want 2 and 1: %+v", nStar, nGrating, cands)
	}
}

// TestFindNothing: a chart-like page of slanted squares with text labels
// (drawn with core/draw) holds no sine pattern, and Find says so.
func TestFindNothing(t *testing.T) {
	c, err := draw.NewRaster(1200, 800, 1, color.GrayModel)
	if err != nil {
		t.Fatal(err)
	}
	var path draw.Path
	for i := range 4 {
		for j := range 2 {
			cx, cy := 160+float64(i)*280, 200+float64(j)*360
			s, co := math.Sincos((5 + 4*float64(i+j)) * math.Pi / 180)
			path.Reset()
			var pts []float64
			for _, q := range [4][2]float64{{-70, -70}, {70, -70}, {70, 70}, {-70, 70}} {
				pts = append(pts, cx+q[0]*co-q[1]*s, cy+q[0]*s+q[1]*co)
			}
			path.Polygon(pts...)
			c.Path(&path, draw.Style{Fill: color.Gray{25}})
			c.Text(cx, cy+120, "Sagitta field 3: 10 and 30 lp/mm", draw.TextStyle{Size: 12 + 4*float64(i)})
		}
	}
	img := c.Pixels().(interface{ GrayAt(x, y int) color.Gray })
	p := plane.New(1200, 800)
	for y := range p.H {
		for x := range p.W {
			p.Set(x, y, float32(math.Pow(float64(img.GrayAt(x, y).Y)/255, 2.2)))
		}
	}
	if cands := Find(p, FindOptions{}); len(cands) != 0 {
		t.Errorf("found %d patterns on a page of squares and text: %+v", len(cands), cands)
	}
}

// TestBoxMean compares the running-sum box mean with the plain mean of the
// window clipped to the image, for rows narrower and wider than the window.
func TestBoxMean(t *testing.T) {
	for _, wh := range [][2]int{{5, 4}, {13, 9}, {14, 3}, {40, 31}} {
		w, h, rad := wh[0], wh[1], 6
		src := make([]float32, w*h)
		for i := range src {
			src[i] = float32((i*7919)%101) / 101
		}
		dst, tmp := make([]float32, w*h), make([]float32, w*h)
		boxMean(dst, src, tmp, w, h, rad)
		for y := range h {
			for x := range w {
				var s float64
				var n int
				for yy := max(0, y-rad); yy <= min(h-1, y+rad); yy++ {
					for xx := max(0, x-rad); xx <= min(w-1, x+rad); xx++ {
						s += float64(src[yy*w+xx])
						n++
					}
				}
				if d := float64(dst[y*w+x]) - s/float64(n); d > 1e-5 || d < -1e-5 {
					t.Fatalf("%dx%d at (%d, %d): %g, want %g", w, h, x, y, dst[y*w+x], s/float64(n))
				}
			}
		}
	}
}
