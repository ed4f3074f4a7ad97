package edge

import (
	"math/rand/v2"
	"reflect"
	"testing"

	"sagitta/core/plane"
	"sagitta/core/sim/simcam"
)

// TestScratchLeavesNoTrace: a measurement made after the pooled working
// memory served larger and smaller regions, at other angles and with the
// edge mirrored, equals the same measurement made with fresh memory, field
// by field (correlated noise is added so that the noise estimates use
// their grids and keep what they find).
func TestScratchLeavesNoTrace(t *testing.T) {
	const size = 200
	rng := rand.New(rand.NewPCG(5, 8))
	type job struct {
		p *plane.Plane
		r Region
	}
	var jobs []job
	for _, normal := range []float64{5, 33, 185, 262} {
		p := halfPlane(t, size, normal, simcam.Gaussian{Sigma1: 0.9, Sigma2: 0.9})
		// Noise correlated along x (each pixel's plus 0.8 of its left
		// neighbour's), so the noise correlation keeps non-zero lags.
		prev := 0.0
		for i := range p.Pix {
			e := 0.01 * rng.NormFloat64()
			p.Pix[i] += float32(e + 0.8*prev)
			prev = e
		}
		for _, hl := range [][2]float64{{40, 20}, {70, 32}, {12, 8}} {
			jobs = append(jobs, job{p, centred(size, normal, hl[0], hl[1])})
		}
	}
	for k, j := range jobs {
		fresh, errF := measure(j.p, j.r, Options{}, &scratch{})
		for _, o := range jobs { // every other job through the pool first
			_, _ = Measure(o.p, o.r, Options{})
		}
		pooled, errP := Measure(j.p, j.r, Options{})
		if (errF == nil) != (errP == nil) || errF != nil && errF.Error() != errP.Error() {
			t.Fatalf("job %d: errors differ: %v / %v", k, errF, errP)
		}
		if !reflect.DeepEqual(fresh, pooled) {
			t.Errorf("job %d (%v): the measurement made with pooled memory differs from a fresh one", k, j.r)
		}
	}
}
