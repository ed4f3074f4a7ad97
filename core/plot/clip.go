package plot

// pt is a point in px.
type pt struct{ x, y float64 }

// clipSegment clips the segment a-b to the rectangle r by the parametric
// method of Y.-D. Liang and B. A. Barsky, "A new concept and method for line
// clipping", ACM Trans. Graph. 3 (1984) 1-22. ok is false when nothing of
// the segment lies inside.
func clipSegment(ax, ay, bx, by float64, r box) (cax, cay, cbx, cby float64, ok bool) {
	t0, t1 := 0.0, 1.0
	dx, dy := bx-ax, by-ay
	for _, e := range [4][2]float64{{-dx, ax - r.x0}, {dx, r.x1 - ax}, {-dy, ay - r.y0}, {dy, r.y1 - ay}} {
		p, q := e[0], e[1]
		if p == 0 {
			if q < 0 {
				return 0, 0, 0, 0, false
			}
			continue
		}
		t := q / p
		if p < 0 {
			if t > t1 {
				return 0, 0, 0, 0, false
			}
			if t > t0 {
				t0 = t
			}
		} else {
			if t < t0 {
				return 0, 0, 0, 0, false
			}
			if t < t1 {
				t1 = t
			}
		}
	}
	return ax + t0*dx, ay + t0*dy, ax + t1*dx, ay + t1*dy, true
}

// clipPolygon clips a polygon to the rectangle r, edge by edge (I. E.
// Sutherland and G. W. Hodgman, "Reentrant polygon clipping", Commun. ACM
// 17 (1974) 32-42).
func clipPolygon(poly []pt, r box) []pt {
	for e := 0; e < 4 && len(poly) > 0; e++ {
		in := func(p pt) bool {
			switch e {
			case 0:
				return p.x >= r.x0
			case 1:
				return p.x <= r.x1
			case 2:
				return p.y >= r.y0
			}
			return p.y <= r.y1
		}
		cross := func(a, b pt) pt {
			var t float64
			switch e {
			case 0:
				t = (r.x0 - a.x) / (b.x - a.x)
			case 1:
				t = (r.x1 - a.x) / (b.x - a.x)
			case 2:
				t = (r.y0 - a.y) / (b.y - a.y)
			default:
				t = (r.y1 - a.y) / (b.y - a.y)
			}
			return pt{a.x + t*(b.x-a.x), a.y + t*(b.y-a.y)}
		}
		var out []pt
		for i, cur := range poly {
			prev := poly[(i+len(poly)-1)%len(poly)]
			switch {
			case in(cur) && in(prev):
				out = append(out, cur)
			case in(cur):
				out = append(out, cross(prev, cur), cur)
			case in(prev):
				out = append(out, cross(prev, cur))
			}
		}
		poly = out
	}
	return poly
}
