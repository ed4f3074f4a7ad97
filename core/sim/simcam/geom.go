package simcam

import "math"

// vec is a point or vector in image coordinates (px).
type vec = [2]float64

// polyArea returns the signed (shoelace) area of the polygon p; it is
// positive when p turns from +x towards +y (clockwise on screen, y down).
func polyArea(p []vec) float64 {
	a := 0.0
	n := len(p)
	for i := range n {
		q, r := p[i], p[(i+1)%n]
		a += q[0]*r[1] - r[0]*q[1]
	}
	return a / 2
}

// isConvex reports whether the polygon (any winding) is convex.
func isConvex(p []vec) bool {
	n := len(p)
	sign := 0.0
	for i := range n {
		a, b, c := p[i], p[(i+1)%n], p[(i+2)%n]
		z := (b[0]-a[0])*(c[1]-b[1]) - (b[1]-a[1])*(c[0]-b[0])
		if z == 0 {
			continue
		}
		if sign == 0 {
			sign = z
		} else if (z > 0) != (sign > 0) {
			return false
		}
	}
	return true
}

// positive returns a copy of p with positive signed area.
func positive(p []vec) []vec {
	q := append([]vec(nil), p...)
	if polyArea(q) < 0 {
		for i, j := 0, len(q)-1; i < j; i, j = i+1, j-1 {
			q[i], q[j] = q[j], q[i]
		}
	}
	return q
}

// convexPieces splits a simple polygon into convex pieces of positive
// orientation: the polygon itself when convex, else triangles by ear
// clipping (O(n^2), fine for the few vertices of test targets).
func convexPieces(p []vec) [][]vec {
	q := positive(dedupe(p))
	if len(q) < 3 {
		return nil
	}
	if isConvex(q) {
		return [][]vec{q}
	}
	var out [][]vec
	idx := make([]int, len(q))
	for i := range idx {
		idx[i] = i
	}
	for len(idx) > 3 {
		found := false
		n := len(idx)
		for k := range n {
			a, b, c := q[idx[(k+n-1)%n]], q[idx[k]], q[idx[(k+1)%n]]
			if cross(a, b, c) <= 0 {
				continue // reflex or degenerate corner
			}
			ear := true
			for m := range n {
				if m == k || m == (k+n-1)%n || m == (k+1)%n {
					continue
				}
				if inTriangle(q[idx[m]], a, b, c) {
					ear = false
					break
				}
			}
			if !ear {
				continue
			}
			out = append(out, []vec{a, b, c})
			idx = append(idx[:k], idx[k+1:]...)
			found = true
			break
		}
		if !found { // numerically degenerate remainder: fan it
			for k := 1; k+1 < len(idx); k++ {
				t := []vec{q[idx[0]], q[idx[k]], q[idx[k+1]]}
				if polyArea(t) > 0 {
					out = append(out, t)
				}
			}
			return out
		}
	}
	out = append(out, []vec{q[idx[0]], q[idx[1]], q[idx[2]]})
	return out
}

func dedupe(p []vec) []vec {
	var q []vec
	for i, v := range p {
		if v != p[(i+len(p)-1)%len(p)] {
			q = append(q, v)
		}
	}
	return q
}

// cross returns the z component of (b - a) x (c - b).
func cross(a, b, c vec) float64 {
	return (b[0]-a[0])*(c[1]-b[1]) - (b[1]-a[1])*(c[0]-b[0])
}

func inTriangle(p, a, b, c vec) bool {
	d1 := (b[0]-a[0])*(p[1]-a[1]) - (b[1]-a[1])*(p[0]-a[0])
	d2 := (c[0]-b[0])*(p[1]-b[1]) - (c[1]-b[1])*(p[0]-b[0])
	d3 := (a[0]-c[0])*(p[1]-c[1]) - (a[1]-c[1])*(p[0]-c[0])
	return d1 >= 0 && d2 >= 0 && d3 >= 0
}

// clipConvex clips the convex polygon subj by the convex polygon win (both
// of positive orientation) with the Sutherland-Hodgman algorithm
// (I. E. Sutherland and G. W. Hodgman, Reentrant polygon clipping, Comm. ACM
// 17(1), 1974), writing the result into dst[:0] and using tmp as scratch.
// Both buffers must not alias subj.
func clipConvex(dst, tmp, subj, win []vec) []vec {
	in := subj
	out := dst[:0]
	n := len(win)
	for i := range n {
		a, b := win[i], win[(i+1)%n]
		ex, ey := b[0]-a[0], b[1]-a[1]
		if i%2 == 0 {
			out = tmp[:0]
		} else {
			out = dst[:0]
		}
		m := len(in)
		if m == 0 {
			return dst[:0]
		}
		prev := in[m-1]
		dp := ex*(prev[1]-a[1]) - ey*(prev[0]-a[0])
		for _, cur := range in {
			dc := ex*(cur[1]-a[1]) - ey*(cur[0]-a[0])
			if dc >= 0 {
				if dp < 0 {
					out = append(out, lerp(prev, cur, dp/(dp-dc)))
				}
				out = append(out, cur)
			} else if dp >= 0 {
				if dp > 0 {
					out = append(out, lerp(prev, cur, dp/(dp-dc)))
				}
			}
			prev, dp = cur, dc
		}
		in = out
	}
	if len(in) == 0 {
		return dst[:0]
	}
	if n%2 == 1 { // result landed in tmp: copy to dst
		dst = append(dst[:0], in...)
		return dst
	}
	return in
}

func lerp(a, b vec, t float64) vec {
	return vec{a[0] + t*(b[0]-a[0]), a[1] + t*(b[1]-a[1])}
}

// pointInPolygon reports whether p lies inside the simple polygon q (even-odd
// rule; points on the boundary go either way).
func pointInPolygon(p vec, q []vec) bool {
	in := false
	n := len(q)
	j := n - 1
	for i := range n {
		a, b := q[i], q[j]
		if (a[1] > p[1]) != (b[1] > p[1]) {
			x := a[0] + (p[1]-a[1])*(b[0]-a[0])/(b[1]-a[1])
			if p[0] < x {
				in = !in
			}
		}
		j = i
	}
	return in
}

// bbox is an axis-aligned box [X0, X1] x [Y0, Y1].
type bbox struct{ X0, Y0, X1, Y1 float64 }

func boxOf(p []vec) bbox {
	b := bbox{math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)}
	for _, v := range p {
		b.X0, b.X1 = math.Min(b.X0, v[0]), math.Max(b.X1, v[0])
		b.Y0, b.Y1 = math.Min(b.Y0, v[1]), math.Max(b.Y1, v[1])
	}
	return b
}

func (b bbox) overlaps(c bbox) bool {
	return b.X0 <= c.X1 && c.X0 <= b.X1 && b.Y0 <= c.Y1 && c.Y0 <= b.Y1
}

func (b bbox) contains(p vec) bool {
	return p[0] >= b.X0 && p[0] <= b.X1 && p[1] >= b.Y0 && p[1] <= b.Y1
}

// squareAt returns the unit pixel square centred at (x, y), positive
// orientation, into dst.
func squareAt(dst []vec, x, y float64) []vec {
	return append(dst[:0], vec{x - 0.5, y - 0.5}, vec{x + 0.5, y - 0.5}, vec{x + 0.5, y + 0.5}, vec{x - 0.5, y + 0.5})
}
