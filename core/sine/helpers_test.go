package sine

import (
	"image"
	"math"
	"testing"

	"sagitta/core/plane"
	"sagitta/core/sim/simcam"
)

// render returns the noise-free linear image of scene s through lens l.
func render(t testing.TB, w, h int, l simcam.Lens, s simcam.Scene) *plane.Plane {
	t.Helper()
	p, err := (&simcam.Camera{W: w, H: h, Lens: l}).Render(s)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// capture returns the linear image of scene s through camera c, whose
// encoding must be Linear16 (code = round(65535 v), so v = code / 65535).
func capture(t testing.TB, c simcam.Camera, s simcam.Scene) *plane.Plane {
	t.Helper()
	if c.Encoding != simcam.Linear16 {
		t.Fatal("capture needs Linear16")
	}
	img := c.Capture(s).(*image.Gray16)
	p := plane.New(c.W, c.H)
	for y := range c.H {
		for x := range c.W {
			p.Set(x, y, float32(float64(img.Gray16At(x, y).Y)/65535))
		}
	}
	return p
}

// maxErr returns the largest |got - want(f)| for frequencies in [lo, hi]
// and the frequency where it occurs.
func maxErr(freq, got []float64, lo, hi float64, want func(f float64) float64) (float64, float64) {
	worst, at := 0.0, math.NaN()
	for i, f := range freq {
		if f < lo-1e-9 || f > hi+1e-9 {
			continue
		}
		if d := math.Abs(got[i] - want(f)); d > worst || math.IsNaN(d) {
			worst, at = d, f
			if math.IsNaN(d) {
				return math.Inf(1), f
			}
		}
	}
	return worst, at
}
