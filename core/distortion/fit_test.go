package distortion

import (
	"math"
	"math/rand/v2"
	"testing"

	"sagitta/core/note"
)

// project maps chart point (x, y) through homography h and the radial model
// (k1, k2) about the centre of fr: the model of the package doc, written
// out again here.
func project(h [9]float64, k1, k2, x, y float64, fr Frame) (float64, float64) {
	w := h[6]*x + h[7]*y + h[8]
	u, v := (h[0]*x+h[1]*y+h[2])/w, (h[3]*x+h[4]*y+h[5])/w
	R := math.Hypot(float64(fr.W), float64(fr.H)) / 2
	s2 := ((u-fr.CentreX)*(u-fr.CentreX) + (v-fr.CentreY)*(v-fr.CentreY)) / (R * R)
	m := 1 + k1*s2 + k2*s2*s2
	return fr.CentreX + (u-fr.CentreX)*m, fr.CentreY + (v-fr.CentreY)*m
}

// grid returns chart points on a 3:2 chart's 13 x 9 grid with their images.
func grid(h [9]float64, k1, k2 float64, fr Frame, noisePx float64) []Point {
	rng := rand.New(rand.NewPCG(1, 2))
	var pts []Point
	for j := range 9 {
		for i := range 13 {
			x, y := -0.72+0.12*float64(i), -0.48+0.12*float64(j)
			u, v := project(h, k1, k2, x, y, fr)
			pts = append(pts, Point{Kind: "square", XPx: u + noisePx*rng.NormFloat64(), YPx: v + noisePx*rng.NormFloat64(), ChartX: x, ChartY: y})
		}
	}
	return pts
}

// TestFitChartRecovers fits noise-free and noisy synthetic points made by a
// perspective view and a known distortion, starting from a homography
// fitted without distortion (a pose off by the distortion): the fit
// returns k1 and k2 (within 1e-6 noise-free; within the displacement
// tolerance of 0.01 % with 0.1 px noise), and a residual of the noise's
// size.
func TestFitChartRecovers(t *testing.T) {
	fr := Frame{W: 1500, H: 1000, CentreX: 760, CentreY: 490}
	h := [9]float64{950, 12, 750, -8, 955, 500, 0.01, -0.02, 1}
	for _, tc := range []struct {
		name         string
		k1, k2, nois float64
		tolK, tolPct float64
	}{
		{"barrel", -0.02, 0, 0, 1e-6, 1e-4},
		{"moustache", 0.02, -0.03, 0, 1e-6, 1e-4},
		{"noisy", -0.01, 0.005, 0.1, 0, 0.01},
	} {
		pts := grid(h, tc.k1, tc.k2, fr, tc.nois)
		h0 := h
		h0[0] *= 1 + tc.k1/2 // a pose that absorbed part of the distortion
		f, err := FitChart(pts, h0, fr)
		if err != nil {
			t.Fatalf("%s: %v", tc.name, err)
		}
		worst := 0.0
		for s := 0.0; s <= fr.CornerS(); s += 0.01 {
			worst = math.Max(worst, math.Abs(f.DisplacementPct(s)-100*(tc.k1*s*s+tc.k2*s*s*s*s)))
		}
		t.Logf("%s: k1 %.6f k2 %.6f, worst %.5f %%, rms %.3f px, %d used", tc.name, f.K1, f.K2, worst, f.RMSPx, f.N)
		if tc.tolK > 0 && (math.Abs(f.K1-tc.k1) > tc.tolK || math.Abs(f.K2-tc.k2) > tc.tolK) {
			t.Errorf("%s: k1 %g k2 %g, want %g %g", tc.name, f.K1, f.K2, tc.k1, tc.k2)
		}
		if worst > tc.tolPct {
			t.Errorf("%s: curve off by %.5f %%, want <= %g", tc.name, worst, tc.tolPct)
		}
		if f.RMSPx > 2*tc.nois+1e-6 {
			t.Errorf("%s: rms %.4f px for noise %g", tc.name, f.RMSPx, tc.nois)
		}
	}
}

// TestFitChartOutlier: one target moved by 5 px is left out, and the rest
// fit as before.
func TestFitChartOutlier(t *testing.T) {
	fr := Frame{W: 1500, H: 1000, CentreX: 750, CentreY: 500}
	h := [9]float64{950, 0, 750, 0, 950, 500, 0, 0, 1}
	pts := grid(h, -0.02, 0, fr, 0)
	pts[20].XPx += 5
	f, err := FitChart(pts, h, fr)
	if err != nil {
		t.Fatal(err)
	}
	if f.Used[20] || f.N != len(pts)-1 {
		t.Errorf("outlier used %v, %d of %d used", f.Used[20], f.N, len(pts))
	}
	if math.Abs(f.K1+0.02) > 1e-6 {
		t.Errorf("k1 %g, want -0.02", f.K1)
	}
	if _, err := FitChart(pts[:MinPoints-1], h, fr); err != ErrFewPoints {
		t.Errorf("%d points: %v, want ErrFewPoints", MinPoints-1, err)
	}
}

