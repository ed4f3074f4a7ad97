package field

import (
	"math"
	"testing"
)

// TestZonesHandWorked checks the zone medians against values worked by
// hand: thirds of a 3 mm corner height (so the zones are [0,1), [1,2) and
// [2,3] mm; heights on a boundary belong to the outer zone), the median of
// an even count the mean of the middle two (common practice), values that
// were not measured left out.
func TestZonesHandWorked(t *testing.T) {
	nan := math.NaN()
	pt := func(h float64, o Orientation, a, b float64) Point {
		return Point{HeightMM: h, Orientation: o, MTF: []float64{a, b}}
	}
	pts := []Point{
		pt(0.5, Sagittal, 0.8, 0.5),
		pt(0.9, Tangential, 0.6, 0.3),
		pt(0.2, Mixed, 0.7, nan),
		pt(1.0, Sagittal, 0.5, 0.2),
		pt(1.5, Tangential, 0.4, 0.1),
		pt(2.0, Sagittal, 0.3, 0.1),
		pt(3.0, Tangential, 0.2, 0.05),
		pt(2.5, Tangential, 0.1, 0),
	}
	z := zones(3, 1, pts, 2)
	want := []struct {
		name          string
		from, to      float64
		all, sag, tan [2]float64
		n             [2]int
	}{
		{"centre", 0, 1, [2]float64{0.7, 0.4}, [2]float64{0.8, 0.5}, [2]float64{0.6, 0.3}, [2]int{3, 2}},
		{"mid-field", 1, 2, [2]float64{0.45, 0.15}, [2]float64{0.5, 0.2}, [2]float64{0.4, 0.1}, [2]int{2, 2}},
		{"corner", 2, 3, [2]float64{0.2, 0.05}, [2]float64{0.3, 0.1}, [2]float64{0.15, 0.025}, [2]int{3, 3}},
	}
	if len(z) != 3 {
		t.Fatalf("%d zones", len(z))
	}
	for i, w := range want {
		g := z[i]
		if g.Name != w.name || math.Abs(g.FromMM-w.from) > 1e-12 || math.Abs(g.ToMM-w.to) > 1e-12 {
			t.Errorf("zone %d: %s [%g, %g], want %s [%g, %g]", i, g.Name, g.FromMM, g.ToMM, w.name, w.from, w.to)
		}
		for k := 0; k < 2; k++ {
			for _, c := range []struct {
				what      string
				got, want float64
			}{{"all", float64(g.All[k]), w.all[k]}, {"sagittal", float64(g.Sagittal[k]), w.sag[k]}, {"tangential", float64(g.Tangential[k]), w.tan[k]}} {
				if math.Abs(c.got-c.want) > 1e-12 {
					t.Errorf("%s, %s, frequency %d: %g, want %g", g.Name, c.what, k, c.got, c.want)
				}
			}
			if g.N[k] != w.n[k] {
				t.Errorf("%s, frequency %d: %d points, want %d", g.Name, k, g.N[k], w.n[k])
			}
		}
	}
	// An empty zone has no median (null in JSON).
	e := zones(3, 1, nil, 1)
	if !math.IsNaN(float64(e[0].All[0])) || e[0].N[0] != 0 {
		t.Errorf("empty zone: %v, %d", e[0].All[0], e[0].N[0])
	}
}

// TestSummaryZones: Summarise fills the zones from its points, with the
// frame's corner height.
func TestSummaryZones(t *testing.T) {
	geo := NewGeometry(300, 400, 10) // corner at 250 px = 2.5 mm
	var pts []Point
	for i := 0; i < 12; i++ {
		x := 150 + 18*float64(i)
		pts = append(pts, Point{ID: i + 1, Kind: "edge", X: x, Y: 200, HeightMM: geo.HeightMM(x, 200), Orientation: Sagittal, MTF: []float64{0.9 - 0.05*float64(i)}, MTF50: 0.2})
	}
	s, err := Summarise(geo, pts, []float64{10})
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Zones) != 3 || math.Abs(s.Zones[2].ToMM-2.5) > 1e-9 {
		t.Fatalf("zones %+v", s.Zones)
	}
	// Heights 0, 0.18, ..., 1.98 mm: 0..0.72 in the centre (5 points, median
	// 0.9-0.05*2 = 0.8), 0.9..1.62 mid-field (5 points, median 0.55), 1.8
	// and 1.98 in the corner (median 0.375).
	for i, w := range []float64{0.8, 0.55, 0.375} {
		if g := float64(s.Zones[i].All[0]); math.Abs(g-w) > 1e-9 {
			t.Errorf("%s: %g, want %g", s.Zones[i].Name, g, w)
		}
	}
}

// TestZonesMTF50AndSE: the zone's median MTF50 in lp/mm and the standard
// error of a median, sqrt(pi/2) s / sqrt(n) (Kendall and Stuart, The
// Advanced Theory of Statistics, vol. 1; common practice), worked by hand:
// MTF50 0.1, 0.2, 0.3 cy/px at 5 um are 20, 40, 60 lp/mm, median 40,
// s = 20, SE = 1.25331 x 20 / sqrt(3) = 14.472.
func TestZonesMTF50AndSE(t *testing.T) {
	var pts []Point
	for _, v := range []float64{0.1, 0.2, 0.3} {
		pts = append(pts, Point{HeightMM: 0.5, Orientation: Sagittal, MTF: []float64{v}, MTF50: v})
	}
	pts = append(pts, Point{HeightMM: 0.6, Orientation: Tangential, MTF: []float64{0.5}, MTF50: math.NaN()})
	z := zones(3, 5, pts, 1)
	if g := float64(z[0].MTF50LPMM); math.Abs(g-40) > 1e-9 || z[0].MTF50N != 3 {
		t.Errorf("centre MTF50 %g lp/mm from %d, want 40 from 3", g, z[0].MTF50N)
	}
	if g := float64(z[0].MTF50SE); math.Abs(g-14.472) > 0.001 {
		t.Errorf("centre MTF50 standard error %g, want 14.472", g)
	}
	// MTF 0.1, 0.2, 0.3, 0.5: mean 0.275, s = 0.17078, SE = 1.25331 x 0.17078 / 2 = 0.10702.
	if g := float64(z[0].AllSE[0]); math.Abs(g-0.10702) > 0.00001 {
		t.Errorf("centre MTF standard error %g, want 0.10702", g)
	}
	if !math.IsNaN(float64(z[1].MTF50SE)) || z[1].MTF50N != 0 {
		t.Errorf("empty mid-field: %v from %d", z[1].MTF50SE, z[1].MTF50N)
	}
}
