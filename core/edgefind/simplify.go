package edgefind

import "math"

func dist(a, b [2]float64) float64 { return math.Hypot(a[0]-b[0], a[1]-b[1]) }

// simplify returns the indices of the polyline's vertices kept by the
// Douglas-Peucker algorithm (D. H. Douglas and T. K. Peucker, Cartographica
// 10(2), 1973) with tolerance tol. A closed polyline is first split at the
// vertex farthest from its first point.
func simplify(c contour, tol float64) []int {
	n := len(c.pts)
	if n < 2 {
		return nil
	}
	if !c.closed {
		return append([]int{0}, dp(c.pts, 0, n-1, tol)...)
	}
	far, best := 0, -1.0
	for i, p := range c.pts {
		if d := dist(p, c.pts[0]); d > best {
			far, best = i, d
		}
	}
	ext := append(append([][2]float64(nil), c.pts...), c.pts[0])
	idx := append([]int{0}, dp(ext, 0, far, tol)...)
	return append(idx, dp(ext, far, n, tol)...) // the last index is n, the closing copy of vertex 0
}

// dp returns the kept vertices of pts[i..j] after i, in order, j included.
func dp(pts [][2]float64, i, j int, tol float64) []int {
	// Iterative stack to avoid deep recursion on long contours.
	type span struct{ a, b int }
	stack := []span{{i, j}}
	var keep []int
	for len(stack) > 0 {
		s := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		best, at := -1.0, -1
		for k := s.a + 1; k < s.b; k++ {
			if d := lineDist(pts[k], pts[s.a], pts[s.b]); d > best {
				best, at = d, k
			}
		}
		if best > tol {
			stack = append(stack, span{at, s.b}, span{s.a, at})
			continue
		}
		keep = append(keep, s.b)
	}
	return keep
}

// lineDist is the distance of p from the line through a and b.
func lineDist(p, a, b [2]float64) float64 {
	dx, dy := b[0]-a[0], b[1]-a[1]
	l := math.Hypot(dx, dy)
	if l == 0 {
		return dist(p, a)
	}
	return math.Abs((p[0]-a[0])*dy-(p[1]-a[1])*dx) / l
}

// fitLine fits a straight line to points by total least squares and returns
// its centroid, unit direction, the extent of the points along it (min and
// max of the projection) and the rms distance of the points from it.
func fitLine(pts [][2]float64) (cx, cy, dx, dy, lo, hi, rms float64) {
	n := float64(len(pts))
	for _, p := range pts {
		cx += p[0]
		cy += p[1]
	}
	cx /= n
	cy /= n
	var sxx, sxy, syy float64
	for _, p := range pts {
		x, y := p[0]-cx, p[1]-cy
		sxx += x * x
		sxy += x * y
		syy += y * y
	}
	// Direction of largest spread: eigenvector of the scatter matrix.
	ang := 0.5 * math.Atan2(2*sxy, sxx-syy)
	dx, dy = math.Cos(ang), math.Sin(ang)
	lo, hi = math.Inf(1), math.Inf(-1)
	var ss float64
	for _, p := range pts {
		x, y := p[0]-cx, p[1]-cy
		t := x*dx + y*dy
		lo, hi = math.Min(lo, t), math.Max(hi, t)
		d := -x*dy + y*dx
		ss += d * d
	}
	return cx, cy, dx, dy, lo, hi, math.Sqrt(ss / n)
}
