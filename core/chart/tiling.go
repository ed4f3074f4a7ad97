package chart

import (
	"fmt"
	"math"
)

// A chart across sheets. A photo of a larger chart is taken from farther
// away, so the print's own blur and dot grid shrink on the sensor in
// proportion (core/plan). The design of a chart across N x N sheets (Code.Sheets = N)
// is the single sheet's, cut along grid lines into N x N pieces so that no
// target crosses a seam; each piece is printed on its own sheet with four
// recognition marks of its own, so that the analysis finds each sheet's
// pose separately: sheets hung side by side are never perfectly aligned.
//
// Marks: a sheet's marks lie on inner grid corners of its piece, clear of
// every target by the clearances of the package doc, the four that span
// the largest quadrilateral. Their ring words are the chart code's own (mark.go), with
// index = corner (0 top-left, 1 top-right, 2 bottom-right, 3 bottom-left)
// on a 2 x 2 chart and 4 + corner on a 3 x 3 chart; every sheet repeats the
// same four words, and the analysis tells the sheets apart by where the
// marks lie (photo_tiles.go). The ring code holds 64 words (8 chart codes x
// 8 marks) and the lexicographic rule of mark.go gives no more than 65, so
// the sheets cannot have words of their own.

// Sheet is one sheet of a chart across several: its row and column (from
// 0, top-left) and the piece of the chart frame it carries, cells [I0, I1)
// x [J0, J1), which is [X0, X1] x [Y0, Y1] chart units.
type Sheet struct {
	Row, Col       int
	I0, J0, I1, J1 int
	X0, Y0, X1, Y1 float64
}

// Name is the sheet's number printed on it: "row-column", from 1, e.g.
// "1-2" for the first row's second sheet.
func (s Sheet) Name() string { return fmt.Sprintf("%d-%d", s.Row+1, s.Col+1) }

// Contains reports whether the chart point (x, y) lies on the sheet's piece.
func (s Sheet) Contains(x, y float64) bool {
	return x >= s.X0 && x <= s.X1 && y >= s.Y0 && y <= s.Y1
}

// splitCells cuts n cells into k runs, as equal as possible, the middle
// run (k = 3) taking one extra cell or the outer runs one each.
func splitCells(n, k int) []int {
	out := make([]int, k)
	for i := range out {
		out[i] = n / k
	}
	switch r := n % k; {
	case r == 1 && k == 2:
		out[0]++
	case r == 1:
		out[k/2]++
	case r == 2:
		out[0]++
		out[k-1]++
	}
	return out
}

// markClearance is the least distance, chart units, from a sheet mark's
// centre to any target: the ring's outer radius plus the 0.0105 the
// single-sheet design keeps between a ring and a target (design_test.go),
// which also clears the quiet zone.
const markClearance = RingOutOfR*MarkR + 0.0105 + 1e-4

// placeSheetMarks cuts the design into Code.Sheets x Code.Sheets pieces
// and gives each four marks of chart code value v.
func (d *Design) placeSheetMarks(v int) {
	n := d.Code.Sheets
	cw, ch := d.W/float64(d.Cols), d.H/float64(d.Rows)
	cols, rows := splitCells(d.Cols, n), splitCells(d.Rows, n)
	j0 := 0
	for r := range n {
		i0 := 0
		for c := range n {
			s := Sheet{Row: r, Col: c, I0: i0, J0: j0, I1: i0 + cols[c], J1: j0 + rows[r]}
			s.X0, s.Y0 = -d.W/2+float64(s.I0)*cw, -d.H/2+float64(s.J0)*ch
			s.X1, s.Y1 = -d.W/2+float64(s.I1)*cw, -d.H/2+float64(s.J1)*ch
			d.Sheets = append(d.Sheets, s)
			i0 = s.I1
		}
		j0 += rows[r]
	}
	base := 0
	if n == 3 {
		base = 4
	}
	for si, s := range d.Sheets {
		// The grid corners inside the piece clear of every target; of
		// them the four that span the largest quadrilateral, named by
		// corner: top-left the least x + y, bottom-right the most,
		// top-right the most x - y, bottom-left the least.
		var cs [][2]float64
		for i := s.I0 + 1; i < s.I1; i++ {
			for j := s.J0 + 1; j < s.J1; j++ {
				x, y := -d.W/2+float64(i)*cw, -d.H/2+float64(j)*ch
				if d.clearOfTargets(x, y) >= markClearance {
					cs = append(cs, [2]float64{x, y})
				}
			}
		}
		best, area := [4][2]float64{}, 0.0
		for a := range cs {
			for b := a + 1; b < len(cs); b++ {
				for c := b + 1; c < len(cs); c++ {
					for e := c + 1; e < len(cs); e++ {
						q, ok := cornerOrder([4][2]float64{cs[a], cs[b], cs[c], cs[e]})
						if ar := polyArea(q[:]); ok && ar > area+1e-12 {
							best, area = q, ar
						}
					}
				}
			}
		}
		if area == 0 {
			continue // TestSheetPieces fails: no design may leave a sheet without marks
		}
		for k, p := range best {
			d.Marks = append(d.Marks, Mark{Index: base + k, X: p[0], Y: p[1], R: MarkR, Word: codebook[v*marksPerChart+base+k], Sheet: si})
		}
	}
}

