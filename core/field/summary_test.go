package field

import (
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

// synthPoints places n radially oriented targets (a tangential and a
// sagittal edge each) on a w x h frame, with MTF from a Gaussian blur that
// widens with height, plus a few mixed ones. Inputs for the tests below,
// not check values.
func synthPoints(geo Geometry, n int, freqs []float64, seed uint64) []Point {
	rng := rand.New(rand.NewPCG(seed, 1))
	var pts []Point
	mtf := func(sigma, f float64) float64 { return math.Exp(-2 * math.Pi * math.Pi * sigma * sigma * f * f) }
	for i := 0; i < n; i++ {
		x, y := float64(geo.Width)*rng.Float64(), float64(geo.Height)*rng.Float64()
		h := geo.HeightMM(x, y)
		for _, o := range []Orientation{Tangential, Sagittal} {
			sigma := 0.7 + 0.004*h*h
			if o == Sagittal {
				sigma = 0.7 + 0.03*h
			}
			p := Point{ID: len(pts) + 1, Kind: "edge", X: x, Y: y, HeightMM: h, Orientation: o,
				MTF50: math.Sqrt(math.Ln2/(2*math.Pi*math.Pi)) / sigma}
			for _, f := range freqs {
				p.MTF = append(p.MTF, mtf(sigma, f*geo.PitchUM/1000)+0.01*rng.NormFloat64())
			}
			pts = append(pts, p)
		}
	}
	pts = append(pts, Point{ID: len(pts) + 1, Kind: "star", X: 10, Y: 10, HeightMM: geo.HeightMM(10, 10),
		Orientation: Mixed, MTF: make([]float64, len(freqs)), MTF50: math.NaN()})
	return pts
}

// TestSummaryCorner: the corner of a 36 x 24 mm sensor lies
// sqrt(18^2 + 12^2) = 21.63 mm from a centred axis (common practice;
// the Pythagorean half-diagonal), and the summary carries it.
func TestSummaryCorner(t *testing.T) {
	geo := NewGeometry(6000, 4000, 6)
	s, err := Summarise(geo, nil, []float64{10, 30})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(s.CornerMM-21.63) > 0.005 {
		t.Errorf("corner %g mm, want 21.63", s.CornerMM)
	}
}

// TestSummariseErrors: bad input gives a "field: " error, not a panic.
func TestSummariseErrors(t *testing.T) {
	geo := NewGeometry(600, 400, 5)
	for _, tc := range []struct {
		name  string
		geo   Geometry
		pts   []Point
		freqs []float64
		want  string
	}{
		{"zero frequency", geo, nil, []float64{0, 30}, "frequency"},
		{"NaN frequency", geo, nil, []float64{math.NaN()}, "frequency"},
		{"bad pitch", NewGeometry(600, 400, 0), nil, []float64{10}, "pitch"},
		{"MTF count", geo, []Point{{ID: 3, MTF: []float64{0.5}}}, []float64{10, 30}, "point 3"},
	} {
		_, err := Summarise(tc.geo, tc.pts, tc.freqs)
		if err == nil || !strings.HasPrefix(err.Error(), "field: ") || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want a field: error about %s", tc.name, err, tc.want)
		}
	}
}

// TestSummaryFewPoints: too few measurements give points, warnings and a
// "not enough" balance, never a made-up curve.
func TestSummaryFewPoints(t *testing.T) {
	geo := NewGeometry(6000, 4000, 6)
	pts := synthPoints(geo, 3, []float64{10, 30}, 1)
	s, err := Summarise(geo, pts, []float64{10, 30})
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Curves) != 0 || len(s.Astigmatism) != 0 || len(s.Warnings) != 4 {
		t.Errorf("%d curves, %d astigmatism, warnings %q", len(s.Curves), len(s.Astigmatism), s.Warnings)
	}
	if s.Balance.Verdict != VerdictTooFew || len(s.Points) != len(pts) {
		t.Errorf("verdict %q, %d points", s.Balance.Verdict, len(s.Points))
	}
}

// TestSummaryShape checks the JSON contract: snake_case keys, null for
// missing numbers, mixed points kept as points but left out of the curves,
// curves ordered by frequency then orientation and sampled over the
// measured heights only.
func TestSummaryShape(t *testing.T) {
	geo := NewGeometry(6000, 4000, 6)
	freqs := []float64{10, 30}
	pts := synthPoints(geo, 60, freqs, 2)
	s, err := Summarise(geo, pts, freqs)
	if err != nil {
		t.Fatal(err)
	}
	order := []string{"10 sagittal", "10 tangential", "30 sagittal", "30 tangential"}
	if len(s.Curves) != 4 {
		t.Fatalf("%d curves", len(s.Curves))
	}
	for i, c := range s.Curves {
		if got := strconvG(c.FreqLPMM) + " " + string(c.Orientation); got != order[i] {
			t.Errorf("curve %d is %s, want %s", i, got, order[i])
		}
		if c.Points != 60 || len(c.HeightMM) != CurveSamples || c.HeightMM[0] != c.HMinMM || c.HeightMM[CurveSamples-1] != c.HMaxMM {
			t.Errorf("curve %d: %d points, %d samples over %g..%g (points %g..%g)", i, c.Points, len(c.HeightMM), c.HeightMM[0], c.HeightMM[CurveSamples-1], c.HMinMM, c.HMaxMM)
		}
	}
	if len(s.MTF50Curves) != 2 || s.MTF50Curves[0].Quantity != "mtf50_lp_mm" {
		t.Errorf("MTF50 curves: %+v", s.MTF50Curves)
	}
}

// TestBalanceSynthetic: points from one function of height are balanced;
// lowering the MTF of every point on the left by 0.08 beyond 40 % of the
// corner is reported as a softer left half with that difference.
func TestBalanceSynthetic(t *testing.T) {
	geo := NewGeometry(6000, 4000, 6)
	freqs := []float64{10, 30}
	pts := synthPoints(geo, 150, freqs, 3)
	s, err := Summarise(geo, pts, freqs)
	if err != nil {
		t.Fatal(err)
	}
	if s.Balance.Verdict != VerdictBalanced {
		t.Errorf("even frame: %s", s.Balance.Text)
	}
	for i := range pts {
		if pts[i].X < geo.CentreX && pts[i].HeightMM >= OuterFraction*geo.CornerMM() {
			for k := range pts[i].MTF {
				pts[i].MTF[k] -= 0.08
			}
		}
	}
	s, err = Summarise(geo, pts, freqs)
	if err != nil {
		t.Fatal(err)
	}
	lr := s.Balance.Pairs[0]
	if s.Balance.Verdict != VerdictUnbalanced || lr.Verdict != VerdictUnbalanced || !strings.HasPrefix(lr.Text, "Left half softer than the right") {
		t.Fatalf("softer left: %s / %s", s.Balance.Verdict, lr.Text)
	}
	for _, d := range lr.ByFreq {
		// The curve through both halves sits between them, so the two
		// mean residuals are about +0.04 and -0.04: their difference is
		// the 0.08 that was subtracted.
		if math.Abs(float64(d.Diff)+0.08) > 4*float64(d.SE)+0.01 {
			t.Errorf("%g lp/mm: left - right %+.4f +/- %.4f, want -0.08", d.FreqLPMM, d.Diff, d.SE)
		}
	}
}

func strconvG(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
