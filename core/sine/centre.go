package sine

import (
	"math"

	"sagitta/core/plane"
)

// The centre of a star is the point where its isophotes meet. At pixel p
// with gradient g the isophote runs along u' = (-g_y, g_x)/|g|, so the
// centre c satisfies g . (p - c) = 0. The estimate minimises
//
//	sum_i w_i (g_i . (p_i - c))^2,
//
// whose solution is c = A^-1 b with A = sum w g g', b = sum w g g' p (with
// w = 1 this weights every pixel by its squared gradient, like a structure
// tensor). For a point-symmetric PSF, the pixels at p and at 2c - p have
// gradients g and -g (N even) or g and g (N odd): either way their residuals
// cancel in b, so the estimate is unbiased even where blur gives the
// gradient a radial component. Robust weights (Tukey's biweight on the sine
// of the angle between the isophote and the direction to the current
// centre) keep unrelated detail in the coarse search from pulling the
// estimate.

// centreResult is a fitted star centre.
type centreResult struct {
	x, y   float64 // px, in the coordinates of the plane fitted
	uncPx  float64 // 1-sigma uncertainty, px
	ratio  float64 // smaller/larger eigenvalue of A: 1 for a full star, 0 for parallel lines
	inlier float64 // share of gradient energy whose isophote passes the centre within the tolerance
	energy float64 // sum of |g|^2 used
	ok     bool
}

// centreOpts selects the pixels and the weighting of one fit.
type centreOpts struct {
	x0, y0, x1, y1 int                 // pixel box to scan (inclusive)
	keep           func(x, y int) bool // optional mask; nil keeps all
	// pts, when not nil, are the pixels of the box that keep keeps, with
	// their gradients, in scan order (gradPts): given once for several
	// fits over the same pixels.
	pts        []gradPt
	rMin, rMax float64 // annulus about the current centre, px (rMax 0 = no limit)
	tukey      float64 // biweight scale on sin(angle); 0 = plain least squares
	iters      int
}

// gradPt is one pixel of a centre fit: the pixel and the differences of
// its neighbours, row[x+1] - row[x-1] and the same down the column, exact
// in float32 (the gradient is half of each: gradient).
type gradPt struct {
	x, y   int32
	dx, dy float32
}

// gradient returns the pixel's centre and gradient.
func (q gradPt) gradient() (px, py, gx, gy float64) {
	return float64(q.x) + 0.5, float64(q.y) + 0.5, 0.5 * float64(q.dx), 0.5 * float64(q.dy)
}

// pairs is the number of opposite sector pairs for the jackknife
// (sectorPair).
const pairs = 8

// centreSums are the sums of one pass of the fit: A, b, the gradient
// energy in and out of the tolerance, and the same per sector pair.
type centreSums struct {
	a         sym2
	bx, by    float64
	eIn, eAll float64
	pa        [pairs]sym2
	pbx, pby  [pairs]float64
}

// add adds the pixels pts (in scan order) that lie in the annulus of o
// about (cx, cy) and have a gradient.
func (s *centreSums) add(pts []gradPt, cx, cy float64, o *centreOpts) {
	a, bx, by, eIn, eAll := s.a, s.bx, s.by, s.eIn, s.eAll
	pa, pbx, pby := s.pa, s.pbx, s.pby
	for _, q := range pts {
		px, py, gx, gy := q.gradient()
		dx, dy := px-cx, py-cy
		r2 := dx*dx + dy*dy
		if r2 < o.rMin*o.rMin || o.rMax > 0 && r2 > o.rMax*o.rMax {
			continue
		}
		g2 := gx*gx + gy*gy
		if g2 == 0 {
			continue
		}
		// sine of the angle between the isophote and the direction
		// to the centre: (g . d) / (|g| |d|)
		sn := (gx*dx + gy*dy) / math.Sqrt(g2*r2+1e-300)
		w := 1.0
		if o.tukey > 0 {
			u := sn / o.tukey
			if u*u >= 1 {
				eAll += g2
				continue
			}
			w = (1 - u*u) * (1 - u*u)
		}
		eAll += g2
		if math.Abs(sn) < 0.25 {
			eIn += g2
		}
		axx, axy, ayy := w*gx*gx, w*gx*gy, w*gy*gy
		gp := gx*px + gy*py
		a[0] += axx
		a[1] += axy
		a[2] += ayy
		bx += w * gx * gp
		by += w * gy * gp
		k := sectorPair(dx, dy)
		pa[k][0] += axx
		pa[k][1] += axy
		pa[k][2] += ayy
		pbx[k] += w * gx * gp
		pby[k] += w * gy * gp
	}
	s.a, s.bx, s.by, s.eIn, s.eAll = a, bx, by, eIn, eAll
	s.pa, s.pbx, s.pby = pa, pbx, pby
}

