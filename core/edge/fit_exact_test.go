package edge

import (
	"math/rand/v2"
	"testing"
)

// TestNormalEquationsExact: the written-out normal equations equal, bit
// for bit, the general accumulation of J^T J and J^T r from modelGrad (the
// Gauss-Newton normal equations of the least-squares fit; Marquardt 1963,
// SIAM J. Appl. Math. 11:431, section 2).
func TestNormalEquationsExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	n := 500
	un, w, v := make([]float64, n), make([]float64, n), make([]float64, n)
	for i := range n {
		un[i] = 2*rng.Float64() - 1
		w[i] = 24*rng.Float64() - 12
		v[i] = rng.Float64()
	}
	p := [6]float64{0.05, 0.7, 0.9, 0.3, -0.4, 0.2}
	var jtj, ref [6][6]float64
	var jtr, refR [6]float64
	c := normalEquations(p, un, w, v, &jtj, &jtr)
	var rc float64
	for i := range n {
		var g [6]float64
		r := v[i] - modelGrad(p, un[i], w[i], &g)
		rc += r * r
		for a := range 6 {
			refR[a] += g[a] * r
			for b := 0; b <= a; b++ {
				ref[a][b] += g[a] * g[b]
			}
		}
	}
	// The cost alone (levenberg's trial of a small step) is the same sum
	// of squares, bit for bit.
	if cc := cost(p, un, w, v); cc != rc {
		t.Errorf("cost alone %v, in the normal equations' pass %v", cc, rc)
	}
	if c != rc || jtr != refR || jtj != ref {
		t.Errorf("written-out sums differ from the general form:\ncost %v vs %v\nJtr %v\nvs  %v\nJtJ %v\nvs  %v", c, rc, jtr, refR, jtj, ref)
	}
}
