package chart

import (
	"math"
	"testing"
)

// TestWedgeClear: the step wedge keeps the clearances the design note
// promises between targets: 0.021 chart units from every square (room for
// core/edgefind's regions) and 0.0364 from every sine pattern and mark,
// on every design; its 12 steps fall evenly in log from WedgeHi to WedgeLo.
func TestWedgeClear(t *testing.T) {
	for _, a := range []string{"3:2", "4:3", "16:9", "1:1"} {
		for _, portrait := range []bool{false, true} {
			d, err := NewDesign(Code{Aspect: a, Portrait: portrait})
			if err != nil {
				t.Fatal(err)
			}
			w := d.Wedge
			if len(w.Steps) < 12 {
				t.Fatalf("%s: %d steps", a, len(w.Steps))
			}
			for k := 1; k < len(w.Steps); k++ {
				if r := w.Steps[k] / w.Steps[k-1]; math.Abs(r-math.Pow(WedgeLo/WedgeHi, 1/11.0)) > 1e-12 {
					t.Errorf("%s: step ratio %g", a, r)
				}
			}
			// Distance from a point to the wedge's rectangle.
			dist := func(x, y float64) float64 {
				dx := math.Max(math.Abs(x-w.X)-w.W/2, 0)
				dy := math.Max(math.Abs(y-w.Y)-w.H/2, 0)
				return math.Hypot(dx, dy)
			}
			minSq := math.Inf(1)
			for _, q := range d.Squares {
				cs := q.Corners()
				for i := range 4 {
					// Sample each side finely.
					for s := 0.0; s <= 1; s += 0.01 {
						x := cs[i][0] + s*(cs[(i+1)%4][0]-cs[i][0])
						y := cs[i][1] + s*(cs[(i+1)%4][1]-cs[i][1])
						minSq = math.Min(minSq, dist(x, y))
					}
				}
			}
			minSine := math.Inf(1)
			for _, s := range d.Stars {
				minSine = math.Min(minSine, dist(s.X, s.Y)-s.Radius)
			}
			for _, g := range d.Gratings {
				dx := math.Max(math.Abs(g.X-w.X)-(g.W+w.W)/2, 0)
				dy := math.Max(math.Abs(g.Y-w.Y)-(g.H+w.H)/2, 0)
				minSine = math.Min(minSine, math.Hypot(dx, dy))
			}
			for _, m := range d.Marks {
				minSine = math.Min(minSine, dist(m.X, m.Y)-m.R)
			}
			t.Logf("%s portrait=%v: wedge %.3f x %.3f; clear of squares by %.4f, of patterns and marks by %.4f", a, portrait, w.W, w.H, minSq, minSine)
			if minSq < 0.021 || minSine < 0.0364 {
				t.Errorf("%s portrait=%v: wedge too close (squares %.4f, patterns/marks %.4f)", a, portrait, minSq, minSine)
			}
		}
	}
}