// gradPts lists the pixels of the box x0..x1, y0..y1 (inclusive, at least
// 1 px from the border of p) that keep keeps (nil: all), with their
// gradients, in scan order.
func gradPts(p *plane.Plane, x0, y0, x1, y1 int, keep func(x, y int) bool, out []gradPt) []gradPt {
	for y := y0; y <= y1; y++ {
		row := p.Pix[y*p.W:]
		up, dn := p.Pix[(y-1)*p.W:], p.Pix[(y+1)*p.W:]
		for x := x0; x <= x1; x++ {
			if keep != nil && !keep(x, y) {
				continue
			}
			out = append(out, gradPt{int32(x), int32(y), row[x+1] - row[x-1], dn[x] - up[x]})
		}
	}
	return out
}

// fitCentre iterates the isophote fit from (cx, cy).
func fitCentre(p *plane.Plane, cx, cy float64, o centreOpts) centreResult {
	res := centreResult{x: cx, y: cy}
	o.x0, o.y0 = max(o.x0, 1), max(o.y0, 1)
	o.x1, o.y1 = min(o.x1, p.W-2), min(o.y1, p.H-2)
	if o.x1 < o.x0 || o.y1 < o.y0 {
		return res
	}
	var row []gradPt
	for it := 0; it < max(o.iters, 1); it++ {
		var sums centreSums
		if o.pts != nil {
			sums.add(o.pts, res.x, res.y, &o)
		} else {
			// Row by row, only the pixels of the annulus.
			for y := o.y0; y <= o.y1; y++ {
				dy := float64(y) + 0.5 - res.y
				if dy*dy > o.rMax*o.rMax && o.rMax > 0 {
					continue
				}
				row = row[:0]
				x0, x1 := o.x0, o.x1
				if o.rMax > 0 { // the annulus's chord on this row, a pixel wider
					h := math.Sqrt(o.rMax*o.rMax-dy*dy) + 1
					x0, x1 = max(x0, int(math.Floor(res.x-0.5-h))), min(x1, int(math.Ceil(res.x-0.5+h)))
				}
				if x1 >= x0 {
					row = gradPts(p, x0, y, x1, y, o.keep, row)
				}
				sums.add(row, res.x, res.y, &o)
			}
		}
		a, bx, by, eIn, eAll := sums.a, sums.bx, sums.by, sums.eIn, sums.eAll
		pa, pbx, pby := sums.pa, sums.pbx, sums.pby
		ai, ok := a.inv()
		if !ok {
			res.ok = false
			return res
		}
		nx, ny := ai.mul(bx, by)
		l1, l2, _ := a.eig()
		res.x, res.y = nx, ny
		res.ratio = l2 / l1
		res.energy = eAll
		if eAll > 0 {
			res.inlier = eIn / eAll
		}
		res.ok = true
		if it == max(o.iters, 1)-1 {
			res.uncPx = jackknife(a, bx, by, pa[:], pbx[:], pby[:])
		}
	}
	return res
}

// sectorPair returns the pair of opposite sectors, 0..7, that the direction
// (dx, dy) falls in: the angle of the line through it, in [0, 180) degrees,
// in steps of 22.5 degrees.
func sectorPair(dx, dy float64) int {
	if dy < 0 || dy == 0 && dx < 0 {
		dx, dy = -dx, -dy
	}
	const t1, t3 = 0.41421356237309503, 2.414213562373095 // tan 22.5, tan 67.5 degrees
	mirror := dx < 0
	if mirror {
		dx = -dx
	}
	var k int
	switch {
	case dy < t1*dx:
		k = 0
	case dy < dx:
		k = 1
	case dy < t3*dx:
		k = 2
	default:
		k = 3
	}
	if mirror {
		k = 7 - k
	}
	return k
}

// jackknife returns the delete-one-group jackknife standard error (px) of
// the centre, sqrt(var x + var y), over groups that are each a pair of
// opposite sectors: every leave-one-out subset is point-symmetric, so the
// pattern's own (symmetric) residuals cancel in each estimate, and the
// sectors are large enough to hold the spatial correlation of the noise
// (B. Efron and C. Stein, The jackknife estimate of variance, Ann. Statist.
// 9 (1981) 586-596).
func jackknife(a sym2, bx, by float64, pa []sym2, pbx, pby []float64) float64 {
	k := len(pa)
	xs := make([]float64, 0, k)
	ys := make([]float64, 0, k)
	for i := range pa {
		m := sym2{a[0] - pa[i][0], a[1] - pa[i][1], a[2] - pa[i][2]}
		mi, ok := m.inv()
		if !ok {
			return math.Inf(1)
		}
		x, y := mi.mul(bx-pbx[i], by-pby[i])
		xs = append(xs, x)
		ys = append(ys, y)
	}
	var mx, my float64
	for i := range xs {
		mx += xs[i] / float64(k)
		my += ys[i] / float64(k)
	}
	var v float64
	for i := range xs {
		v += (xs[i]-mx)*(xs[i]-mx) + (ys[i]-my)*(ys[i]-my)
	}
	return math.Sqrt(v * float64(k-1) / float64(k))
}
