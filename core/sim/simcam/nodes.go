package simcam

import (
	"math"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/integrate/quad"
)

// nodeSet is a quadrature rule for integrals against a PSF: offsets (X, Y)
// in px with weights W, sum W ~ 1, and the largest offset radius RMax.
type nodeSet struct {
	X, Y, W []float64
	RMax    float64
}

// hermiteOrder is the number of Gauss-Hermite nodes per axis used for
// Gaussian PSFs in the corner regime.
const hermiteOrder = 24

// stdNormal2D is a product Gauss-Hermite rule for the standard bivariate
// normal distribution: z = sqrt(2) x_i, weight w_i / sqrt(pi) per axis
// (G. H. Golub and J. H. Welsch, Calculation of Gauss quadrature rules, Math.
// Comp. 23, 1969; nodes from gonum's quad.Hermite), keeping the pairs with
// product weight >= 1e-11 and radius <= 5.3 (the Gaussian support).
type stdNormal2D struct {
	z1, z2, w []float64
	zmax      float64
}

var stdNodes = func() stdNormal2D {
	x := make([]float64, hermiteOrder)
	w := make([]float64, hermiteOrder)
	quad.Hermite{}.FixedLocations(x, w, math.Inf(-1), math.Inf(1))
	var s stdNormal2D
	for i := range x {
		for j := range x {
			z1, z2 := math.Sqrt2*x[i], math.Sqrt2*x[j]
			wt := w[i] * w[j] / math.Pi
			r := math.Hypot(z1, z2)
			if wt < 1e-11 || r > gaussSupportSigmas {
				continue
			}
			s.z1 = append(s.z1, z1)
			s.z2 = append(s.z2, z2)
			s.w = append(s.w, wt)
			s.zmax = math.Max(s.zmax, r)
		}
	}
	return s
}()

// gaussNodes fills dst with the Gauss-Hermite rule for a Gaussian PSF of
// covariance c (a single node at 0 for the ideal lens).
func gaussNodes(dst *nodeSet, c cov) {
	s1, s2, ux, uy := c.axes()
	dst.X, dst.Y, dst.W = dst.X[:0], dst.Y[:0], dst.W[:0]
	if s1 <= 1e-12 {
		dst.X, dst.Y, dst.W = append(dst.X, 0), append(dst.Y, 0), append(dst.W, 1)
		dst.RMax = 0
		return
	}
	for k, w := range stdNodes.w {
		a, b := s1*stdNodes.z1[k], s2*stdNodes.z2[k]
		dst.X = append(dst.X, a*ux-b*uy)
		dst.Y = append(dst.Y, a*uy+b*ux)
		dst.W = append(dst.W, w)
	}
	dst.RMax = s1 * stdNodes.zmax
}

// gridNodeRadius caps the radius (px) of the quadrature grid for
// non-Gaussian PSFs.
const gridNodeRadius = 48

// gridBlockRatio is the largest ratio of a merged block's size to its
// distance from the PSF centre.
const gridBlockRatio = 0.5

