package find

import (
	"math"
	"testing"

	"sagitta/core/plane"
	"sagitta/core/simcam"
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
