package chart

import (
	"math"
	"slices"

	"sagitta/core/internal/coarse"
	"sagitta/core/plane"
)

// Finding the marks' discs. The photo is reduced by box averaging to at
// most coarseSide pixels on its longer side; a local threshold (from the
// 5th and 95th percentiles of tiles) separates dark from light; connected
// dark regions (4-connectivity) that are elliptical and surrounded by light
// are the candidate discs; their centre and shape are then refined at full
// resolution.

// coarseSide is the longer side of the reduced image, px.
const coarseSide = 1600

// disc is a candidate mark disc in full-resolution pixels.
type disc struct {
	x, y          float64 // centre, px
	sxx, sxy, syy float64 // second central moments, px^2 (r^2/4 each for a round disc of radius r)
	dark, light   float64 // linear levels inside the disc and in the gap around it
}

// region accumulates the moments of one connected dark region.
type region struct {
	n                  float64
	sx, sy             float64
	sxx, sxy, syy      float64
	x0, y0, x1, y1     int
	parent             int32
	touchesImageBorder bool
}

// findDiscs returns the candidate mark discs of p.
func findDiscs(vs *coarse.Views) []disc {
	p := vs.Plane()
	k := max(1, (max(p.W, p.H)+coarseSide-1)/coarseSide)
	c := vs.Shrink(k)
	if c.W < 16 || c.H < 16 {
		return nil
	}
	lv := coarse.Level(c, max(16, min(c.W, c.H)/16), 1.5).Pix
	regs := label(c, lv)
	var out []disc
	fk := float64(k)
	maxArea := 0.01 * float64(c.W*c.H)
	for _, r := range regs {
		if r.n < 12 || r.n > maxArea || r.touchesImageBorder {
			continue
		}
		mx, my := r.sx/r.n, r.sy/r.n
		cxx, cxy, cyy := r.sxx/r.n-mx*mx, r.sxy/r.n-mx*my, r.syy/r.n-my*my
		l1, l2 := eigen2(cxx, cxy, cyy)
		if !(l2 > 0) || l2 < 0.09*l1 {
			continue // degenerate or too oblique to read (axis ratio below 0.3)
		}
		// A filled ellipse of semi-axes a, b has area pi a b and moments
		// a^2/4, b^2/4 along its axes.
		fill := r.n / (4 * math.Pi * math.Sqrt(l1*l2))
		if fill < 0.85 || fill > 1.2 {
			continue
		}
		cand := disc{x: mx * fk, y: my * fk, sxx: cxx * fk * fk, sxy: cxy * fk * fk, syy: cyy * fk * fk}
		if !lightAround(c, lv, mx, my, cxx, cxy, cyy) || !ringAround(c, lv, mx, my, cxx, cxy, cyy) {
			continue
		}
		if d, ok := refineDisc(p, cand); ok {
			out = append(out, d)
		}
	}
	return out
}

