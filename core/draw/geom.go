package draw

import "math"

// This file holds the float64 geometry of the raster writer: flattening of
// Bézier segments into polylines, clipping to a rectangle and dashing. All
// coordinates here are device pixels.

// pt is a point in device pixels.
type pt struct{ x, y float64 }

func (a pt) sub(b pt) pt             { return pt{a.x - b.x, a.y - b.y} }
func (a pt) lerp(b pt, t float64) pt { return pt{a.x + t*(b.x-a.x), a.y + t*(b.y-a.y)} }
func (a pt) len() float64            { return math.Hypot(a.x, a.y) }

// rect is an axis-aligned rectangle [x0, x1] x [y0, y1] in pixels.
type rect struct{ x0, y0, x1, y1 float64 }

// polys is a list of polylines sharing one point buffer.
type polys struct {
	pts    []pt
	ends   []int  // exclusive end index of each polyline in pts
	closed []bool // whether each polyline is closed
}

func (ps *polys) reset() {
	ps.pts, ps.ends, ps.closed = ps.pts[:0], ps.ends[:0], ps.closed[:0]
}

// start begins a polyline at a.
func (ps *polys) start(a pt) {
	ps.pts = append(ps.pts, a)
	ps.ends = append(ps.ends, len(ps.pts))
	ps.closed = append(ps.closed, false)
}

// add appends a to the last polyline, skipping exact repeats.
func (ps *polys) add(a pt) {
	if last := ps.pts[len(ps.pts)-1]; last == a {
		return
	}
	ps.pts = append(ps.pts, a)
	ps.ends[len(ps.ends)-1]++
}

// close marks the last polyline closed.
func (ps *polys) close() { ps.closed[len(ps.closed)-1] = true }

// get returns polyline i and whether it is closed.
func (ps *polys) get(i int) ([]pt, bool) {
	s := 0
	if i > 0 {
		s = ps.ends[i-1]
	}
	return ps.pts[s:ps.ends[i]], ps.closed[i]
}

// flatTol is the largest distance, in pixels, between a Bézier segment and
// the polyline that replaces it.
const flatTol = 0.02

// maxSplit bounds the pieces one Bézier segment is cut into.
const maxSplit = 1000

// flatten appends the subpaths of p, scaled by s pixels per user unit, to ps
// as polylines. Curves whose control points all lie outside cull are
// replaced by their chord, which changes nothing inside cull.
func flatten(ps *polys, p *Path, s float64, cull rect) {
	var cur pt
	p.walk(func(v verb, xy []float64) {
		switch v {
		case moveTo:
			cur = pt{xy[0] * s, xy[1] * s}
			ps.start(cur)
		case lineTo:
			cur = pt{xy[0] * s, xy[1] * s}
			ps.add(cur)
		case cubicTo:
			b, c, d := pt{xy[0] * s, xy[1] * s}, pt{xy[2] * s, xy[3] * s}, pt{xy[4] * s, xy[5] * s}
			addCubic(ps, cur, b, c, d, cull)
			cur = d
		case closeP:
			ps.close()
		}
	})
}

// addCubic appends the cubic Bézier a, b, c, d (a is the current point).
// With n uniform pieces the chord error is at most max|B”|/(8 n^2), and
// max|B”| <= 6 max(|a-2b+c|, |b-2c+d|), so n = ceil(sqrt(0.75 dmax/tol))
// (the usual uniform-subdivision bound for polynomial curves).
func addCubic(ps *polys, a, b, c, d pt, cull rect) {
	if outside(cull, a, b, c, d) {
		ps.add(d)
		return
	}
	dmax := math.Max(pt{a.x - 2*b.x + c.x, a.y - 2*b.y + c.y}.len(),
		pt{b.x - 2*c.x + d.x, b.y - 2*c.y + d.y}.len())
	n := int(math.Ceil(math.Sqrt(0.75 * dmax / flatTol)))
	n = min(max(n, 1), maxSplit)
	for i := 1; i < n; i++ {
		t := float64(i) / float64(n)
		u := 1 - t
		w0, w1, w2, w3 := u*u*u, 3*u*u*t, 3*u*t*t, t*t*t
		ps.add(pt{w0*a.x + w1*b.x + w2*c.x + w3*d.x, w0*a.y + w1*b.y + w2*c.y + w3*d.y})
	}
	ps.add(d)
}

