package draw

import "math"

// verb is one path construction step.
type verb uint8

const (
	moveTo  verb = iota // 1 point
	lineTo              // 1 point
	cubicTo             // 3 points: two control points, then the end point
	closeP              // no point: a straight line back to the subpath start
)

// npts is the number of coordinates (x, y pairs times 2) each verb carries.
var npts = [...]int{moveTo: 2, lineTo: 2, cubicTo: 6, closeP: 0}

// Path is a sequence of subpaths in user units, each a start point followed
// by straight and cubic Bézier segments, optionally closed. The zero value is
// an empty path ready to use; Reset empties it for reuse.
//
// Path construction is normalised so that every writer sees the same
// geometry: a segment added without a current point starts a subpath at its
// own end point, and a segment added after Close starts a new subpath at the
// closed subpath's start (the SVG rule, SVG 1.1 §8.3.3).
type Path struct {
	verbs []verb
	xy    []float64
	// sx, sy is the start of the current subpath; pen reports whether there
	// is a current point, closed whether the last verb was Close.
	sx, sy      float64
	pen, closed bool
}

// Reset empties p, keeping its storage.
func (p *Path) Reset() {
	p.verbs, p.xy = p.verbs[:0], p.xy[:0]
	p.pen, p.closed = false, false
}

// Empty reports whether p has no segment.
func (p *Path) Empty() bool {
	for _, v := range p.verbs {
		if v != moveTo {
			return false
		}
	}
	return true
}

// MoveTo starts a new subpath at (x, y).
func (p *Path) MoveTo(x, y float64) {
	p.verbs = append(p.verbs, moveTo)
	p.xy = append(p.xy, x, y)
	p.sx, p.sy, p.pen, p.closed = x, y, true, false
}

// ensurePen starts a subpath where a segment needs one (see Path).
func (p *Path) ensurePen(x, y float64) {
	switch {
	case !p.pen:
		p.MoveTo(x, y)
	case p.closed:
		p.MoveTo(p.sx, p.sy)
	}
}

// LineTo adds a straight segment from the current point to (x, y).
func (p *Path) LineTo(x, y float64) {
	p.ensurePen(x, y)
	p.verbs = append(p.verbs, lineTo)
	p.xy = append(p.xy, x, y)
}

// CubicTo adds a cubic Bézier segment from the current point to (x, y) with
// control points (x1, y1) and (x2, y2).
func (p *Path) CubicTo(x1, y1, x2, y2, x, y float64) {
	p.ensurePen(x1, y1)
	p.verbs = append(p.verbs, cubicTo)
	p.xy = append(p.xy, x1, y1, x2, y2, x, y)
}

// Close closes the current subpath with a straight line to its start. It
// does nothing when the subpath has no segment or is already closed.
func (p *Path) Close() {
	if !p.pen || p.closed || len(p.verbs) == 0 || p.verbs[len(p.verbs)-1] == moveTo {
		return
	}
	p.verbs = append(p.verbs, closeP)
	p.closed = true
}

// Rect adds the closed rectangle with top-left corner (x, y), width w and
// height h, traced clockwise on the page: (x, y), (x+w, y), (x+w, y+h),
// (x, y+h). A negative w or h traces it the other way round.
func (p *Path) Rect(x, y, w, h float64) {
	p.MoveTo(x, y)
	p.LineTo(x+w, y)
	p.LineTo(x+w, y+h)
	p.LineTo(x, y+h)
	p.Close()
}

// circleK is the control-point distance, in radii, of the four-segment cubic
// Bézier circle: 4/3 (sqrt(2) - 1) = 0.5522847498 (a standard result; the
// radial error is at most 0.027 % of the radius).
const circleK = 4 * (math.Sqrt2 - 1) / 3

// Circle adds a closed circle of radius r centred on (cx, cy), made of four
// cubic Bézier segments and traced clockwise on the page from (cx+r, cy).
func (p *Path) Circle(cx, cy, r float64) {
	k := circleK * r
	p.MoveTo(cx+r, cy)
	p.CubicTo(cx+r, cy+k, cx+k, cy+r, cx, cy+r)
	p.CubicTo(cx-k, cy+r, cx-r, cy+k, cx-r, cy)
	p.CubicTo(cx-r, cy-k, cx-k, cy-r, cx, cy-r)
	p.CubicTo(cx+k, cy-r, cx+r, cy-k, cx+r, cy)
	p.Close()
}

// Polygon adds a closed polygon through the points (xy[0], xy[1]),
// (xy[2], xy[3]), ...; an odd trailing coordinate is ignored.
func (p *Path) Polygon(xy ...float64) {
	if len(xy) < 2 {
		return
	}
	p.MoveTo(xy[0], xy[1])
	for i := 2; i+1 < len(xy); i += 2 {
		p.LineTo(xy[i], xy[i+1])
	}
	p.Close()
}

// walk calls fn for every verb of p with its coordinates, dropping subpaths
// that have a coordinate beyond MaxCoord (or NaN) and subpaths without a
// segment. fn sees a moveTo before every subpath.
func (p *Path) walk(fn func(v verb, xy []float64)) {
	i, k := 0, 0 // verb and coordinate index
	for i < len(p.verbs) {
		// Find the subpath [i, j) and its coordinates [k, m).
		j, m, ok := i+1, k+npts[p.verbs[i]], true
		for j < len(p.verbs) && p.verbs[j] != moveTo {
			m += npts[p.verbs[j]]
			j++
		}
		for _, v := range p.xy[k:m] {
			if !finite(v) {
				ok = false
				break
			}
		}
		if ok && j-i > 1 {
			c := k
			for _, v := range p.verbs[i:j] {
				fn(v, p.xy[c:c+npts[v]])
				c += npts[v]
			}
		}
		i, k = j, m
	}
}
