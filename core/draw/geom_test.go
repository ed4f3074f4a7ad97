package draw

import (
	"math"
	"testing"
)

// lineLen returns the total length of the polylines in ps and their count.
func lineLen(ps *polys) (total float64, n int) {
	for i := range ps.ends {
		line, _ := ps.get(i)
		for k := 1; k < len(line); k++ {
			total += line[k].sub(line[k-1]).len()
		}
	}
	return total, len(ps.ends)
}

// Dashing a polyline keeps the pattern across corners, restarts it per
// polyline and clips it without losing phase (closed forms in the table).
func TestDashLines(t *testing.T) {
	big := rect{-1e9, -1e9, 1e9, 1e9}
	tests := []struct {
		name      string
		lines     [][]pt
		closed    bool
		dash      []float64
		clip      rect
		wantLen   float64
		wantCount int
	}{
		// 100 px, 6 on 4 off: ten dashes of 6.
		{"straight", [][]pt{{{0, 0}, {100, 0}}}, false, []float64{6, 4}, big, 60, 10},
		// An L of 5 + 5 px with 3 on 2 off: dashes [0,3], [5,8] (across the
		// corner it is one piece: 5..8 starts at the corner), total 6.
		{"corner", [][]pt{{{0, 0}, {5, 0}, {5, 5}}}, false, []float64{3, 2}, big, 6, 2},
		// A dash running through a corner stays one piece: 4 on 6 off on an
		// L of 2 + 8: [0,4] spans the corner.
		{"through corner", [][]pt{{{0, 0}, {2, 0}, {2, 8}}}, false, []float64{4, 6}, big, 4, 1},
		// Two polylines restart the pattern: 7 px each with 5 on 5 off.
		{"restart", [][]pt{{{0, 0}, {7, 0}}, {{0, 1}, {7, 1}}}, false, []float64{5, 5}, big, 10, 2},
		// A closed square of side 10 (perimeter 40), 10 on 10 off: the
		// closing side is dashed too: sides 1 and 3 inked.
		{"closed", [][]pt{{{0, 0}, {10, 0}, {10, 10}, {0, 10}}}, true, []float64{10, 10}, big, 20, 2},
		// Clipped to x in [25, 55]: the dashes there are [20,26], [30,36],
		// [40,46], [50,56] -> 1 + 6 + 6 + 5 = 18 px, phase kept.
		{"clipped", [][]pt{{{0, 0}, {100, 0}}}, false, []float64{6, 4}, rect{25, -1, 55, 1}, 18, 4},
		// A line 1e9 px long clipped to 100 px costs 100 px of dashes.
		{"huge clipped", [][]pt{{{-1e9, 0}, {1e9, 0}}}, false, []float64{1, 1}, rect{0, -1, 100, 1}, 50, 50},
	}
	for _, tc := range tests {
		var src, dst polys
		for _, l := range tc.lines {
			src.start(l[0])
			for _, q := range l[1:] {
				src.add(q)
			}
			if tc.closed {
				src.close()
			}
		}
		dashLines(&dst, &src, tc.dash, tc.clip, true)
		got, n := lineLen(&dst)
		// Points are interpolated from the segment ends: 1e9 px ends leave
		// about 1e-7 px of rounding per point.
		if math.Abs(got-tc.wantLen) > 1e-5 || n != tc.wantCount {
			t.Errorf("%s: %d dashes, length %g; want %d, %g", tc.name, n, got, tc.wantCount, tc.wantLen)
		}
	}
}