// addQuad appends the quadratic Bézier a, b, c (a is the current point);
// max|B”| = 2|a-2b+c|, so n = ceil(sqrt(|a-2b+c|/(4 tol))).
func addQuad(ps *polys, a, b, c pt) {
	dd := pt{a.x - 2*b.x + c.x, a.y - 2*b.y + c.y}.len()
	n := int(math.Ceil(math.Sqrt(dd / (4 * flatTol))))
	n = min(max(n, 1), maxSplit)
	for i := 1; i < n; i++ {
		t := float64(i) / float64(n)
		u := 1 - t
		ps.add(pt{u*u*a.x + 2*u*t*b.x + t*t*c.x, u*u*a.y + 2*u*t*b.y + t*t*c.y})
	}
	ps.add(c)
}

// outside reports whether all points lie on the far side of one edge of r.
func outside(r rect, q ...pt) bool {
	var l, t, rr, b = true, true, true, true
	for _, p := range q {
		l = l && p.x < r.x0
		rr = rr && p.x > r.x1
		t = t && p.y < r.y0
		b = b && p.y > r.y1
	}
	return l || t || rr || b
}

// clipPolygon clips the closed polygon in to r (Sutherland and Hodgman,
// "Reentrant polygon clipping", CACM 17(1), 1974) and returns the result in
// out, using tmp as scratch. Winding numbers of points inside r are kept, so
// both fill rules stay correct.
func clipPolygon(out, tmp []pt, in []pt, r rect) ([]pt, []pt) {
	a, b := append(tmp[:0], in...), out[:0]
	for edge := 0; edge < 4 && len(a) > 0; edge++ {
		b = b[:0]
		prev := a[len(a)-1]
		pin := inside(prev, r, edge)
		for _, p := range a {
			in := inside(p, r, edge)
			if in != pin {
				b = append(b, cross(prev, p, r, edge))
			}
			if in {
				b = append(b, p)
			}
			prev, pin = p, in
		}
		a, b = b, a
	}
	return a, b
}

