package edgefind

import "sagitta/core/plane"

// contour is a polyline along which the image crosses its local threshold,
// in coarse continuous coordinates (pixel centres at half-integers).
type contour struct {
	pts    [][2]float64
	closed bool
}

// contours traces the zero crossings of g = v - t by marching squares
// (W. E. Lorensen and H. E. Cline, "Marching cubes", SIGGRAPH 1987, in its
// two-dimensional form): every 2 x 2 cell of pixel centres whose corners lie
// on both sides gets one or two segments between linearly interpolated
// crossings on its sides; saddle cells are resolved by the cell's mean. The
// segments are then joined into polylines through their shared crossings.
// Polylines shorter than minLen coarse px are dropped.
func contours(v, t *plane.Plane, minLen float64) []contour {
	w, h := v.W, v.H
	g := func(x, y int) float64 { i := y*w + x; return float64(v.Pix[i] - t.Pix[i]) }
	// Crossing ids: horizontal side from (x,y) to (x+1,y) is 2*(y*w+x),
	// vertical side from (x,y) to (x,y+1) is 2*(y*w+x)+1.
	// Each crossing found gets a number k (in the order found): at[id] =
	// k+1, its place pos[k], the segments through it ends[k] (at most two:
	// the two cells that share its side; more go to extra, in order).
	type seg struct{ a, b int }
	var segs []seg
	at := make([]int32, 2*w*h)
	var pos [][2]float64
	cross := func(id int) int {
		if at[id] != 0 {
			return id
		}
		c := id / 2
		x, y := c%w, c/w
		x2, y2 := x+1, y
		if id%2 == 1 {
			x2, y2 = x, y+1
		}
		g0, g1 := g(x, y), g(x2, y2)
		f := 0.5
		if g0 != g1 {
			f = g0 / (g0 - g1)
		}
		pos = append(pos, [2]float64{float64(x) + 0.5 + f*float64(x2-x), float64(y) + 0.5 + f*float64(y2-y)})
		at[id] = int32(len(pos))
		return id
	}
	for y := 0; y+1 < h; y++ {
		for x := 0; x+1 < w; x++ {
			tl, tr, br, bl := g(x, y), g(x+1, y), g(x+1, y+1), g(x, y+1)
			c := 0
			if tl > 0 {
				c |= 1
			}
			if tr > 0 {
				c |= 2
			}
			if br > 0 {
				c |= 4
			}
			if bl > 0 {
				c |= 8
			}
			if c == 0 || c == 15 {
				continue
			}
			T, B := 2*(y*w+x), 2*((y+1)*w+x)
			L, R := 2*(y*w+x)+1, 2*(y*w+x+1)+1
			add := func(a, b int) { segs = append(segs, seg{cross(a), cross(b)}) }
			light := tl+tr+br+bl > 0
			switch c {
			case 1, 14:
				add(L, T)
			case 2, 13:
				add(T, R)
			case 3, 12:
				add(L, R)
			case 4, 11:
				add(R, B)
			case 6, 9:
				add(T, B)
			case 7, 8:
				add(L, B)
			case 5:
				if light {
					add(L, B)
					add(T, R)
				} else {
					add(L, T)
					add(R, B)
				}
			case 10:
				if light {
					add(L, T)
					add(R, B)
				} else {
					add(T, R)
					add(B, L)
				}
			}
		}
	}
	// Join segments through shared crossings.
	ends := make([][2]int32, len(pos))
	for i := range ends {
		ends[i] = [2]int32{-1, -1}
	}
	extra := map[int][]int{}
	link := func(id, i int) {
		e := &ends[at[id]-1]
		switch {
		case e[0] < 0:
			e[0] = int32(i)
		case e[1] < 0:
			e[1] = int32(i)
		default:
			extra[id] = append(extra[id], i)
		}
	}
	for i, s := range segs {
		link(s.a, i)
		link(s.b, i)
	}
	// through returns the segments through crossing id, in the order
	// linked.
	through := func(id int, buf []int) []int {
		buf = buf[:0]
		for _, j := range ends[at[id]-1] {
			if j >= 0 {
				buf = append(buf, int(j))
			}
		}
		return append(buf, extra[id]...)
	}
	var buf []int
	used := make([]bool, len(segs))
	var out []contour
	walk := func(start, from int) []int {
		// Follow segments from crossing `from` leaving through segment start.
		var ids []int
		cur, here := start, from
		for {
			used[cur] = true
			s := segs[cur]
			next := s.a
			if next == here {
				next = s.b
			}
			ids = append(ids, next)
			here = next
			cur = -1
			buf = through(here, buf)
			for _, j := range buf {
				if !used[j] {
					cur = j
					break
				}
			}
			if cur < 0 {
				return ids
			}
		}
	}
	for i := range segs {
		if used[i] {
			continue
		}
		s := segs[i]
		fwd := walk(i, s.a) // a -> b -> ...
		// Extend backwards from a.
		var back []int
		for _, j := range through(s.a, nil) {
			if !used[j] {
				back = walk(j, s.a)
				break
			}
		}
		ids := make([]int, 0, len(back)+len(fwd)+1)
		for k := len(back) - 1; k >= 0; k-- {
			ids = append(ids, back[k])
		}
		ids = append(ids, s.a)
		ids = append(ids, fwd...)
		closed := len(ids) > 2 && ids[0] == ids[len(ids)-1]
		if closed {
			ids = ids[:len(ids)-1]
		}
		ct := contour{pts: make([][2]float64, len(ids)), closed: closed}
		for k, id := range ids {
			ct.pts[k] = pos[at[id]-1]
		}
		if length(ct) >= minLen {
			out = append(out, ct)
		}
	}
	return out
}

// length returns the length of the polyline.
func length(c contour) float64 {
	var l float64
	for i := 1; i < len(c.pts); i++ {
		l += dist(c.pts[i-1], c.pts[i])
	}
	if c.closed && len(c.pts) > 1 {
		l += dist(c.pts[len(c.pts)-1], c.pts[0])
	}
	return l
}
