package fringe

import (
	"math"
	"testing"

	"sagitta/core/note"
)

// frame is a 6000 x 4000 px frame of 6 um pixels (36 x 24 mm; corner
// 21.63 mm, common practice).
var frame = Frame{CentreX: 3000, CentreY: 2000, PitchUM: 6, CornerMM: math.Hypot(18, 12)}

// edgesOf returns edges on a ring of directions at heights spread over the
// frame, each with its normal turned by turnDeg from the radius, whose red
// and blue offsets along the normal are the radial displacements rg(u)
// and bg(u) (u = height / corner) times the cosine of the turn.
func edgesOf(n int, turnDeg float64, rg, bg func(u float64) float64) []Edge {
	var out []Edge
	for i := range n {
		u := 0.05 + 0.9*float64(i)/float64(n-1)
		phi := float64(i) * 137.5 // spread the directions
		r := u * frame.CornerMM * 1000 / frame.PitchUM
		s, c := math.Sincos(phi * math.Pi / 180)
		cosT := math.Cos(turnDeg * math.Pi / 180)
		out = append(out, Edge{ID: i + 1, XPx: frame.CentreX + r*c, YPx: frame.CentreY + r*s, NormalDeg: phi + turnDeg,
			RG: rg(u) * cosT, BG: bg(u) * cosT, RGSE: 0.01, BGSE: 0.01})
	}
	return out
}

// TestCurveExact: displacements that follow the model a1 u + a3 u^3
// exactly are fitted exactly (linear least squares reproduces data in its
// model space; any numerical text), whether the normals lie along the
// radius or 15 degrees off it (the cosine is undone), and edges 45 degrees
// off are left out.
func TestCurveExact(t *testing.T) {
	rg := func(u float64) float64 { return 0.9*u + 0.4*u*u*u }
	bg := func(u float64) float64 { return -1.1 * u }
	edges := append(edgesOf(30, 0, rg, bg), edgesOf(12, 15, rg, bg)...)
	edges = append(edges, edgesOf(10, 45, func(float64) float64 { return 5 }, func(float64) float64 { return 5 })...)
	res := Analyse(edges, frame)
	if res.Used != 42 || res.Across != 10 {
		t.Fatalf("used %d, across %d; want 42 and 10", res.Used, res.Across)
	}
	for _, c := range res.Curves {
		want := rg
		if c.Pair == "B-G" {
			want = bg
		}
		for i, h := range c.HeightMM {
			if d := math.Abs(c.Px[i] - want(h/frame.CornerMM)); d > 1e-9 {
				t.Fatalf("%s at %.2f mm: %.6f px, want %.6f", c.Pair, h, c.Px[i], want(h/frame.CornerMM))
			}
		}
	}
	top := rg(0.95)
	if res.Pair != "R-G" && res.Pair != "B-G" || math.Abs(math.Abs(res.MaxPx)-math.Max(top, 1.1*0.95)) > 1e-9 {
		t.Errorf("largest %s %.4f px, want %.4f", res.Pair, res.MaxPx, top)
	}
	if math.Abs(res.MaxUM-res.MaxPx*frame.PitchUM) > 1e-9 {
		t.Errorf("%.4f um for %.4f px at 6 um", res.MaxUM, res.MaxPx)
	}
}

// TestVerdicts: the verdict follows the thresholds stated in the package
// doc (Sagitta's choice): under 0.5 px barely visible, 0.5 to 1.5 visible,
// over 1.5 strong; too few edges, not measured; an outlier is left out.
func TestVerdicts(t *testing.T) {
	for _, tc := range []struct {
		name string
		at1  float64 // displacement at the corner, px
		n    int
		want note.Code
	}{
		{"barely", 0.4, 20, note.CABarely},
		{"visible", 1.0, 20, note.CAVisible},
		{"strong", 2.0, 20, note.CAStrong},
		{"few", 2.0, 4, note.CAFewEdges},
	} {
		lin := func(u float64) float64 { return tc.at1 * u }
		res := Analyse(edgesOf(tc.n, 0, lin, func(float64) float64 { return 0 }), frame)
		if res.Code != tc.want {
			t.Errorf("%s: %s (%s), want %s", tc.name, res.Code, res.Text, tc.want)
		}
	}
	edges := edgesOf(20, 0, func(u float64) float64 { return 0.5 * u }, func(float64) float64 { return 0 })
	edges[7].RG += 3
	res := Analyse(edges, frame)
	if !res.Points[7].OutlierRG && res.Curves[0].Outliers != 1 {
		t.Errorf("the outlier was kept: %+v", res.Curves[0])
	}
	if math.Abs(res.Curves[0].Coef[0]-0.5) > 1e-9 {
		t.Errorf("slope %.6f with the outlier left out, want 0.5", res.Curves[0].Coef[0])
	}
}
