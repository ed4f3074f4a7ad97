package field

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestShepardExact: the Shepard interpolant passes through every data
// point and is a weighted mean, so it stays within the data's range and
// reproduces a constant (Shepard 1968, section 2; Franke and Nielson 1980).
func TestShepardExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	var sites []mapSite
	for i := 0; i < 40; i++ {
		sites = append(sites, mapSite{1000 * rng.Float64(), 700 * rng.Float64(), 20 + 60*rng.Float64()})
	}
	const R = 300
	for i, s := range sites {
		if got := shepard(sites, s.x, s.y, R); got != s.v {
			t.Errorf("site %d: interpolant %v, want the datum %v exactly", i, got, s.v)
		}
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, s := range sites {
		lo, hi = math.Min(lo, s.v), math.Max(hi, s.v)
	}
	flat := make([]mapSite, len(sites))
	for i, s := range sites {
		flat[i] = mapSite{s.x, s.y, 42}
	}
	for k := 0; k < 200; k++ {
		x, y := 1000*rng.Float64(), 700*rng.Float64()
		v := shepard(sites, x, y, R)
		if !math.IsNaN(v) && (v < lo || v > hi) {
			t.Errorf("interpolant %v at (%g, %g) outside the data range [%v, %v]", v, x, y, lo, hi)
		}
		if c := shepard(flat, x, y, R); !math.IsNaN(c) && math.Abs(c-42) > 1e-12 {
			t.Errorf("constant data: interpolant %v at (%g, %g), want 42", c, x, y)
		}
	}
	// Beyond the radius of every site there is no value.
	if v := shepard(sites[:1], sites[0].x+1.001*R, sites[0].y, R); !math.IsNaN(v) {
		t.Errorf("beyond R: %v, want NaN", v)
	}
}

// TestShepardTwoPoints: halfway between two sites the weights are equal,
// so the value is their mean.
func TestShepardTwoPoints(t *testing.T) {
	sites := []mapSite{{0, 0, 10}, {100, 0, 30}}
	if got := shepard(sites, 50, 0, 400); math.Abs(got-20) > 1e-12 {
		t.Errorf("midpoint %v, want 20", got)
	}
}

// TestMapGrid checks the grid's shape for landscape and portrait frames and
// the mask far from the measurements.
func TestMapGrid(t *testing.T) {
	pts := func(x0, y0, x1, y1 float64, n int) []Point {
		var out []Point
		for j := 0; j < n; j++ {
			for i := 0; i < n; i++ {
				x, y := x0+(x1-x0)*float64(i)/float64(n-1), y0+(y1-y0)*float64(j)/float64(n-1)
				out = append(out, Point{X: x, Y: y, Orientation: Sagittal, MTF50: 0.2},
					Point{X: x + 5, Y: y, Orientation: Tangential, MTF50: 0.1})
			}
		}
		return out
	}
	for _, tc := range []struct {
		name       string
		w, h       int
		cols, rows int
	}{
		{"3:2 landscape", 6000, 4000, 24, 16},
		{"2:3 portrait", 4000, 6000, 16, 24},
		{"4:3", 4000, 3000, 24, 18},
		{"square", 1000, 1000, 24, 24},
	} {
		geo := NewGeometry(tc.w, tc.h, 4)
		m := mtf50Map(geo, pts(0, 0, float64(tc.w), float64(tc.h), 8))
		if m.Cols != tc.cols || m.Rows != tc.rows || len(m.MTF50LPMM) != tc.cols*tc.rows {
			t.Errorf("%s: grid %d x %d (%d cells), want %d x %d", tc.name, m.Cols, m.Rows, len(m.MTF50LPMM), tc.cols, tc.rows)
		}
		for i, v := range m.MTF50LPMM {
			// Sagittal 0.2 and tangential 0.1 cy/px at 4 um: 50 and 25
			// lp/mm, mean 37.5.
			if math.Abs(float64(v)-37.5) > 1e-9 {
				t.Errorf("%s: cell %d = %v, want 37.5 (mean of the orientations)", tc.name, i, v)
				break
			}
		}
	}
	// Measurements in the top-left quarter only: far cells are masked.
	geo := NewGeometry(6000, 4000, 4)
	m := mtf50Map(geo, pts(100, 100, 1500, 1000, 6))
	if !math.IsNaN(float64(m.MTF50LPMM[len(m.MTF50LPMM)-1])) {
		t.Errorf("bottom-right cell %v, want masked", m.MTF50LPMM[len(m.MTF50LPMM)-1])
	}
	if math.IsNaN(float64(m.MTF50LPMM[m.Cols+1])) {
		t.Error("a cell among the measurements is masked")
	}
	if mtf50Map(geo, nil) != nil {
		t.Error("no measurements should give no map")
	}
}
