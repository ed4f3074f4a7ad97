package simcam

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// glPixel integrates f over the unit pixel centred at the origin with
// composite Gauss-Legendre quadrature: sub x sub panels of nq x nq nodes.
func glPixel(f func(x, y float64) float64, sub, nq int) float64 {
	xs := make([]float64, nq)
	ws := make([]float64, nq)
	sum := 0.0
	h := 1 / float64(sub)
	for i := range sub {
		for j := range sub {
			x0, y0 := -0.5+float64(i)*h, -0.5+float64(j)*h
			quad.Legendre{}.FixedLocations(xs, ws, x0, x0+h)
			ys := append([]float64(nil), xs...)
			wy := append([]float64(nil), ws...)
			quad.Legendre{}.FixedLocations(ys, wy, y0, y0+h)
			for a := range nq {
				for b := range nq {
					sum += ws[a] * wy[b] * f(xs[a], ys[b])
				}
			}
		}
	}
	return sum
}

func pixelWidths(t float64) (a, b float64) {
	c, s := math.Abs(math.Cos(t)), math.Abs(math.Sin(t))
	return math.Max(c, s), math.Min(c, s)
}

// TestGaussEdgeVsQuadrature checks the closed form of the Gaussian edge
// against brute-force 2D Gauss-Legendre quadrature over the pixel of
// Phi((u + n.p) / s): the projection of a 2D Gaussian onto n is Gaussian
// with variance n' Sigma n (standard property of the normal distribution),
// and the ideal-lens limit is the area fraction.
func TestGaussEdgeVsQuadrature(t *testing.T) {
	const tol = 1e-7
	cases := []struct {
		name     string
		s, angle float64 // sigma along the normal (px), normal angle (deg)
	}{
		{"axis sigma 0.5", 0.5, 0},
		{"axis sigma 1.3", 1.3, 90},
		{"slant 5 deg sigma 0.7", 0.7, 5},
		{"slant 30 deg sigma 0.25", 0.25, 30},
		{"diagonal sigma 0.4", 0.4, 45},
		{"tiny b sigma 2", 2, 0.001},
		{"slant 87 deg sigma 0.15", 0.15, 87},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			th := c.angle * math.Pi / 180
			nx, ny := math.Cos(th), math.Sin(th)
			a, b := pixelWidths(th)
			for _, u := range []float64{-3, -1.1, -0.6, -0.3, -0.05, 0, 0.12, 0.45, 0.7, 1.4, 2.5} {
				want := glPixel(func(x, y float64) float64 {
					return normCDF((u + nx*x + ny*y) / c.s)
				}, 8, 16)
				got := gaussEdge(u, c.s, a, b)
				if d := math.Abs(got - want); d > tol {
					t.Errorf("u=%v: got %.12f want %.12f (diff %.2e)", u, got, want, d)
				}
			}
		})
	}
}

// TestTrapCDFHandCases checks the ideal-lens area fraction on hand-computed
// geometry (elementary geometry, worked by hand).
func TestTrapCDFHandCases(t *testing.T) {
	cases := []struct {
		name      string
		u, a, b   float64
		want, tol float64
	}{
		// vertical edge 0.2 px left of the centre: 0.7 of the pixel on the right
		{"vertical 0.2 left", 0.2, 1, 0, 0.7, 1e-15},
		// 45 degree line through the centre halves the pixel
		{"diagonal centre", 0, math.Sqrt2 / 2, math.Sqrt2 / 2, 0.5, 1e-15},
		// 45 degree line cutting off a corner triangle with legs 0.5: area 1/8
		{"diagonal corner", -math.Sqrt2 / 4, math.Sqrt2 / 2, math.Sqrt2 / 2, 0.125, 1e-15},
		{"outside", -2, 1, 0.3, 0, 0},
	}
	for _, c := range cases {
		if got := trapCDF(c.u, c.a, c.b); math.Abs(got-c.want) > c.tol {
			t.Errorf("%s: got %v want %v", c.name, got, c.want)
		}
	}
}

// directEdge evaluates value(u) = 1/2 + (1/pi) int_0^fc K(f) sin(2 pi f u)/f df
// by composite Gauss-Legendre quadrature (the frequency form of the blurred
// edge; Fourier transform of the edge spread function).
func directEdge(p PSF, nx, ny, u, fc float64) float64 {
	const panels, nq = 1500, 12
	xs := make([]float64, nq)
	ws := make([]float64, nq)
	sum := 0.0
	h := fc / panels
	for i := range panels {
		quad.Legendre{}.FixedLocations(xs, ws, float64(i)*h, float64(i+1)*h)
		for k, f := range xs {
			kk := p.OTF(f*nx, f*ny) * sinc(f*nx) * sinc(f*ny)
			sum += ws[k] * kk * math.Sin(2*math.Pi*f*u) / f
		}
	}
	return 0.5 + sum/math.Pi
}

// TestEdgeTableVsDirect checks the FFT-tabulated frequency-form edge against
// direct evaluation of the same integral, to 1e-6.
func TestEdgeTableVsDirect(t *testing.T) {
	const tol = 1e-6
	airy := Airy{WavelengthUM: 0.55, FNumber: 8, PitchUM: 4}
	cases := []struct {
		name  string
		p     PSF
		angle float64
	}{
		{"airy f8 axis", airy, 0},
		{"airy f8 slant 5", airy, 5},
		{"airy f2.8 slant 30", Airy{0.55, 2.8, 4}, 30},
		{"cascade gauss+airy 40", Cascade{Gaussian{0.6, 0.3, 20}, airy}, 40},
	}
	rng := rand.New(rand.NewPCG(1, 2))
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			th := c.angle * math.Pi / 180
			nx, ny := math.Cos(th), math.Sin(th)
			tab := newEdgeTable(c.p, nx, ny, c.p.Support()+1)
			us := []float64{0, 0.3, -0.77, 2, -5.5, 20, c.p.Support() - 1}
			for range 12 {
				us = append(us, (rng.Float64()*2-1)*4)
			}
			maxd := 0.0
			for _, u := range us {
				want := directEdge(c.p, nx, ny, u, bandLimit(c.p))
				got := tab.eval(u)
				maxd = math.Max(maxd, math.Abs(got-want))
				if d := math.Abs(got - want); d > tol {
					t.Errorf("u=%v: table %.10f direct %.10f (diff %.2e)", u, got, want, d)
				}
			}
			t.Logf("max |table - direct| = %.2e over %d points", maxd, len(us))
		})
	}
}
