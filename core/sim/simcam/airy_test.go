package simcam

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/integrate/quad"
)

// gl fills Gauss-Legendre nodes on [a, b].
func gl(n int, a, b float64) ([]float64, []float64) {
	x, w := make([]float64, n), make([]float64, n)
	quad.Legendre{}.FixedLocations(x, w, a, b)
	return x, w
}

// airyLSF returns the line spread function of the Airy pattern at distance t
// px: 2 int_0^inf PSF(sqrt(t^2 + y^2)) dy with PSF(r) = pi/(4 (lN)^2)
// [2 J1(x)/x]^2, x = pi r / (lN) (Goodman ch. 6; the normalisation follows
// from int_0^inf J1(x)^2 / x dx = 1/2, a standard Bessel integral), by
// composite Gauss-Legendre up to y = 400 lN plus the tail of the averaged
// asymptote PSF ~ lN / (pi^3 r^3) beyond it.
func airyLSF(t, ln float64) float64 {
	psf := func(r float64) float64 {
		x := math.Pi * r / ln
		if x < 1e-8 {
			return math.Pi / (4 * ln * ln)
		}
		v := 2 * math.J1(x) / x
		return math.Pi / (4 * ln * ln) * v * v
	}
	ymax := 400 * ln
	panels := 1600
	h := ymax / float64(panels)
	sum := 0.0
	for i := range panels {
		x, w := gl(8, float64(i)*h, float64(i+1)*h)
		for k := range x {
			sum += w[k] * psf(math.Hypot(t, x[k]))
		}
	}
	tail := ln / (math.Pi * math.Pi * math.Pi) / (2 * ymax * ymax)
	return 2 * (sum + tail)
}

// TestAiryEdgeVsSpatial compares the tabulated frequency-form edge of an
// Airy lens with a direct spatial integration of the Airy PSF: for a
// vertical edge, value(d) = int over the pixel [-1/2, 1/2] of ESF(d + s),
// ESF(x) = 1/2 + int_0^x LSF.
func TestAiryEdgeVsSpatial(t *testing.T) {
	if testing.Short() {
		t.Skip("spatial Airy integration is slow")
	}
	a := Airy{WavelengthUM: 0.55, FNumber: 8, PitchUM: 4}
	ln := 1 / a.CutoffCyPx() // lambda N in px
	tab := newEdgeTable(a, 1, 0, a.Support()+1)
	// LSF on Gauss-Legendre nodes of [0, 5.5], 8 panels per px.
	type node struct{ x, w float64 }
	var nodes []node
	for i := range 44 {
		x, w := gl(10, float64(i)/8, float64(i+1)/8)
		for k := range x {
			nodes = append(nodes, node{x[k], w[k] * airyLSF(x[k], ln)})
		}
	}
	esf := func(x float64) float64 { // 1/2 + int_0^x LSF (LSF even)
		ax := math.Abs(x)
		// whole panels below ax, then the partial panel with its own nodes
		lo := math.Floor(ax*8) / 8
		s := 0.0
		for _, n := range nodes {
			if n.x < lo {
				s += n.w
			}
		}
		if ax > lo {
			x, w := gl(10, lo, ax)
			for k := range x {
				s += w[k] * airyLSF(x[k], ln)
			}
		}
		return 0.5 + math.Copysign(s, x)
	}
	for _, d := range []float64{0, 0.25, 0.5, 1, 2, 4} {
		x, w := gl(8, d-0.5, d+0.5)
		want := 0.0
		for k := range x {
			want += w[k] * esf(x[k])
		}
		got := tab.eval(d)
		if math.Abs(got-want) > 1e-4 {
			t.Errorf("d = %v: table %.7f, spatial %.7f", d, got, want)
		}
		t.Logf("d = %v: table %.7f, spatial %.7f, diff %.1e", d, got, want, got-want)
	}
}

// TestEdgeSymmetry checks value(d) + value(-d) = 1 for centro-symmetric PSFs
// (the PSF conv pixel kernel is even, so its CDF is antisymmetric about 1/2).
func TestEdgeSymmetry(t *testing.T) {
	airy := Airy{0.55, 5.6, 4}
	cases := []struct {
		name string
		f    func(d float64) float64
		tol  float64
	}{
		{"gauss axis", func(d float64) float64 { return gaussEdge(d, 0.7, 1, 0) }, 1e-14},
		{"gauss slant", func(d float64) float64 { a, b := pixelWidths(0.2); return gaussEdge(d, 0.45, a, b) }, 1e-14},
		{"ideal slant", func(d float64) float64 { a, b := pixelWidths(0.5); return trapCDF(d, a, b) }, 1e-15},
		{"airy table", newEdgeTable(airy, math.Cos(0.3), math.Sin(0.3), 50).eval, 1e-9},
		{"cascade table", newEdgeTable(Cascade{Gaussian{0.5, 0.2, 10}, airy}, 0.6, 0.8, 50).eval, 1e-9},
	}
	for _, c := range cases {
		maxd := 0.0
		for d := 0.0; d < 6; d += 0.173 {
			maxd = math.Max(maxd, math.Abs(c.f(d)+c.f(-d)-1))
		}
		if maxd > c.tol {
			t.Errorf("%s: max |v(d) + v(-d) - 1| = %.2e", c.name, maxd)
		}
	}
}