// Clipping an open polyline splits it at the border; a closed one entirely
// inside stays closed; a closed one crossing the border is opened at a
// vertex outside, so no corner inside is split.
func TestClipLines(t *testing.T) {
	r := rect{0, 0, 10, 10}
	var src, dst polys
	src.start(pt{-5, 5})
	src.add(pt{5, 5})
	src.add(pt{5, 15})
	src.add(pt{8, 5})
	src.add(pt{8, 8})
	clipLines(&dst, &src, r)
	got, n := lineLen(&dst)
	// Inside: (0,5)-(5,5)-(5,10), length 10; then the segment (5,15)-(8,5)
	// enters at (6.5,10): (6.5,10)-(8,5)-(8,8), length hypot(1.5,5) + 3.
	want := 10 + math.Hypot(1.5, 5) + 3
	if math.Abs(got-want) > 1e-9 || n != 2 {
		t.Errorf("open: %d pieces, length %g; want 2, %g", n, got, want)
	}
	dst.reset()
	src.reset()
	src.start(pt{1, 1})
	src.add(pt{9, 1})
	src.add(pt{9, 9})
	src.close()
	clipLines(&dst, &src, r)
	if _, closed := dst.get(0); !closed || len(dst.ends) != 1 {
		t.Error("closed polyline inside the clip was opened")
	}
	dst.reset()
	src.reset()
	src.start(pt{5, 5}) // inside: the corner at (5, 5) must stay whole
	src.add(pt{15, 5})
	src.add(pt{5, 15})
	src.close()
	clipLines(&dst, &src, r)
	if len(dst.ends) != 1 {
		t.Fatalf("%d pieces, want 1", len(dst.ends))
	}
	line, _ := dst.get(0)
	found := false
	for k := 1; k+1 < len(line); k++ {
		if line[k] == (pt{5, 5}) {
			found = true
		}
	}
	if !found {
		t.Errorf("corner (5, 5) is not an inner vertex of %v", line)
	}
}

// Sutherland-Hodgman clipping keeps the area inside the rectangle (closed
// forms): the triangle (0,0), (20,0), (0,20) covers all of [0,10]^2 (area
// 100); of [5,15]x[0,10] it misses the corner (10,10), (15,10), (15,5)
// beyond x + y = 20 (area 12.5), leaving 87.5; it misses [30,40]^2.
func TestClipPolygon(t *testing.T) {
	tri := []pt{{0, 0}, {20, 0}, {0, 20}}
	tests := []struct {
		r    rect
		want float64
	}{
		{rect{0, 0, 10, 10}, 100},
		{rect{5, 0, 15, 10}, 87.5},
		{rect{30, 30, 40, 40}, 0},
	}
	for _, tc := range tests {
		out, _ := clipPolygon(nil, nil, tri, tc.r)
		if a := math.Abs(area(out)); math.Abs(a-tc.want) > 1e-9 {
			t.Errorf("clip to %v: area %g, want %g", tc.r, a, tc.want)
		}
	}
}

// area returns the signed shoelace area of a polygon.
func area(p []pt) float64 {
	s := 0.0
	for i := range p {
		j := (i + 1) % len(p)
		s += p[i].x*p[j].y - p[j].x*p[i].y
	}
	return s / 2
}

// Flattening keeps within flatTol of the curve: the polyline of a circle of
// radius 100 px has all its vertices on the curve and its chords' midpoints
// within 0.02 px (+ the 0.027 % cubic error, 0.027 px) of the circle.
func TestFlattenTolerance(t *testing.T) {
	var p Path
	p.Circle(0, 0, 100)
	var ps polys
	flatten(&ps, &p, 1, rect{-200, -200, 200, 200})
	line, closed := ps.get(0)
	if !closed || len(line) < 40 {
		t.Fatalf("closed %v, %d points", closed, len(line))
	}
	for k := range line {
		a, b := line[k], line[(k+1)%len(line)]
		m := pt{(a.x + b.x) / 2, (a.y + b.y) / 2}
		if d := 100 - m.len(); d > flatTol+0.027 {
			t.Errorf("chord %d sags %.4f px inside the circle", k, d)
		}
	}
	// A curve far outside the cull rectangle is replaced by its chord.
	ps.reset()
	p.Reset()
	p.MoveTo(0, 0)
	p.CubicTo(1e6, 1e6, 2e6, 1e6, 3e6, 0)
	flatten(&ps, &p, 1, rect{-10, -10, 10, -5})
	if line, _ := ps.get(0); len(line) != 2 {
		t.Errorf("culled curve has %d points, want 2", len(line))
	}
}