// label finds the 4-connected regions of pixels darker than the local
// level, by a two-pass union-find, and returns their moments (coordinates
// at pixel centres, coarse px).
func label(c *plane.Plane, lv []float32) []region {
	lab := make([]int32, c.W*c.H)
	var regs []region
	find := func(i int32) int32 {
		for regs[i].parent != i {
			regs[i].parent = regs[regs[i].parent].parent
			i = regs[i].parent
		}
		return i
	}
	for y := range c.H {
		for x := range c.W {
			i := y*c.W + x
			if !(c.Pix[i] < lv[i]) {
				lab[i] = -1
				continue
			}
			up, left := int32(-1), int32(-1)
			if y > 0 {
				up = lab[i-c.W]
			}
			if x > 0 {
				left = lab[i-1]
			}
			switch {
			case up < 0 && left < 0:
				lab[i] = int32(len(regs))
				regs = append(regs, region{parent: int32(len(regs))})
			case up < 0:
				lab[i] = left
			case left < 0:
				lab[i] = up
			default:
				a, b := find(up), find(left)
				if a != b {
					regs[max(a, b)].parent = min(a, b)
				}
				lab[i] = min(a, b)
			}
		}
	}
	for i := range regs {
		regs[i].x0, regs[i].y0 = math.MaxInt, math.MaxInt
	}
	for y := range c.H {
		for x := range c.W {
			l := lab[y*c.W+x]
			if l < 0 {
				continue
			}
			r := &regs[find(l)]
			fx, fy := float64(x)+0.5, float64(y)+0.5
			r.n++
			r.sx += fx
			r.sy += fy
			r.sxx += fx * fx
			r.sxy += fx * fy
			r.syy += fy * fy
			r.x0, r.y0 = min(r.x0, x), min(r.y0, y)
			r.x1, r.y1 = max(r.x1, x), max(r.y1, y)
			if x == 0 || y == 0 || x == c.W-1 || y == c.H-1 {
				r.touchesImageBorder = true
			}
		}
	}
	out := regs[:0]
	for i, r := range regs {
		if r.parent == int32(i) {
			out = append(out, r)
		}
	}
	return out
}

// eigen2 returns the eigenvalues l1 >= l2 of the symmetric matrix
// [[a, b], [b, c]].
func eigen2(a, b, c float64) (float64, float64) {
	m, d := (a+c)/2, math.Hypot((a-c)/2, b)
	return m + d, m - d
}

// sqrt2x2 returns the symmetric square root of the positive definite
// matrix [[a, b], [b, c]]: with s = sqrt(det) and t = sqrt(a + c + 2 s),
// sqrt = [[a + s, b], [b, c + s]] / t (a standard identity for 2 x 2
// matrices).
func sqrt2x2(a, b, c float64) (float64, float64, float64) {
	s := math.Sqrt(math.Max(a*c-b*b, 0))
	t := math.Sqrt(a + c + 2*s)
	return (a + s) / t, b / t, (c + s) / t
}

// lightAround reports whether the ellipse 1.35 times the size of a region's
// moment ellipse lies on light pixels all round, and its half-size ellipse
// on dark pixels: true of a mark's disc, whose light gap reaches 1.6 times
// its radius (the thresholded region can be a little smaller than the
// disc), and of few other shapes (a square's corners reach 1.22 times its
// moment ellipse, so squares may pass; reading the ring rejects them).
func lightAround(c *plane.Plane, lv []float32, mx, my, cxx, cxy, cyy float64) bool {
	a, b, d := sqrt2x2(cxx, cxy, cyy)
	a, b, d = 2*a, 2*b, 2*d // boundary ellipse: centre + A (cos t, sin t)
	const n = 96
	for i := range n {
		s, co := math.Sincos(2 * math.Pi * float64(i) / n)
		for _, f := range [2]float64{1.35, 0.5} {
			x := mx + f*(a*co+b*s)
			y := my + f*(b*co+d*s)
			xi, yi := int(x), int(y)
			if x < 0 || y < 0 || xi >= c.W || yi >= c.H {
				return false
			}
			j := yi*c.W + xi
			if (c.Pix[j] < lv[j]) != (f < 1) {
				return false
			}
		}
	}
	return true
}

// ringAround reports whether the ellipse 2.2 times the size of a region's
// moment ellipse, where a mark's ring lies (1.6 to 3.07 disc radii; the
// thresholded region is a little smaller than the disc), is dark for 20 to
// 80 % of 64 samples: a mark's ring has 6 to 10 dark sectors of 16, while
// a square has light paper all round at that distance. It spares the full-
// resolution work for the many dark shapes that are not marks.
func ringAround(c *plane.Plane, lv []float32, mx, my, cxx, cxy, cyy float64) bool {
	a, b, d := sqrt2x2(cxx, cxy, cyy)
	a, b, d = 4.4*a, 4.4*b, 4.4*d // 2.2 times the boundary ellipse
	const n = 64
	dark := 0
	for i := range n {
		s, co := math.Sincos(2 * math.Pi * float64(i) / n)
		x, y := mx+a*co+b*s, my+b*co+d*s
		xi, yi := int(x), int(y)
		if x < 0 || y < 0 || xi >= c.W || yi >= c.H {
			return false
		}
		if j := yi*c.W + xi; c.Pix[j] < lv[j] {
			dark++
		}
	}
	return dark >= n/5 && dark <= n*4/5
}

