package decode

import (
	"math"
	"runtime"
	"slices"
	"testing"

	"sagitta/core/plane"
)

// TestFittedMonotone: the fitted curve passes through its points, is
// monotone between them even where a plain cubic spline would overshoot
// (Fritsch and Carlson's condition, SIAM J. Numer. Anal. 17 (1980)), pools
// points out of order (pool-adjacent-violators), and keeps clipped samples
// at the top of the file's values.
func TestFittedMonotone(t *testing.T) {
	// A step-like set of points: a natural cubic spline overshoots here.
	x := []float64{0, 0.1, 0.2, 0.3, 0.8, 0.9, 1}
	y := []float64{0, 0.01, 0.02, 0.03, 0.97, 0.98, 1}
	f, err := Fit(x, y)
	if err != nil {
		t.Fatal(err)
	}
	for i := range x {
		if math.Abs(f.At(x[i])-y[i]) > 1e-12 {
			t.Errorf("At(%g) = %g, want %g", x[i], f.At(x[i]), y[i])
		}
	}
	prev := math.Inf(-1)
	for v := 0.0; v <= 1; v += 0.001 {
		c := f.At(v)
		if c < prev-1e-12 {
			t.Fatalf("not monotone at %g: %g after %g", v, c, prev)
		}
		prev = c
	}
	// Points out of order in x (noise) are pooled.
	g, err := Fit([]float64{0, 0.3, 0.25, 0.6, 1}, []float64{0, 0.2, 0.3, 0.5, 1})
	if err != nil {
		t.Fatal(err)
	}
	if len(g.X) != 4 || math.Abs(g.X[1]-0.275) > 1e-12 || math.Abs(g.Y[1]-0.25) > 1e-12 {
		t.Errorf("pooled points %v %v", g.X, g.Y)
	}
	// Clipped samples stay clipped; the rest stay below the clip level.
	p := plane.New(3, 1)
	p.Pix[0], p.Pix[1], p.Pix[2] = 1, 0.99, 0.5
	h, _ := Fit([]float64{0, 0.5, 0.9}, []float64{0, 0.7, 1.2})
	h.Apply(p, 1)
	if p.Pix[0] != 1 || p.Pix[1] >= plane.ClipLevel || math.Abs(float64(p.Pix[2])-0.7) > 1e-3 {
		t.Errorf("applied: %v", p.Pix)
	}
	if _, err := Fit([]float64{0, 1}, []float64{0, 1}); err == nil {
		t.Error("two points fitted")
	}
}

// TestApplySplitRowsSame: the curve applied over row ranges in parallel
// gives the same plane, bit for bit, as on one CPU (each value is mapped
// alone; the largest value does not depend on the order it is found in).
// The plane is large enough to be split; with -race it also checks that the
// ranges share nothing.
func TestApplySplitRowsSame(t *testing.T) {
	f, err := Fit([]float64{0, 0.2, 0.5, 0.9}, []float64{0, 0.15, 0.55, 1.1})
	if err != nil {
		t.Fatal(err)
	}
	fresh := func() *plane.Plane {
		p := plane.New(700, 500)
		for i := range p.Pix {
			p.Pix[i] = float32(i%997) / 990
		}
		return p
	}
	a, b := fresh(), fresh()
	func() {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(1))
		f.Apply(a, 0.9)
	}()
	func() {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(4))
		f.Apply(b, 0.9)
	}()
	if !slices.Equal(a.Pix, b.Pix) {
		t.Error("the planes differ between one CPU and several")
	}
}
