package field

import (
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// decentredPoints builds the measurements of a frame (6000 x 4000 px at
// 6 um) on a 16 x 11 grid, a sagittal and a tangential one at each place,
// from a lens whose MTF at 10 lp/mm falls linearly with image height h
// (mm): sagittal 0.75 - 0.01 h, tangential 0.70 - 0.015 h, with Gaussian
// scatter of sd 0.01. trade adds the effect of a decentred element that
// moves the tangential focus one way on the right half and the sagittal
// the other: in the outer field the right half gains trade in sagittal and
// loses trade in tangential, the left half the reverse. Pooled over the
// two orientations each half's mean is unchanged.
func decentredPoints(trade float64, seed uint64) (Geometry, []Point) {
	geo := NewGeometry(6000, 4000, 6)
	rng := rand.New(rand.NewPCG(seed, 12))
	var pts []Point
	id := 0
	for j := range 11 {
		for i := range 16 {
			x, y := (float64(i)+0.5)*6000/16, (float64(j)+0.5)*4000/11
			h := geo.HeightMM(x, y)
			side := math.Copysign(1, x-geo.CentreX)
			outer := math.Max(0, h-0.4*geo.CornerMM()) / (0.6 * geo.CornerMM())
			for _, or := range []Orientation{Sagittal, Tangential} {
				v := 0.75 - 0.01*h
				sgn := side
				if or == Tangential {
					v = 0.70 - 0.015*h
					sgn = -side
				}
				v += sgn*trade*outer + 0.01*rng.NormFloat64()
				id++
				pts = append(pts, Point{ID: id, Kind: "edge", X: x, Y: y, HeightMM: h, Orientation: or,
					MTF: []float64{v}, MTF50: math.NaN()})
			}
		}
	}
	return geo, pts
}

// TestBalancePerOrientation: a decentred lens that trades sagittal for
// tangential sharpness on one side leaves the pooled comparison balanced;
// judged per orientation it is unbalanced, and the text names the
// orientation. A lens without the trade stays balanced.
func TestBalancePerOrientation(t *testing.T) {
	for seed := uint64(1); seed <= 4; seed++ {
		geo, pts := decentredPoints(0.08, seed)
		s, err := Summarise(geo, pts, []float64{10})
		if err != nil {
			t.Fatal(err)
		}
		b := s.Balance
		lr := b.Pairs[0]
		t.Logf("seed %d: pooled left-right %.3f +/- %.3f, sagittal %.3f +/- %.3f, tangential %.3f +/- %.3f; %s", seed,
			float64(lr.ByFreq[0].Diff), float64(lr.ByFreq[0].SE), float64(lr.BySagittal[0].Diff), float64(lr.BySagittal[0].SE),
			float64(lr.ByTangential[0].Diff), float64(lr.ByTangential[0].SE), b.Text)
		if lr.ByFreq[0].Notable {
			t.Errorf("seed %d: the pooled difference %.3f should cancel", seed, float64(lr.ByFreq[0].Diff))
		}
		if b.Verdict != VerdictUnbalanced || !strings.Contains(b.Text, "Left half softer in sagittal detail") && !strings.Contains(b.Text, "Right half softer in tangential detail") {
			t.Errorf("seed %d: verdict %q: %s", seed, b.Verdict, b.Text)
		}
		geo, pts = decentredPoints(0, seed)
		s, err = Summarise(geo, pts, []float64{10})
		if err != nil {
			t.Fatal(err)
		}
		if s.Balance.Verdict != VerdictBalanced {
			t.Errorf("seed %d: centred lens: %s", seed, s.Balance.Text)
		}
	}
}