// minMarkContrast is the least ratio of the light gap to the dark disc of a
// mark: black ink on paper reflects a few per cent of the light the paper
// does (from memory), so even a photo with flare keeps well above it, while
// the mean grey at a blurred sine star's centre (mean over paper, 1.6 at
// 4:1) stays below.
const minMarkContrast = 2.5

// refineDisc measures a candidate disc at full resolution: the dark level
// is the mean within half its radius, the light level the median on the
// ellipse 1.3 times its size (in the gap), and each pixel within that
// ellipse weighs (light - v) / (light - dark), clamped to [0, 1]. The
// weighted centroid is the disc's centre (exact for a round disc blurred by
// any point-symmetric PSF), and the weighted second moments, less the
// blur's small share, give its shape. Two passes let the window follow the
// refined shape.
func refineDisc(p *plane.Plane, d disc) (disc, bool) {
	for range 2 {
		a, b, c := sqrt2x2(d.sxx, d.sxy, d.syy)
		a, b, c = 2*a, 2*b, 2*c
		var ring []float64
		for i := range 64 {
			s, co := math.Sincos(2 * math.Pi * float64(i) / 64)
			ring = append(ring, p.Bilinear(d.x+1.3*(a*co+b*s), d.y+1.3*(b*co+c*s)))
		}
		slices.Sort(ring)
		light := ring[len(ring)/2]
		// Inverse of the boundary matrix, to test ellipse membership.
		det := a*c - b*b
		if !(det > 0) {
			return d, false
		}
		ia, ib, ic := c/det, -b/det, a/det
		ext := 1.3 * math.Sqrt(math.Max(a*a+b*b, b*b+c*c))
		x0, x1 := max(int(d.x-ext), 0), min(int(d.x+ext)+1, p.W)
		y0, y1 := max(int(d.y-ext), 0), min(int(d.y+ext)+1, p.H)
		var dsum, dn float64
		for y := y0; y < y1; y++ {
			for x := x0; x < x1; x++ {
				u, v := float64(x)+0.5-d.x, float64(y)+0.5-d.y
				q, r := ia*u+ib*v, ib*u+ic*v
				if q*q+r*r <= 0.25 {
					dsum += float64(p.Pix[y*p.W+x])
					dn++
				}
			}
		}
		if dn == 0 {
			return d, false
		}
		dark := dsum / dn
		if !(light > dark*minMarkContrast) || light <= 0 {
			return d, false
		}
		var sw, sx, sy, sxx, sxy, syy float64
		for y := y0; y < y1; y++ {
			for x := x0; x < x1; x++ {
				u, v := float64(x)+0.5-d.x, float64(y)+0.5-d.y
				q, r := ia*u+ib*v, ib*u+ic*v
				if q*q+r*r > 1.69 {
					continue
				}
				w := math.Min(math.Max((light-float64(p.Pix[y*p.W+x]))/(light-dark), 0), 1)
				sw += w
				sx += w * u
				sy += w * v
				sxx += w * u * u
				sxy += w * u * v
				syy += w * v * v
			}
		}
		if sw < 4 {
			return d, false
		}
		mx, my := sx/sw, sy/sw
		d.x += mx
		d.y += my
		d.sxx, d.sxy, d.syy = sxx/sw-mx*mx, sxy/sw-mx*my, syy/sw-my*my
		d.dark, d.light = dark, light
	}
	return d, d.sxx > 0 && d.syy > 0 && d.sxx*d.syy > d.sxy*d.sxy
}