// TestAiryHalfPlaneRender renders a vertical Airy edge end to end and
// compares pixels with the table (which TestEdgeTableVsDirect checks).
func TestAiryHalfPlaneRender(t *testing.T) {
	a := Airy{0.55, 8, 4}
	const w, h = 64, 8
	p := (&Camera{W: w, H: h, Lens: Fixed{a}}).RenderLinear(HalfPlaneScene(w, h, 0, 0.1, 0.9))
	maxd := 0.0
	for i := range w {
		d := float64(i) + 0.5 - w/2
		want := 0.1 + 0.8*directEdge(a, 1, 0, d, a.CutoffCyPx())
		maxd = math.Max(maxd, math.Abs(float64(p.At(i, 3))-want))
	}
	if maxd > 1e-6 {
		t.Errorf("max |render - direct| = %.2e", maxd)
	}
}

// TestGaussianHalfPlaneRender renders a vertical edge through a Gaussian
// lens end to end and compares each pixel with 2D Gauss-Legendre quadrature
// over the pixel of Phi(d / sigma) (the blurred half-plane; the projection
// of the elliptical Gaussian on the normal has variance n' Sigma n).
func TestGaussianHalfPlaneRender(t *testing.T) {
	g := Gaussian{Sigma1: 0.9, Sigma2: 0.5, AngleDeg: 25}
	sx := math.Sqrt(g.cov().along(1, 0))
	const w, h = 24, 4
	p := (&Camera{W: w, H: h, Lens: Fixed{g}}).RenderLinear(HalfPlaneScene(w, h, 0, 0, 1))
	maxd := 0.0
	for i := range w {
		d := float64(i) + 0.5 - w/2
		want := glPixel(func(x, y float64) float64 { return normCDF((d + x) / sx) }, 4, 16)
		maxd = math.Max(maxd, math.Abs(float64(p.At(i, 2))-want))
	}
	if maxd > 1e-7 { // float32 output rounds to 3e-8
		t.Errorf("max |render - quadrature| = %.2e", maxd)
	}
}

// TestFieldLensDiffraction renders through a field lens with diffraction
// (the generic, tabulated path): along a single edge the pixels follow the
// frequency-form edge of the PSF at the edge's midpoint (here the image
// centre), and a square's flux is conserved to 1.5 %: the Airy pattern's
// energy beyond radius r, about 2 lambda N / (pi^2 r) (from memory), is only
// approximately accounted beyond the corner rule's radius (see the package
// doc), which for this small square (12 px, f/5.6) adds about 1 % of its flux.
func TestFieldLensDiffraction(t *testing.T) {
	a := Airy{0.55, 5.6, 4}
	l := FieldLens{CentreX: 40, CentreY: 30, PitchUM: 4, SigmaT: []float64{0.5, 0, 2}, SigmaS: []float64{0.5, 1}, Diffraction: &a}
	const w, h = 80, 60
	p := (&Camera{W: w, H: h, Lens: l}).RenderLinear(HalfPlaneScene(w, h, 10, 0.2, 0.8))
	psf := l.PSFAt(40, 30)
	th := 10 * math.Pi / 180
	maxd := 0.0
	for i := 30; i < 50; i++ {
		x, y := float64(i)+0.5, 30.5
		d := (x-40)*math.Cos(th) + (y-30)*math.Sin(th)
		want := 0.2 + 0.6*directEdge(psf, math.Cos(th), math.Sin(th), d, a.CutoffCyPx())
		maxd = math.Max(maxd, math.Abs(float64(p.At(i, 30))-want))
	}
	if maxd > 1e-6 {
		t.Errorf("max |render - direct| = %.2e", maxd)
	}

	s := Scene{Background: 0, Polygons: []Polygon{Square(40, 30, 12, 8, 1)}}
	q := (&Camera{W: w, H: h, Lens: Fixed{a}}).RenderLinear(s)
	sum := 0.0
	for _, v := range q.Pix {
		sum += float64(v)
	}
	if math.Abs(sum/144-1) > 0.015 {
		t.Errorf("Airy square flux %.4f of its area", sum/144)
	}
	t.Logf("Airy square flux %.5f of its area", sum/144)
}
