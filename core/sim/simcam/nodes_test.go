package simcam

import (
	"math"
	"testing"
)

// TestNodeMoments checks the quadrature rules' moments against the PSFs'
// known ones: total weight 1 (OTF(0) = 1), zero mean (centro-symmetric PSF),
// and for a Gaussian the covariance (second moments of the bivariate normal).
func TestNodeMoments(t *testing.T) {
	var ns nodeSet
	g := Gaussian{1.2, 0.5, 30}
	gaussNodes(&ns, g.cov())
	var w, mx, my, xx, xy, yy float64
	for k := range ns.W {
		w += ns.W[k]
		mx += ns.W[k] * ns.X[k]
		my += ns.W[k] * ns.Y[k]
		xx += ns.W[k] * ns.X[k] * ns.X[k]
		xy += ns.W[k] * ns.X[k] * ns.Y[k]
		yy += ns.W[k] * ns.Y[k] * ns.Y[k]
	}
	c := g.cov()
	// nodes beyond the 5.3 sigma support carry about 1.5e-6 of the weight
	if math.Abs(w-1) > 1e-5 || math.Abs(mx) > 1e-12 || math.Abs(my) > 1e-12 {
		t.Errorf("gauss nodes: weight %v mean (%v, %v)", w, mx, my)
	}
	for i, v := range []float64{xx, xy, yy} {
		if math.Abs(v-c[i]) > 1e-4*c[0] { // nodes beyond 5.3 sigma are dropped
			t.Errorf("gauss nodes: covariance[%d] %v want %v", i, v, c[i])
		}
	}
	t.Logf("gauss nodes: %d, rmax %.2f", len(ns.W), ns.RMax)

	a := Airy{0.55, 8, 4}
	gn := newGridNodes(a)
	w, mx, my = 0, 0, 0
	for k := range gn.W {
		w += gn.W[k]
		mx += gn.W[k] * gn.X[k]
		my += gn.W[k] * gn.Y[k]
	}
	// Energy of the Airy pattern outside radius r: about 2 lambda N / (pi^2 r)
	// (asymptotic encircled energy, Born and Wolf, Principles of Optics, 8.5.2,
	// from memory), 0.009 at 48 px here: allow 0.05.
	if math.Abs(w-1) > 0.05 || math.Abs(mx) > 1e-12 || math.Abs(my) > 1e-12 {
		t.Errorf("airy nodes: weight %v mean (%v, %v)", w, mx, my)
	}
	t.Logf("airy grid nodes: %d, weight %.5f, rmax %.2f", len(gn.W), w, gn.RMax)
}
