package edge

import (
	"math"
	"sort"

	"sagitta/core/plane"
)

// pairNoise estimates the noise rms on each side of the edge from
// differences between pixels next to each other along the edge: two such
// pixels see almost the same part of the edge profile (their distances from
// the edge differ by sin(slant) px), so their difference is noise plus a
// tiny share of the profile's slope. The largest 2 % of the differences are
// dropped (stray detail), and the rms of the rest, divided by sqrt(2) for
// the difference of two samples and by sqrt(0.8730) for the trimming, is
// the noise: for a normal distribution cut at its 98th percentile of |d|
// (2.326 sigma), the remaining variance is 1 - 2 (2.326) phi(2.326) / 0.98
// = 0.8730 of the whole (moments of the truncated normal; N. L. Johnson,
// S. Kotz and N. Balakrishnan, Continuous Univariate Distributions, vol. 1,
// 2nd ed., ch. 13). A median-based estimate would read zero on quantised
// 8-bit files, where most neighbours are equal. Only pixels farther than core px from the edge
// count, so the profile's steep part does not pass for noise; a profile
// with long, slowly falling tails (diffraction, flare) does not either,
// which a spread about a fitted line would mistake for noise.
func pairNoise(p *plane.Plane, r Region, s *samples, sides []int8) (dark, light float64) {
	tx, ty, _, _ := r.axes()
	// Step to the neighbour along the pixel axis nearer the edge line.
	sx, sy := 1, 0
	if math.Abs(ty) > math.Abs(tx) {
		sx, sy = 0, 1
	}
	// The sides come from plateauSides over the region's box (the
	// pixels outside it are outside the region: side 0), with a zero
	// column and row beyond it for the last pixels' neighbours.
	x0, y0, gw := s.bx0, s.by0, s.bw+1
	x1 := min(s.bx0+s.bw-1, p.W-1-sx)
	y1 := min(s.by0+s.bh-1, p.H-1-sy)
	step := sy*gw + sx
	// Room for the pairs of every pixel of the region, split between the
	// two sides, so the lists rarely grow.
	n := int(2*r.HalfLen*r.HalfWidth) + 16
	var dd, dl []float64
	if s.sc != nil {
		dd, dl = take(s.sc.dd, n), take(s.sc.dl, n)
		defer func() { s.sc.dd, s.sc.dl = dd, dl }()
	} else {
		dd, dl = make([]float64, 0, n), make([]float64, 0, n)
	}
	for y := y0; y <= y1; y++ {
		row := p.Pix[y*p.W:]
		next := p.Pix[(y+sy)*p.W+sx:]
		g := sides[(y-y0)*gw:]
		for x := x0; x <= x1; x++ {
			sd := g[x-x0]
			if sd == 0 || g[x-x0+step] != sd {
				continue
			}
			diff := math.Abs(float64(row[x] - next[x]))
			if sd < 0 {
				dd = append(dd, diff)
			} else {
				dl = append(dl, diff)
			}
		}
	}
	tmp := s.buf(func(c *scratch) *[]float64 { return &c.sorted })
	return trimmedSigma(dd, tmp), trimmedSigma(dl, tmp)
}

