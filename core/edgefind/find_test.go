package edgefind

import (
	"fmt"
	"math"
	"testing"

	"sagitta/core/plane"
	"sagitta/core/sim/simcam"
)

func render(t *testing.T, w, h int, s simcam.Scene, sigma float64) *plane.Plane {
	t.Helper()
	cam := simcam.Camera{W: w, H: h, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: sigma, Sigma2: sigma}}}
	p, err := cam.Render(s)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

func TestSingleEdge(t *testing.T) {
	p := render(t, 400, 300, simcam.HalfPlaneScene(400, 300, 8, 0.05, 0.6), 1)
	cands, _ := Edges(p, Options{})
	if len(cands) == 0 {
		t.Fatal("no candidate")
	}
	for _, c := range cands {
		r := c.Region
		// The edge line runs at 98 degrees through (200, 150).
		d := math.Abs((r.X-200)*math.Cos(8*math.Pi/180) + (r.Y-150)*math.Sin(8*math.Pi/180))
		if d > 2 {
			t.Errorf("region centre %.1f px off the edge", d)
		}
		if a := math.Abs(math.Mod(r.AngleDeg-98+720, 180)); a > 1 && a < 179 {
			t.Errorf("region angle %.2f, want 98 (mod 180)", r.AngleDeg)
		}
	}
}

func TestSquaresClearOfCorners(t *testing.T) {
	// Two squares close together: every region must stay clear of the other
	// square and of its own corners.
	s := simcam.Scene{Background: 0.7, Polygons: []simcam.Polygon{
		simcam.Square(150, 150, 160, 5, 0.05),
		simcam.Square(380, 160, 160, -7, 0.05),
	}}
	p := render(t, 540, 320, s, 1.2)
	cands, _ := Edges(p, Options{})
	if len(cands) != 8 {
		t.Errorf("%d candidates, want 8 (four sides of two squares)", len(cands))
	}
	for _, c := range cands {
		for _, q := range c.Region.Corners() {
			// No corner of a region may fall inside the other square's
			// bounding circle region beyond its own side: check the region
			// does not reach within 5 px of a square corner.
			for _, poly := range s.Polygons {
				for _, v := range poly.Pts {
					if math.Hypot(q[0]-v[0], q[1]-v[1]) < 5 {
						t.Errorf("region corner (%.0f,%.0f) touches a square corner", q[0], q[1])
					}
				}
			}
		}
	}
}

func TestFlat(t *testing.T) {
	p := plane.New(300, 200)
	for i := range p.Pix {
		p.Pix[i] = 0.4
	}
	if c, r := Edges(p, Options{}); len(c) != 0 || len(r) != 0 {
		t.Errorf("flat image gave %d candidates, %d rejects", len(c), len(r))
	}
}

func TestLightOnDarkAndVignetting(t *testing.T) {
	// Light squares on a dark background, lit unevenly: the light falls to
	// a quarter towards the corners (a strong vignette), so the squares in
	// the corners are barely brighter than the background in the middle
	// and a single global threshold would not separate them everywhere;
	// the local one must.
	w, h := 900, 600
	s := simcam.Scene{Background: 0.08}
	for j := 0; j < 3; j++ {
		for i := 0; i < 4; i++ {
			s.Polygons = append(s.Polygons, simcam.Square(120+float64(i)*220, 110+float64(j)*190, 110, 7+float64(i+j)*9, 0.8))
		}
	}
	p := render(t, w, h, s, 1)
	for y := 0; y < h; y++ {
		for x := 0; x < w; x++ {
			r2 := (math.Pow(float64(x)-450, 2) + math.Pow(float64(y)-300, 2)) / (540 * 540)
			p.Pix[y*w+x] *= float32(1 / (1 + 3*r2)) // falls to 1/4 at the corners
		}
	}
	cands, rej := Edges(p, Options{})
	if len(cands) != 48 {
		t.Errorf("%d candidates, want 48 (4 sides x 12 squares); rejects %v", len(cands), rej)
	}
}

func TestRejectReasons(t *testing.T) {
	s := simcam.Scene{Background: 0.7, Polygons: []simcam.Polygon{
		// A tiny square: its sides are too short.
		simcam.Square(60, 60, 30, 5, 0.05),
		// Two squares 10 px apart: the facing sides are crowded.
		simcam.Square(250, 100, 120, 0, 0.05),
		simcam.Square(380, 100, 120, 0, 0.05),
	}}
	p := render(t, 520, 220, s, 1)
	_, rej := Edges(p, Options{})
	reasons := map[string]int{}
	for _, r := range rej {
		reasons[r.Reason+" / "+string(r.Code)]++
	}
	// Each reason comes with its code (core/note).
	if k := ReasonShort + " / too-short"; reasons[k] == 0 {
		t.Errorf("no %q among %v", k, rej)
	}
	if k := ReasonCrowded + " / crowded"; reasons[k] == 0 {
		t.Errorf("no %q among %v", k, rej)
	}
}

func BenchmarkEdges(b *testing.B) {
	for _, size := range []struct{ w, h int }{{1500, 1000}, {6000, 4000}} {
		s := simcam.Scene{Background: 0.7}
		for j := 0; j < 6; j++ {
			for i := 0; i < 9; i++ {
				cx := (float64(i) + 0.5) * float64(size.w) / 9
				cy := (float64(j) + 0.5) * float64(size.h) / 6
				s.Polygons = append(s.Polygons, simcam.Square(cx, cy, 0.3*float64(size.h)/6*2, float64(i*7+j*3), 0.05))
			}
		}
		cam := simcam.Camera{W: size.w, H: size.h, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 1, Sigma2: 1}}}
		p, err := cam.Render(s)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("%dx%d", size.w, size.h), func(b *testing.B) {
			b.ReportAllocs()
			for i := 0; i < b.N; i++ {
				Edges(p, Options{})
			}
		})
	}
}