// cornerOrder orders four points as top-left, top-right, bottom-right,
// bottom-left (the least x + y, the most x - y, the most x + y, the least
// x - y); ok is false unless these are four different points forming a
// convex quadrilateral in that order.
func cornerOrder(p [4][2]float64) ([4][2]float64, bool) {
	pick := func(f func(q [2]float64) float64, most bool) int {
		k := 0
		for i := range p {
			if most && f(p[i]) > f(p[k]) || !most && f(p[i]) < f(p[k]) {
				k = i
			}
		}
		return k
	}
	sum := func(q [2]float64) float64 { return q[0] + q[1] }
	diff := func(q [2]float64) float64 { return q[0] - q[1] }
	idx := [4]int{pick(sum, false), pick(diff, true), pick(sum, true), pick(diff, false)}
	seen := map[int]bool{}
	var out [4][2]float64
	for k, i := range idx {
		seen[i] = true
		out[k] = p[i]
	}
	if len(seen) != 4 {
		return out, false
	}
	for k := range 4 {
		a, b, c := out[k], out[(k+1)%4], out[(k+2)%4]
		if (b[0]-a[0])*(c[1]-b[1])-(b[1]-a[1])*(c[0]-b[0]) <= 1e-12 {
			return out, false
		}
	}
	return out, true
}

// clearOfTargets returns the distance from (x, y) to the nearest target,
// chart units (0 inside one).
func (d *Design) clearOfTargets(x, y float64) float64 {
	best := math.Inf(1)
	rectDist := func(cx, cy, w, h float64) float64 {
		dx := math.Max(math.Abs(x-cx)-w/2, 0)
		dy := math.Max(math.Abs(y-cy)-h/2, 0)
		return math.Hypot(dx, dy)
	}
	for _, q := range d.Squares {
		s, c := math.Sincos(q.RotDeg * math.Pi / 180)
		// In the square's own axes it is an axis-aligned square.
		u, v := (x-q.X)*c+(y-q.Y)*s, -(x-q.X)*s+(y-q.Y)*c
		dx := math.Max(math.Abs(u)-q.Side/2, 0)
		dy := math.Max(math.Abs(v)-q.Side/2, 0)
		best = math.Min(best, math.Hypot(dx, dy))
	}
	for _, st := range d.Stars {
		best = math.Min(best, math.Max(math.Hypot(x-st.X, y-st.Y)-st.Radius, 0))
	}
	for _, g := range d.Gratings {
		best = math.Min(best, rectDist(g.X, g.Y, g.W, g.H))
	}
	if w := d.Wedge; w.W > 0 {
		best = math.Min(best, rectDist(w.X, w.Y, w.W, w.H))
	}
	return best
}

// SheetAt returns the index of the sheet whose piece holds the chart point
// (x, y), the nearest piece for a point between or outside them; -1 for a
// chart on one sheet.
func (d *Design) SheetAt(x, y float64) int {
	best, bd := -1, math.Inf(1)
	for i, s := range d.Sheets {
		dx := math.Max(math.Max(s.X0-x, x-s.X1), 0)
		dy := math.Max(math.Max(s.Y0-y, y-s.Y1), 0)
		if e := math.Hypot(dx, dy); e < bd {
			best, bd = i, e
		}
	}
	return best
}
