package field

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestBalanceStandardErrors pins README's balance criterion: "unbalanced"
// only when a difference exceeds both 2.5 standard errors and 0.03. A
// noisy frame (scatter 0.12 between edges at one height, so that one
// standard error of the left-right difference is above 0.02) has its left
// half lowered so the measured difference is about 1.5 standard errors and
// more than 0.03 (must read balanced: within the spread between edges), then
// about 4 standard errors (must read unbalanced, left softer). The standard
// error is Welch's, sqrt(s_A^2/n_A + s_B^2/n_B) (B. L. Welch, Biometrika 34,
// 1947); the 2.5 is our own threshold, quoted in README.
func TestBalanceStandardErrors(t *testing.T) {
	checkBalance(t, 0.12, []float64{1.5, 4}, []bool{false, true})
}

// TestBalanceSmallGap: README's second condition, a difference of at least
// 0.03. With little scatter (0.01) a difference of 0.02 is many standard
// errors yet must read balanced ("too small to matter"); 0.045 unbalanced.
func TestBalanceSmallGap(t *testing.T) {
	checkBalance(t, 0.01, []float64{-0.02, -0.045}, []bool{false, true})
}

// checkBalance lowers the left half of a noisy frame (scatter sd between
// edges) so that left - right is each target in turn: a number of standard
// errors when positive, a difference of -target when negative; and checks
// the left-right verdict.
func checkBalance(t *testing.T, sd float64, targets []float64, notable []bool) {
	geo := NewGeometry(6000, 4000, 6)
	freqs := []float64{30}
	rng := rand.New(rand.NewPCG(5, 9))
	var base []Point
	for i := 0; i < 70; i++ {
		x, y := float64(geo.Width)*rng.Float64(), float64(geo.Height)*rng.Float64()
		h := geo.HeightMM(x, y)
		for _, o := range []Orientation{Tangential, Sagittal} {
			sigma := 0.7 + 0.02*h
			f := 30 * geo.PitchUM / 1000
			base = append(base, Point{ID: len(base) + 1, Kind: "edge", X: x, Y: y, HeightMM: h, Orientation: o,
				MTF:   []float64{math.Exp(-2*math.Pi*math.Pi*sigma*sigma*f*f) + sd*rng.NormFloat64()},
				MTF50: math.Sqrt(math.Ln2/(2*math.Pi*math.Pi)) / sigma})
		}
	}
	run := func(shift float64) PairDiff {
		pts := make([]Point, len(base))
		for i, p := range base {
			p.MTF = append([]float64(nil), p.MTF...)
			if p.X < geo.CentreX {
				p.MTF[0] -= shift
			}
			pts[i] = p
		}
		s, err := Summarise(geo, pts, freqs)
		if err != nil {
			t.Fatal(err)
		}
		lr := s.Balance.Pairs[0]
		if lr.A != "left" || lr.B != "right" {
			t.Fatalf("first pair %s/%s", lr.A, lr.B)
		}
		d := lr.ByFreq[0]
		t.Logf("shift %.4f: left - right %+.4f, SE %.4f (%.2f SE), pair %s", shift, d.Diff, d.SE, math.Abs(float64(d.Diff))/float64(d.SE), lr.Verdict)
		return d
	}
	d0 := run(0)
	se := float64(d0.SE)
	for i, k := range targets {
		// Lowering the left half by s lowers left - right by about s (the
		// frame's curve moves by about half of it, on both sides alike).
		var d PairDiff
		if k > 0 {
			if !(se > 0.02) {
				t.Fatalf("standard error %.4f: the case needs one above 0.02", se)
			}
			d = run(float64(d0.Diff) + k*se)
			ratio := math.Abs(float64(d.Diff)) / float64(d.SE)
			if math.Abs(ratio-k) > 0.4 || math.Abs(float64(d.Diff)) <= 0.03 {
				t.Fatalf("case %.1f SE: got %.2f SE, difference %.4f (the case must be at about %.1f SE and above 0.03)", k, ratio, d.Diff, k)
			}
		} else {
			d = run(float64(d0.Diff) - k)
			if math.Abs(float64(d.Diff)-k) > 0.15*(-k) || math.Abs(float64(d.Diff)) < 4*float64(d.SE) {
				t.Fatalf("case %.3f: got a difference %.4f at %.1f SE (the case must be at about %.3f and above 4 SE)", -k, d.Diff, math.Abs(float64(d.Diff))/float64(d.SE), k)
			}
		}
		if d.Notable != notable[i] {
			t.Errorf("difference %.4f, standard error %.4f: notable %v, want %v (threshold 2.5 SE and 0.03)",
				d.Diff, d.SE, d.Notable, notable[i])
		}
	}
}