// newGridNodes builds a quadrature rule for any PSF from its OTF: the cell
// integrals of the PSF over a fine grid of step hs are the samples of
// PSF conv box(hs) at the cell centres, whose transform is
// OTF(f) sinc(fx hs) sinc(fy hs); for a band-limited OTF (cut-off fc) and
// hs <= 1/(2 fc) one inverse 2D FFT gives them without aliasing (apart from
// the periodic wrap of the PSF's tail beyond the FFT period). Cells are then
// merged into a quadtree whose blocks are at most gridBlockRatio times
// their distance from the centre across (weight = sum, node = weighted centroid),
// and the rule is cut at radius min(Support, gridNodeRadius).
func newGridNodes(p PSF) *nodeSet {
	fc := bandLimit(p)
	hs := 0.25
	if !math.IsInf(fc, 1) {
		hs = math.Min(hs, 0.5/fc)
	}
	hs = math.Max(hs, 1.0/64)
	rq := math.Min(p.Support(), gridNodeRadius)
	m := int(math.Ceil(rq / hs))
	n := nextFast(max(2*m+1, int(math.Ceil(3*rq/hs))))
	df := 1 / (float64(n) * hs)
	spec := make([]complex128, n*n)
	for j := range n {
		fy := float64(freqIndex(j, n)) * df
		for i := range n {
			fx := float64(freqIndex(i, n)) * df
			spec[j*n+i] = complex(p.OTF(fx, fy)*sinc(fx*hs)*sinc(fy*hs), 0)
		}
	}
	fft := fourier.NewCmplxFFT(n)
	line := make([]complex128, n)
	for j := range n {
		fft.Sequence(spec[j*n:(j+1)*n], spec[j*n:(j+1)*n])
	}
	for i := range n {
		for j := range n {
			line[j] = spec[j*n+i]
		}
		fft.Sequence(line, line)
		for j := range n {
			spec[j*n+i] = line[j]
		}
	}
	// Weights on the (2m+1)^2 grid, padded to a power of two for the quadtree.
	size := 1
	for size < 2*m+1 {
		size *= 2
	}
	sw := newSAT(size)
	sx := newSAT(size)
	sy := newSAT(size)
	norm := 1 / float64(n*n)
	for j := -m; j <= m; j++ {
		for i := -m; i <= m; i++ {
			if math.Hypot(float64(i), float64(j))*hs > rq {
				continue // keep a centro-symmetric set of cells
			}
			w := real(spec[((j+n)%n)*n+(i+n)%n]) * norm
			sw.set(i+m, j+m, w)
			sx.set(i+m, j+m, w*float64(i)*hs)
			sy.set(i+m, j+m, w*float64(j)*hs)
		}
	}
	sw.build()
	sx.build()
	sy.build()
	ns := &nodeSet{}
	var walk func(x0, y0, s int)
	walk = func(x0, y0, s int) {
		// block covers cells x0..x0+s-1 (index - m = offset in cells)
		lo := func(i int) float64 { return (float64(i-m) - 0.5) * hs }
		dx := distInterval(lo(x0), lo(x0+s))
		dy := distInterval(lo(y0), lo(y0+s))
		d := math.Hypot(dx, dy)
		if d > rq {
			return
		}
		if s > 1 && float64(s)*hs > gridBlockRatio*d {
			h := s / 2
			walk(x0, y0, h)
			walk(x0+h, y0, h)
			walk(x0, y0+h, h)
			walk(x0+h, y0+h, h)
			return
		}
		w := sw.sum(x0, y0, s)
		if w == 0 {
			return
		}
		x, y := sx.sum(x0, y0, s)/w, sy.sum(x0, y0, s)/w
		ns.X = append(ns.X, x)
		ns.Y = append(ns.Y, y)
		ns.W = append(ns.W, w)
		ns.RMax = math.Max(ns.RMax, math.Hypot(x, y))
	}
	walk(0, 0, size)
	return ns
}

// freqIndex maps FFT bin i of n to its signed frequency index.
func freqIndex(i, n int) int {
	if i <= n/2 {
		return i
	}
	return i - n
}

// distInterval returns the distance from 0 to the interval [a, b].
func distInterval(a, b float64) float64 {
	switch {
	case a > 0:
		return a
	case b < 0:
		return -b
	}
	return 0
}

// sat is a summed-area table over a size x size grid.
type sat struct {
	n int
	v []float64 // (n+1) x (n+1), v[(j+1)(n+1)+i+1] = sum over cells < (i+1, j+1)
}

func newSAT(n int) *sat { return &sat{n: n, v: make([]float64, (n+1)*(n+1))} }

func (s *sat) set(i, j int, w float64) { s.v[(j+1)*(s.n+1)+i+1] = w }

func (s *sat) build() {
	n := s.n + 1
	for j := 1; j < n; j++ {
		for i := 1; i < n; i++ {
			s.v[j*n+i] += s.v[(j-1)*n+i] + s.v[j*n+i-1] - s.v[(j-1)*n+i-1]
		}
	}
}

// sum returns the total over the block of cells [x0, x0+k) x [y0, y0+k).
func (s *sat) sum(x0, y0, k int) float64 {
	n := s.n + 1
	x1, y1 := x0+k, y0+k
	return s.v[y1*n+x1] - s.v[y0*n+x1] - s.v[y1*n+x0] + s.v[y0*n+x0]
}