// pairNoiseAt is pairNoise with the neighbour step pixels away along the
// pixel axis nearer the edge line, over the pixels keep selects (nil: all):
// a plane of a colour mosaic pairs each site with the next one of its own
// colour (mosaic.go). It classifies the pixels itself, from the region, the
// fit (mirrored if flipped) and core.
func pairNoiseAt(p *plane.Plane, r Region, f lineFit, flipped bool, core float64, step int, keep func(x, y int) bool) (dark, light float64) {
	tx, ty, nx, ny := r.axes()
	if flipped {
		nx, ny = -nx, -ny
	}
	// Step to the neighbour along the pixel axis nearer the edge line.
	sx, sy := step, 0
	if math.Abs(ty) > math.Abs(tx) {
		sx, sy = 0, step
	}
	ex := math.Abs(r.HalfLen*tx) + math.Abs(r.HalfWidth*nx)
	ey := math.Abs(r.HalfLen*ty) + math.Abs(r.HalfWidth*ny)
	x0 := max(int(math.Floor(r.X-ex-0.5)), 0)
	x1 := min(int(math.Ceil(r.X+ex-0.5)), p.W-1-sx)
	y0 := max(int(math.Floor(r.Y-ey-0.5)), 0)
	y1 := min(int(math.Ceil(r.Y+ey-0.5)), p.H-1-sy)
	side := func(x, y int) float64 {
		dx, dy := float64(x)+0.5-r.X, float64(y)+0.5-r.Y
		u, w := dx*tx+dy*ty, dx*nx+dy*ny
		if math.Abs(u) > r.HalfLen || math.Abs(w) > r.HalfWidth {
			return 0
		}
		d := f.dist(u, w)
		switch {
		case d < -core:
			return -1
		case d > core:
			return 1
		}
		return 0
	}
	// Over every pixel (keep nil) each pixel's side is needed twice, as a
	// pixel and as a neighbour: it is classified once, into a grid over
	// the pixels and their neighbours.
	sideAt := side
	if gw, gh := x1+sx-x0+1, y1+sy-y0+1; keep == nil && gw > 0 && gh > 0 {
		grid := make([]int8, gw*gh)
		for y := y0; y <= y1+sy; y++ {
			for x := x0; x <= x1+sx; x++ {
				grid[(y-y0)*gw+x-x0] = int8(side(x, y))
			}
		}
		sideAt = func(x, y int) float64 { return float64(grid[(y-y0)*gw+x-x0]) }
	}
	// Room for the pairs of every pixel of the region, split between the
	// two sides, so the lists rarely grow.
	n := int(2*r.HalfLen*r.HalfWidth) + 16
	dd, dl := make([]float64, 0, n), make([]float64, 0, n)
	for y := y0; y <= y1; y++ {
		for x := x0; x <= x1; x++ {
			if keep != nil && !keep(x, y) {
				continue
			}
			s := sideAt(x, y)
			if s == 0 || sideAt(x+sx, y+sy) != s {
				continue
			}
			diff := math.Abs(float64(p.At(x, y) - p.At(x+sx, y+sy)))
			if s < 0 {
				dd = append(dd, diff)
			} else {
				dl = append(dl, diff)
			}
		}
	}
	return trimmedSigma(dd, nil), trimmedSigma(dl, nil)
}

// trimFraction is the share of the largest pair differences left out.
const trimFraction = 0.02

// trimmedVariance is the variance that remains of a normal distribution
// cut at the 1 - trimFraction quantile of |d| (see pairNoise).
const trimmedVariance = 0.8730

// trimmedSigma converts absolute pair differences into a noise rms,
// sorting them (tmp as for sortNonNegative).
func trimmedSigma(d []float64, tmp *[]float64) float64 {
	if len(d) < 8 {
		return 0
	}
	sortNonNegative(d, tmp)
	keep := d[:len(d)-int(trimFraction*float64(len(d)))]
	var ss float64
	for _, v := range keep {
		ss += v * v
	}
	return math.Sqrt(ss/float64(len(keep))/trimmedVariance) / math.Sqrt2
}

// sortNonNegative sorts d in increasing order, as sort.Float64s does. For
// values that are all non-negative and not NaN (absolute differences),
// the order of the numbers is that of their bit patterns read as unsigned
// integers (the IEEE 754 binary encoding stores the biased exponent above
// the fraction; common practice), so a
// least-significant-digit radix sort on the 8 bytes gives it in linear
// time (D. E. Knuth, The Art of Computer Programming, vol. 3, 2nd ed.,
// sec. 5.2.5), one pass over the data for the byte counts and one per byte
// that is not the same in every value (the low bytes of the mantissa are
// all zero in the differences of float32 pixels). Other values fall back
// to the comparison sort. The second array is *tmp (grown as needed)
// unless tmp is nil.
func sortNonNegative(d []float64, tmp *[]float64) {
	if len(d) < 2 {
		return
	}
	var count [8][256]int
	for _, v := range d {
		if !(v >= 0) || math.Signbit(v) {
			sort.Float64s(d)
			return
		}
		b := math.Float64bits(v)
		for k := range 8 {
			count[k][byte(b>>(8*k))]++
		}
	}
	var other []float64
	if tmp != nil {
		other = take(*tmp, len(d))[:len(d)]
		*tmp = other
	} else {
		other = make([]float64, len(d))
	}
	src, dst := d, other
	for k := range 8 {
		c := &count[k]
		if c[byte(math.Float64bits(d[0])>>(8*k))] == len(d) {
			continue // every value has this byte: the pass would not move any
		}
		pos := 0
		for i := range c {
			c[i], pos = pos, pos+c[i]
		}
		for _, v := range src {
			j := byte(math.Float64bits(v) >> (8 * k))
			dst[c[j]] = v
			c[j]++
		}
		src, dst = dst, src
	}
	if &src[0] != &d[0] {
		copy(d, src)
	}
}
