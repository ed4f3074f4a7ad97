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
	rMin, rMax     float64             // annulus about the current centre, px (rMax 0 = no limit)
	tukey          float64             // biweight scale on sin(angle); 0 = plain least squares
	iters          int
}

// fitCentre iterates the isophote fit from (cx, cy).
func fitCentre(p *plane.Plane, cx, cy float64, o centreOpts) centreResult {
	res := centreResult{x: cx, y: cy}
	o.x0, o.y0 = max(o.x0, 1), max(o.y0, 1)
	o.x1, o.y1 = min(o.x1, p.W-2), min(o.y1, p.H-2)
	if o.x1 < o.x0 || o.y1 < o.y0 {
		return res
	}
	for it := 0; it < max(o.iters, 1); it++ {
		var a, a13, a24 sym2
		var bx, by, bx13, by13, bx24, by24, eIn, eAll float64
		for y := o.y0; y <= o.y1; y++ {
			py := float64(y) + 0.5
			dy := py - res.y
			row := p.Pix[y*p.W:]
			up, dn := p.Pix[(y-1)*p.W:], p.Pix[(y+1)*p.W:]
			for x := o.x0; x <= o.x1; x++ {
				px := float64(x) + 0.5
				dx := px - res.x
				r2 := dx*dx + dy*dy
				if r2 < o.rMin*o.rMin || o.rMax > 0 && r2 > o.rMax*o.rMax {
					continue
				}
				if o.keep != nil && !o.keep(x, y) {
					continue
				}
				gx := 0.5 * float64(row[x+1]-row[x-1])
				gy := 0.5 * float64(dn[x]-up[x])
				g2 := gx*gx + gy*gy
				if g2 == 0 {
					continue
				}
				// sine of the angle between the isophote and the direction
				// to the centre: (g . d) / (|g| |d|)
				s := (gx*dx + gy*dy) / math.Sqrt(g2*r2+1e-300)
				w := 1.0
				if o.tukey > 0 {
					u := s / o.tukey
					if u*u >= 1 {
						eAll += g2
						continue
					}
					w = (1 - u*u) * (1 - u*u)
				}
				eAll += g2
				if math.Abs(s) < 0.25 {
					eIn += g2
				}
				axx, axy, ayy := w*gx*gx, w*gx*gy, w*gy*gy
				gp := gx*px + gy*py
				a[0] += axx
				a[1] += axy
				a[2] += ayy
				bx += w * gx * gp
				by += w * gy * gp
				if dx*dy >= 0 {
					a13[0] += axx
					a13[1] += axy
					a13[2] += ayy
					bx13 += w * gx * gp
					by13 += w * gy * gp
				} else {
					a24[0] += axx
					a24[1] += axy
					a24[2] += ayy
					bx24 += w * gx * gp
					by24 += w * gy * gp
				}
			}
		}
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
		// Split halves: opposite quadrant pairs are each point-symmetric.
		split := 0.0
		i13, ok13 := a13.inv()
		i24, ok24 := a24.inv()
		if ok13 && ok24 {
			x13, y13 := i13.mul(bx13, by13)
			x24, y24 := i24.mul(bx24, by24)
			split = 0.5 * math.Hypot(x13-x24, y13-y24)
		}
		if it == max(o.iters, 1)-1 {
			res.uncPx = math.Hypot(split, sandwich(p, res, ai, o))
		}
	}
	return res
}

// sandwich returns the heteroscedasticity-consistent standard error (px) of
// the centre: sqrt(trace(A^-1 S A^-1)), S = sum w^2 e_i^2 g g', e_i the
// residual g . (p - c). Neighbouring pixels share noise through the
// gradient stencil, so this alone is optimistic; fitCentre adds the
// disagreement of the two halves.
func sandwich(p *plane.Plane, c centreResult, ai sym2, o centreOpts) float64 {
	var s sym2
	for y := o.y0; y <= o.y1; y++ {
		py := float64(y) + 0.5
		dy := py - c.y
		row := p.Pix[y*p.W:]
		up, dn := p.Pix[(y-1)*p.W:], p.Pix[(y+1)*p.W:]
		for x := o.x0; x <= o.x1; x++ {
			px := float64(x) + 0.5
			dx := px - c.x
			r2 := dx*dx + dy*dy
			if r2 < o.rMin*o.rMin || o.rMax > 0 && r2 > o.rMax*o.rMax {
				continue
			}
			if o.keep != nil && !o.keep(x, y) {
				continue
			}
			gx := 0.5 * float64(row[x+1]-row[x-1])
			gy := 0.5 * float64(dn[x]-up[x])
			g2 := gx*gx + gy*gy
			if g2 == 0 {
				continue
			}
			e := gx*dx + gy*dy
			w := 1.0
			if o.tukey > 0 {
				u := e / math.Sqrt(g2*r2+1e-300) / o.tukey
				if u*u >= 1 {
					continue
				}
				w = (1 - u*u) * (1 - u*u)
			}
			w2e2 := w * w * e * e
			s[0] += w2e2 * gx * gx
			s[1] += w2e2 * gx * gy
			s[2] += w2e2 * gy * gy
		}
	}
	// trace(Ai S Ai)
	m00 := ai[0]*s[0] + ai[1]*s[1]
	m01 := ai[0]*s[1] + ai[1]*s[2]
	m10 := ai[1]*s[0] + ai[2]*s[1]
	m11 := ai[1]*s[1] + ai[2]*s[2]
	tr := m00*ai[0] + m01*ai[1] + m10*ai[1] + m11*ai[2]
	return math.Sqrt(math.Max(tr, 0))
}
