package simcam

import (
	"math"
	"testing"

	"sagitta/core/plane"
)

// blurredSquare returns the exact image of a square (side l, centre (cx,
// cy), rotated rot rad, level 1 on 0) blurred by an isotropic Gaussian of
// standard deviation s, at point (x, y): in the square's own axes the
// indicator is a product of two boxes and the isotropic Gaussian is a
// product of two 1D Gaussians, so the blur is
// [Phi((q1 + l/2)/s) - Phi((q1 - l/2)/s)] [Phi((q2 + l/2)/s) - Phi((q2 - l/2)/s)]
// (separability of the normal distribution).
func blurredSquare(x, y, cx, cy, l, rot, s float64) float64 {
	sn, cs := math.Sincos(rot)
	dx, dy := x-cx, y-cy
	q1 := dx*cs + dy*sn
	q2 := -dx*sn + dy*cs
	f := func(q float64) float64 { return normCDF((q+l/2)/s) - normCDF((q-l/2)/s) }
	return f(q1) * f(q2)
}

// TestCornerVsSeparable compares pixels around the corners of tilted squares
// with 2D Gauss-Legendre integration over each pixel of the exact blurred
// square (above).
func TestCornerVsSeparable(t *testing.T) {
	cases := []struct {
		name       string
		sigma, rot float64
		side       float64
		tol        float64
	}{
		{"sigma 0.8 rot 20", 0.8, 20, 12, 2e-3},
		{"sigma 0.4 rot 5", 0.4, 5, 9, 2e-3},
		{"sigma 1.5 rot 33", 1.5, 33, 14, 2e-3},
		{"sigma 0.6 small square rot 45", 0.6, 45, 2.5, 2e-3},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			const w, h = 40, 40
			s := Scene{Background: 0, Polygons: []Polygon{Square(20.3, 19.6, c.side, c.rot, 1)}}
			cam := Camera{W: w, H: h, Lens: Fixed{Gaussian{c.sigma, c.sigma, 0}}}
			p := cam.RenderLinear(s)
			maxd, sum := 0.0, 0.0
			for j := range h {
				for i := range w {
					want := glPixel(func(x, y float64) float64 {
						return blurredSquare(float64(i)+0.5+x, float64(j)+0.5+y, 20.3, 19.6, c.side, c.rot*math.Pi/180, c.sigma)
					}, 2, 12)
					got := float64(p.At(i, j))
					sum += got
					maxd = math.Max(maxd, math.Abs(got-want))
				}
			}
			if maxd > c.tol {
				t.Errorf("max |render - exact| = %.2e > %.0e", maxd, c.tol)
			}
			// Flux conservation: blur and pixel integration conserve the
			// integral, so the pixel sum equals the square's area (level 1).
			area := c.side * c.side
			if d := math.Abs(sum - area); d > 1e-3*area {
				t.Errorf("flux %.6f, area %.6f", sum, area)
			}
			t.Logf("max |render - exact| = %.2e, flux error %.2e", maxd, (sum-area)/area)
		})
	}
}

// TestNoSeams renders scenes normally and with the corner correction forced
// everywhere over all quadrature nodes: where the normal rendering uses the
// single-edge regime the correction must vanish, so the two renderings agree
// wherever they switch.
func TestNoSeams(t *testing.T) {
	cases := []struct {
		name string
		lens Lens
		tol  float64
	}{
		{"fixed gaussian", Fixed{Gaussian{0.9, 0.5, 30}}, 1e-6},
		{"field lens", lookLens(), 1e-6},
		{"ideal", Fixed{Gaussian{}}, 1e-9},
	}
	s := Scene{Background: 0.5, Polygons: []Polygon{
		Square(30, 30, 22, 12, 0.1),
		Square(42, 38, 10, 50, 0.9),
		{Pts: [][2]float64{{60, 10}, {90, 20}, {75, 30}, {88, 50}, {62, 45}}, Level: 0.2},
	}}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			const w, h = 100, 60
			o := newOptics(c.lens, w, h)
			a := plane.New(w, h)
			newRenderer(w, h, s, o).renderPolygons(a)
			b := plane.New(w, h)
			r := newRenderer(w, h, s, o)
			r.forceCorner = true
			r.renderPolygons(b)
			maxd := 0.0
			for i := range a.Pix {
				maxd = math.Max(maxd, math.Abs(float64(a.Pix[i]-b.Pix[i])))
			}
			if maxd > c.tol {
				t.Errorf("max |regime switch difference| = %.2e", maxd)
			}
			t.Logf("max |regime switch difference| = %.2e", maxd)
		})
	}
}