// TestSquareCentre: the image of a square's centre under a homography is
// the crossing of the diagonals of the imaged square (projective maps keep
// incidence; Hartley and Zisserman, Multiple View Geometry, 2nd ed.,
// section 2.3), found here from the four sides' lines, each given by a
// point away from the side's middle and its normal.
func TestSquareCentre(t *testing.T) {
	h := [9]float64{900, 40, 700, -30, 880, 480, 0.2, -0.15, 1}
	app := func(x, y float64) [2]float64 {
		w := h[6]*x + h[7]*y + h[8]
		return [2]float64{(h[0]*x + h[1]*y + h[2]) / w, (h[3]*x + h[4]*y + h[5]) / w}
	}
	c := [4][2]float64{app(0.1, 0.1), app(0.3, 0.1), app(0.3, 0.3), app(0.1, 0.3)}
	var sides [4]Line
	for k := range 4 {
		a, b := c[(k+3)%4], c[k] // side k runs from corner k-1 to corner k
		p := [2]float64{a[0] + 0.3*(b[0]-a[0]), a[1] + 0.3*(b[1]-a[1])}
		sides[k] = Line{X: p[0], Y: p[1], NormalDeg: math.Atan2(b[0]-a[0], -(b[1]-a[1])) * 180 / math.Pi}
	}
	want := app(0.2, 0.2)
	x, y, ok := SquareCentre(sides)
	if !ok || math.Hypot(x-want[0], y-want[1]) > 1e-9 {
		t.Errorf("centre (%g, %g) ok %v, want (%g, %g)", x, y, ok, want[0], want[1])
	}
}

// TestSummariseWords: the verdict follows the thresholds, and the cautions
// their conditions.
func TestSummariseWords(t *testing.T) {
	fr := Frame{W: 1500, H: 1000, CentreX: 750, CentreY: 500}
	for _, tc := range []struct {
		k1, k2 float64
		code   note.Code
	}{
		{-0.02, 0, note.DistortionBarrel},
		{0.02, 0, note.DistortionPincushion},
		{0.02, -0.03, note.DistortionMoustache},
		{-0.002, 0, note.DistortionNegligible},
	} {
		f := &Fit{K1: tc.k1, K2: tc.k2, H: [9]float64{950, 0, 750, 0, 950, 500, 0, 0, 1}, RMSPx: 0.1, N: 1,
			ResidualsPx: []float64{0.1}, Used: []bool{true}, ReachS: 0.9}
		r := Summarise(f, []Point{{XPx: 1400, YPx: 950, ChartX: 0.68, ChartY: 0.47}}, fr, 24, false)
		if r.Code != string(tc.code) {
			t.Errorf("k1 %g k2 %g: %s, want %s", tc.k1, tc.k2, r.Code, tc.code)
		}
		if len(r.Cautions) != 0 {
			t.Errorf("k1 %g: cautions %v", tc.k1, r.Cautions)
		}
	}
	f := &Fit{K1: -0.02, H: [9]float64{950, 0, 750, 0, 950, 500, 0, 0, 1}, RMSPx: 2, N: 1, ResidualsPx: []float64{2}, Used: []bool{true}, ReachS: 0.06}
	r := Summarise(f, []Point{{XPx: 800, YPx: 520, ChartX: 0.05, ChartY: 0.02}}, fr, 24, true)
	var codes []note.Code
	for _, c := range r.Cautions {
		codes = append(codes, c.Code)
	}
	if len(codes) != 3 || codes[0] != note.DistortionSetup || codes[1] != note.DistortionScatter || codes[2] != note.DistortionShortReach {
		t.Errorf("cautions %v, want setup, scatter, short reach", codes)
	}
}

// TestFitLines: pieces along four straight lines of the scene, bent by a
// known K1 (the model of the package doc), give K1 back by the plumb-line
// method; a stray piece lined up with one of them is left out; one line
// is not enough.
func TestFitLines(t *testing.T) {
	fr := Frame{W: 1500, H: 1000, CentreX: 750, CentreY: 500}
	R := fr.HalfDiagPx()
	const k1 = -0.02
	bend := func(x, y float64) (float64, float64) {
		dx, dy := x-fr.CentreX, y-fr.CentreY
		m := 1 + k1*(dx*dx+dy*dy)/(R*R)
		return fr.CentreX + dx*m, fr.CentreY + dy*m
	}
	var pieces []Line
	for _, l := range [][4]float64{{300, 120, 1200, 150}, {300, 880, 1200, 850}, {110, 150, 130, 850}, {1390, 150, 1370, 850}} {
		for k := range 6 {
			tt := float64(k) / 5
			x, y := bend(l[0]+tt*(l[2]-l[0]), l[1]+tt*(l[3]-l[1]))
			// The bent line's normal there, from a small step along it.
			x2, y2 := bend(l[0]+(tt+1e-4)*(l[2]-l[0]), l[1]+(tt+1e-4)*(l[3]-l[1]))
			pieces = append(pieces, Line{X: x, Y: y, NormalDeg: math.Atan2(x2-x, -(y2-y)) * 180 / math.Pi})
		}
	}
	stray := pieces[5]
	stray.X, stray.Y = stray.X+40, stray.Y+2.2 // beyond the first line's end, 2 px off it
	pieces = append(pieces, stray)
	runs := Runs(pieces, fr)
	f, err := FitLines(pieces, runs, fr)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("k1 %.6f, %d runs, %d pieces, rms %.4f px", f.K1, f.Runs, f.N, f.RMSPx)
	if math.Abs(f.K1-k1) > 1e-4 || f.Runs != 4 || f.N != 24 {
		t.Errorf("k1 %g (want %g), %d runs, %d pieces (want 4, 24)", f.K1, k1, f.Runs, f.N)
	}
	if _, err := FitLines(pieces, runs[:1], fr); err != ErrFewRuns {
		t.Errorf("one run: %v, want ErrFewRuns", err)
	}
}