// inside reports whether p is on the inner side of edge e (0 left, 1 right,
// 2 top, 3 bottom) of r.
func inside(p pt, r rect, e int) bool {
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

// cross returns where segment a-b crosses the line of edge e of r.
func cross(a, b pt, r rect, e int) pt {
	switch e {
	case 0, 1:
		x := r.x0
		if e == 1 {
			x = r.x1
		}
		return pt{x, a.y + (x-a.x)*(b.y-a.y)/(b.x-a.x)}
	}
	y := r.y0
	if e == 3 {
		y = r.y1
	}
	return pt{a.x + (y-a.y)*(b.x-a.x)/(b.y-a.y), y}
}

// clipSegment returns the parameter range [t0, t1] of segment a-b inside r
// (Liang and Barsky, "A new concept and method for line clipping", ACM TOG
// 3(1), 1984) and whether any part is inside.
func clipSegment(a, b pt, r rect) (t0, t1 float64, ok bool) {
	t0, t1 = 0, 1
	d := b.sub(a)
	for _, c := range [4][2]float64{{-d.x, a.x - r.x0}, {d.x, r.x1 - a.x}, {-d.y, a.y - r.y0}, {d.y, r.y1 - a.y}} {
		p, q := c[0], c[1]
		if p == 0 {
			if q < 0 {
				return 0, 0, false
			}
			continue
		}
		t := q / p
		if p < 0 {
			t0 = math.Max(t0, t)
		} else {
			t1 = math.Min(t1, t)
		}
	}
	return t0, t1, t0 <= t1
}

// clipLines appends to dst the parts of the polylines in src that lie in r.
// A polyline entirely inside r is copied unchanged (closed stays closed);
// others are cut into open pieces at the border of r.
func clipLines(dst, src *polys, r rect) {
	for i := range src.ends {
		line, closed := src.get(i)
		if !outsideAny(r, line) {
			dst.start(line[0])
			for _, p := range line[1:] {
				dst.add(p)
			}
			if closed {
				dst.close()
			}
			continue
		}
		// Walk the segments; a closed polyline is walked from a vertex
		// outside r, so that no visible corner is split between pieces.
		open, k0, n := false, 0, len(line)-1
		if closed {
			n++
			for !outsideAny(r, line[k0:k0+1]) {
				k0++
			}
		}
		for k := k0; k < k0+n; k++ {
			a, b := line[k%len(line)], line[(k+1)%len(line)]
			t0, t1, ok := clipSegment(a, b, r)
			if !ok || (t0 == t1 && a != b) { // outside, or touching a corner
				open = false
				continue
			}
			if !open || t0 > 0 {
				dst.start(a.lerp(b, t0))
			}
			dst.add(a.lerp(b, t1))
			open = t1 >= 1
		}
	}
}

// outsideAny reports whether a point of line lies outside r.
func outsideAny(r rect, line []pt) bool {
	for _, p := range line {
		if p.x < r.x0 || p.x > r.x1 || p.y < r.y0 || p.y > r.y1 {
			return true
		}
	}
	return false
}

// minDashPeriod is the shortest dash period, in pixels, that is drawn as
// dashes; a finer pattern cannot be resolved and is drawn solid.
const minDashPeriod = 0.1

// dashLines appends to dst the dashes of the polylines in src, with pattern
// d in pixels (even length, positive sum), restarting at every polyline.
// Only the parts inside r are produced, with the pattern phase kept, so very
// long lines cost time in proportion to their visible length. Dashes of
// zero length are kept (as dots for round or square caps) only if dots.
func dashLines(dst, src *polys, d []float64, r rect, dots bool) {
	period := 0.0
	for _, v := range d {
		period += v
	}
	for i := range src.ends {
		line, closed := src.get(i)
		st := dashState{d: d, period: period, rem: d[0], dst: dst, dots: dots}
		n := len(line) - 1
		if closed {
			n++
		}
		for k := 0; k < n; k++ {
			a, b := line[k], line[(k+1)%len(line)]
			L := b.sub(a).len()
			if L == 0 {
				continue
			}
			t0, t1, ok := clipSegment(a, b, r)
			if !ok {
				st.stop()
				st.skip(L)
				continue
			}
			if t0 > 0 {
				st.stop()
				st.skip(t0 * L)
			}
			st.walk(a, b, L, t0, t1)
			if t1 < 1 {
				st.stop()
				st.skip((1 - t1) * L)
			}
		}
		st.stop()
	}
}

// dashState walks a dash pattern along a polyline.
type dashState struct {
	d       []float64
	period  float64
	i       int     // index of the current element (even: dash, odd: gap)
	rem     float64 // length left in the current element, pixels
	drawing bool    // a dash piece is open in dst
	dst     *polys
	dir     pt   // direction of the current segment, for zero-length dashes
	dots    bool // whether zero-length dashes are drawn
}

// stop ends the open dash piece, if any. A piece that has no length (a
// dash cut to nothing at the end of the line) is removed.
func (s *dashState) stop() {
	if s.drawing && s.dst.ends[len(s.dst.ends)-1]-lineStart(s.dst) == 1 {
		s.dst.pts = s.dst.pts[:len(s.dst.pts)-1]
		s.dst.ends = s.dst.ends[:len(s.dst.ends)-1]
		s.dst.closed = s.dst.closed[:len(s.dst.closed)-1]
	}
	s.drawing = false
}

// lineStart returns the start index of the last polyline of ps.
func lineStart(ps *polys) int {
	if len(ps.ends) < 2 {
		return 0
	}
	return ps.ends[len(ps.ends)-2]
}

// next moves to the next pattern element.
func (s *dashState) next() {
	s.i = (s.i + 1) % len(s.d)
	s.rem = s.d[s.i]
}

// skip advances the pattern by length l without drawing.
func (s *dashState) skip(l float64) {
	if l < s.rem {
		s.rem -= l
		return
	}
	l -= s.rem
	s.next()
	l = math.Mod(l, s.period)
	for l >= s.rem {
		l -= s.rem
		s.next()
	}
	s.rem -= l
}

// walk draws the pattern along a-b (length L) from parameter t0 to t1. An
// element ending within 1e-9 px of t1 is taken to outlast the segment, so
// rounding cannot start a new dash at the very end of a line.
func (s *dashState) walk(a, b pt, L, t0, t1 float64) {
	s.dir = pt{(b.x - a.x) / L, (b.y - a.y) / L}
	t := t0
	for {
		on := s.i%2 == 0
		step := s.rem / L
		if (t+step-t1)*L >= -1e-9 {
			// The element outlasts this segment.
			if on {
				s.piece(a.lerp(b, t), a.lerp(b, t1))
			}
			s.rem = math.Max(s.rem-(t1-t)*L, 0)
			return
		}
		if on {
			p := a.lerp(b, t)
			if s.d[s.i] == 0 {
				// A zero-length dash: a piece 1/64 px long along the line,
				// which the stroker caps into a dot or a square; with butt
				// caps it shows nothing.
				if s.dots {
					s.piece(p, pt{p.x + s.dir.x/64, p.y + s.dir.y/64})
				}
			} else {
				s.piece(p, a.lerp(b, t+step))
			}
			s.stop()
		}
		t += step
		s.next()
	}
}

// piece extends the open dash to q (starting it at p if none is open).
func (s *dashState) piece(p, q pt) {
	if !s.drawing {
		s.dst.start(p)
		s.drawing = true
	}
	s.dst.add(q)
}
