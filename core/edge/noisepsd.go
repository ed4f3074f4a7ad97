package edge

import (
	"math"
	"slices"

	"sagitta/core/plane"
)

// Noise that is not white. Demosaicing, noise reduction and sharpening
// correlate the noise of neighbouring pixels, so its power spectrum is not
// flat: smoothing moves power from high to low frequencies, sharpening the
// other way. The noise power that the refined estimator subtracts, and the
// standard errors it states, assume independent pixels; noiseShape
// measures how far that is off.
//
// The noise's autocovariance C(l) is estimated on each plateau for lags l
// of up to maxLag px (pixel values less a plane fitted to the plateau, both
// pixels of a pair on the same plateau); its Fourier transform is the noise
// power spectrum (Wiener-Khinchin theorem; J. S. Bendat and A. G. Piersol,
// Random Data, 4th ed., ch. 5). A sum over the pixels of a slanted edge
// sees it along the edge normal n: noise that would add a power P_w(f) if
// it were white adds P_w(f) R(f), R(f) = sum_l rho(l) cos(2 pi f (l . n)),
// rho = C / C(0) (pairs of pixels at lag l carry phasors that differ by
// 2 pi f (l . n) and weights that are nearly equal, the window and the bins
// varying slowly over a few pixels). This leaves out what the window's
// taper leaks from one frequency to the next, which matters where the
// spectrum is steep: the refined estimator subtracts the shaped power and
// states standard errors from the larger of the shaped and the white
// power. The pair-difference noise estimate
// measures C(0) - C(s) for the neighbour step s, so the pixels' own
// variance is that over 1 - rho(s).
const maxLag = 3

// noiseShape holds the measured correlation of the plateau noise.
type noiseShape struct {
	ok     bool
	rho    map[[2]int]float64 // autocorrelation at lags (lx, ly), both signs
	lags   [][2]int           // the lags of rho in a fixed order (see order)
	vals   []float64          // rho at lags
	rhoS   float64            // at the pair step of pairNoise
	nx, ny float64            // edge normal in image axes
}

// factor returns R(f), the noise power at f relative to white noise of the
// pixels' own variance (1 when the shape could not be measured).
func (n noiseShape) factor(f float64) float64 {
	if !n.ok {
		return 1
	}
	lags, vals := n.lags, n.vals
	if len(lags) != len(n.rho) || len(vals) != len(lags) {
		lags = n.order()
		vals = make([]float64, len(lags))
		for i, l := range lags {
			vals[i] = n.rho[l]
		}
	}
	var r float64
	for i, l := range lags {
		// A lag whose correlation was set to 0 adds a zero (0 times a
		// cosine): the sum is the same without it and its cosine.
		if vals[i] == 0 {
			continue
		}
		r += vals[i] * math.Cos(2*math.Pi*f*(float64(l[0])*n.nx+float64(l[1])*n.ny))
	}
	return math.Max(r, 0)
}

// order returns the lags of rho sorted by lx, then ly: factor sums in this
// fixed order (a map's order changes from run to run, and with it the last
// bit of the sum). measureNoiseShape keeps it in lags, as factor is called
// at every frequency of the curve.
func (n noiseShape) order() [][2]int {
	lags := make([][2]int, 0, len(n.rho))
	for l := range n.rho {
		lags = append(lags, l)
	}
	slices.SortFunc(lags, func(a, b [2]int) int {
		if a[0] != b[0] {
			return a[0] - b[0]
		}
		return a[1] - b[1]
	})
	return lags
}

// sdScale returns 1 / sqrt(1 - rho(s)): the factor from the pair-difference
// noise estimate to the pixels' own noise rms.
func (n noiseShape) sdScale() float64 {
	if !n.ok {
		return 1
	}
	return 1 / math.Sqrt(1-n.rhoS)
}

// noiseCell is a pixel of one plateau's layer of measureNoiseShape's grid:
// its residual and 1 where the pixel lies on that plateau, zeros elsewhere.
type noiseCell struct{ r, e float64 }

// measureNoiseShape estimates the plateau noise's autocorrelation in region
// r of p (mirrored if flipped), from the samples s gathered there and the
// pixels' sides of the edge (samples.plateauSides).
func measureNoiseShape(p *plane.Plane, r Region, flipped bool, s *samples, sides []int8) noiseShape {
	tx, ty, nx, ny := r.axes()
	if flipped {
		nx, ny = -nx, -ny
	}
	x0, y0, w, h := s.bx0, s.by0, s.bw, s.bh
	x1, y1 := x0+w-1, y0+h-1
	if w < 2*maxLag+2 || h < 2*maxLag+2 {
		return noiseShape{}
	}
	gw := w + 1 // the stride of sides
	var fit [2]planeStats
	for y := y0; y <= y1; y++ {
		for x := x0; x <= x1; x++ {
			sd := sides[(y-y0)*gw+x-x0]
			if sd == 0 {
				continue
			}
			k := (sd + 1) / 2 // 0 dark, 1 light
			dx, dy := float64(x)+0.5-r.X, float64(y)+0.5-r.Y
			fit[k].add(dx, dy, float64(p.At(x, y)))
		}
	}
	var coef [2][3]float64
	for k := range 2 {
		c, ok := fit[k].coef()
		if !ok {
			return noiseShape{}
		}
		coef[k] = c
	}
	// The residuals on a grid padded by maxLag px all round, one layer per
	// plateau: a pixel's layer holds its residual and 1 where it lies on
	// that plateau, 0 elsewhere (and in the padding). A pair (i, j) then
	// adds res[i] times the layer of i's plateau at j, and 1 to the count
	// where j is on the same plateau: the products and counts of pairs on
	// one plateau, and exact zeros for the rest (a sum plus zero is the
	// same sum), with neither a test of the sides nor of the box's edge.
	pw, ph := w+2*maxLag, h+2*maxLag
	var grid []noiseCell
	if s.sc != nil {
		if len(s.sc.cells) < 2*pw*ph {
			s.sc.cells = make([]noiseCell, 2*pw*ph)
		}
		grid = s.sc.cells[:2*pw*ph]
	} else {
		grid = make([]noiseCell, 2*pw*ph)
	}
	// The plateau pixels in row order (the order of a scan of the whole
	// box), each with its index in its plateau's layer.
	type site struct {
		i int
		r float64
	}
	n := 0
	for _, k := range sides {
		if k != 0 {
			n++
		}
	}
	at := make([]site, 0, n)
	for y := y0; y <= y1; y++ {
		for x := x0; x <= x1; x++ {
			if sd := sides[(y-y0)*gw+x-x0]; sd != 0 {
				k := (sd + 1) / 2
				c := coef[k]
				v := float64(p.At(x, y)) - c[0] - c[1]*(float64(x)+0.5-r.X) - c[2]*(float64(y)+0.5-r.Y)
				g := int(k)*pw*ph + (y-y0+maxLag)*pw + x - x0 + maxLag
				grid[g] = noiseCell{v, 1}
				at = append(at, site{g, v})
			}
		}
	}
	// Leave the grid all zero again for the next region (scratch).
	defer func() {
		for _, q := range at {
			grid[q.i] = noiseCell{}
		}
	}()
	cov := func(lx, ly int) (float64, float64) {
		var sum, cnt float64
		off := ly*pw + lx
		for _, q := range at {
			c := grid[q.i+off]
			sum += q.r * c.r
			cnt += c.e
		}
		return sum, cnt
	}
	s0, n0 := cov(0, 0)
	if n0 < 200 || s0 <= 0 {
		return noiseShape{}
	}
	c0 := s0 / n0
	ns := noiseShape{ok: true, rho: map[[2]int]float64{}, nx: nx, ny: ny}
	// Only lags whose correlation stands out of its sampling noise
	// (about 1 / sqrt(n)) are kept, so white noise gives R = 1 exactly.
	for ly := -maxLag; ly <= maxLag; ly++ {
		for lx := -maxLag; lx <= maxLag; lx++ {
			if ly < 0 || ly == 0 && lx < 0 {
				continue
			}
			s, n := cov(lx, ly)
			if n < 100 {
				continue
			}
			rho := s / n / c0
			if lx != 0 || ly != 0 {
				if math.Abs(rho) < 3/math.Sqrt(n) {
					rho = 0
				}
				ns.rho[[2]int{-lx, -ly}] = rho
			}
			ns.rho[[2]int{lx, ly}] = rho
		}
	}
	// The pair step of pairNoise: along the pixel axis nearer the edge.
	step := [2]int{1, 0}
	if math.Abs(ty) > math.Abs(tx) {
		step = [2]int{0, 1}
	}
	ns.rhoS = math.Min(ns.rho[step], 0.95)
	ns.lags = ns.order()
	ns.vals = make([]float64, len(ns.lags))
	for i, l := range ns.lags {
		ns.vals[i] = ns.rho[l]
	}
	return ns
}
