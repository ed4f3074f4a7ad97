package chart

import (
	"fmt"
	"math"
	"sort"

	"sagitta/core/note"
	"sagitta/core/plane"
)

// Recognising a chart across sheets (tiling.go). Every sheet carries the
// same four mark words, so a mark's word says which corner of its sheet it
// is, not which sheet; the sheet follows from where the mark lies:
//
//  1. the chart's turn in the photo is the circular mean of the turns the
//     marks' rings read, and its scale the median of the marks' disc radii
//     over the designed DiscOfR * MarkR;
//  2. turned and scaled back, the marks lie where the design puts them up to
//     one shift: each pairing of a found mark with a designed mark of the
//     same corner proposes a shift, and the shift that brings the most
//     marks within a third of the marks' least spacing of a designed mark
//     of their corner wins (a vote in the manner of the Hough transform);
//  3. the homography of the assembled chart is fitted to all marks so
//     paired (FitHomography); the pairing is repeated through it, and
//     each sheet's own homography is fitted to that sheet's marks (four:
//     a homography; three: an affine map; fewer: the assembled chart's);
//  4. the sheets are rigid pieces of one plane, the wall: each sheet's
//     marks are the wall's homography after the sheet's own turn and shift
//     on the wall. The two are found in turn (settle): each sheet's turn
//     and shift that best carry its designed marks onto where the wall's
//     homography puts the found ones (the least-squares rotation of
//     Procrustes analysis: J. C. Gower and G. B. Dijksterhuis,
//     Procrustes Problems, 2004, ch. 4), then the wall's homography fitted
//     to the marks so moved, five times; the turns and shifts are kept at
//     zero mean, so the wall's homography is the camera's view of the
//     assembled chart as a whole and the set-up checks read it without the
//     sheets' misalignment.
//
// The assembled chart's homography carries the sheets' misalignment in its
// residuals; each sheet's own maps its targets. A point on sheet s at chart
// units p lies on the wall at Inv(Sheets[s].H(p)), in the assembled chart's
// units: Placed.

// SheetPose is one sheet's own pose in a photo of a chart across sheets.
type SheetPose struct {
	Sheet Sheet
	// H maps the design's chart units on this sheet to image px; Inv maps
	// back. Own is false when fewer than three of the sheet's marks were
	// read and H is the assembled chart's.
	H, Inv Homography
	Own    bool
	Marks  []FoundMark
}

// tiledMarks reports whether the marks of chart code value code come from
// a chart across sheets: marks of one index lie apart (a chart on one sheet
// has each index once), and gives the sheets per side, from the indices
// (0-3 on 2 x 2, 4-7 on 3 x 3). One stray reading must not turn a chart on
// one sheet into sheets (a disc of the grey steps read as a mark, say), so
// it takes two such pairs, each of two clean readings (no sector error) of
// discs of about the same size; a chart across sheets shows each index on
// every sheet.
func tiledMarks(marks []FoundMark, code int) (bool, int) {
	pairs, low := 0, 0
	for i, a := range marks {
		for _, b := range marks[i+1:] {
			if a.code != code || b.code != code || a.Index != b.Index || a.Errors > 0 || b.Errors > 0 {
				continue
			}
			if math.Abs(a.rPx-b.rPx) > 0.25*math.Max(a.rPx, b.rPx) || math.Hypot(a.XPx-b.XPx, a.YPx-b.YPx) <= 4*(a.rPx+b.rPx) {
				continue
			}
			pairs++
			if a.Index < 4 {
				low++
			}
		}
	}
	switch {
	case pairs < 2:
		return false, 0
	case 2*low >= pairs:
		return true, 2
	}
	return true, 3
}

// disagreeOrOneSheet returns the note for marks that do not fit a chart on
// one sheet: when they are four or fewer, all of one tiling's indices (0-3
// or 4-7, each once), they are most likely one sheet of a chart across
// sheets photographed alone, which cannot be placed (the sheets repeat the
// same words); else the marks disagree.
func disagreeOrOneSheet(use []FoundMark, disagree note.Note) note.Note {
	if len(use) < 3 || len(use) > 4 {
		return disagree
	}
	lo, hi := use[0].Index, use[0].Index
	for _, m := range use {
		lo, hi = min(lo, m.Index), max(hi, m.Index)
	}
	if hi < 4 || lo >= 4 {
		return note.New(note.ChartOneSheet, "found the marks of one sheet of a chart across sheets: frame the whole assembled chart, every sheet in the photo")
	}
	return disagree
}

// markOf returns the designed mark a found mark is: by index on a chart on
// one sheet, by sheet and index on a chart across sheets.
func (d *Design) markOf(m FoundMark) Mark {
	if len(d.Sheets) == 0 {
		return d.Marks[m.Index]
	}
	for _, dm := range d.Marks {
		if dm.Sheet == m.Sheet && dm.Index == m.Index {
			return dm
		}
	}
	return Mark{}
}

// recogniseTiles places a chart across n x n sheets of code value code from
// its marks (see above).
func recogniseTiles(p *plane.Plane, code, n int, found []FoundMark) (*Pose, note.Note) {
	c := codeOf(code)
	c.Sheets = n
	d, err := NewDesign(c)
	few := func(k int) note.Note {
		return note.New(note.ChartFewMarks, fmt.Sprintf("found %d marks of a chart across %d x %d sheets, too few to place it: frame the whole chart, or check focus and lighting", k, n, n))
	}
	if err != nil {
		return nil, few(0)
	}
	base := 0
	if n == 3 {
		base = 4
	}
	var marks []FoundMark
	for _, m := range found {
		if m.code == code && m.Index >= base && m.Index < base+4 {
			marks = append(marks, m)
		}
	}
	if len(marks) < 4 {
		return nil, few(len(marks))
	}
	// 1. Turn and scale.
	var sx, sy float64
	radii := make([]float64, len(marks))
	for i, m := range marks {
		s, co := math.Sincos(m.turn * math.Pi / 180)
		sx, sy = sx+s, sy+co
		radii[i] = m.rPx
	}
	turn := math.Atan2(sx, sy)
	sort.Float64s(radii)
	scale := radii[len(radii)/2] / (DiscOfR * MarkR) // px per chart unit
	st, ct := math.Sincos(-turn)
	back := func(m FoundMark) [2]float64 {
		return [2]float64{(ct*m.XPx - st*m.YPx) / scale, (st*m.XPx + ct*m.YPx) / scale}
	}
	// 2. The shift most marks agree on.
	spacing := math.Inf(1)
	for i, a := range d.Marks {
		for _, b := range d.Marks[i+1:] {
			if a.Index == b.Index {
				spacing = math.Min(spacing, math.Hypot(a.X-b.X, a.Y-b.Y))
			}
		}
	}
	tol := spacing / 3
	pair := func(shift [2]float64) ([]FoundMark, float64) {
		var out []FoundMark
		var cost float64
		for _, m := range marks {
			u := back(m)
			best, bd := -1, tol
			for k, dm := range d.Marks {
				if dm.Index != m.Index {
					continue
				}
				if e := math.Hypot(u[0]+shift[0]-dm.X, u[1]+shift[1]-dm.Y); e < bd {
					best, bd = k, e
				}
			}
			if best >= 0 {
				m.Sheet = d.Marks[best].Sheet
				out = append(out, m)
				cost += bd
			}
		}
		return out, cost
	}
	var use []FoundMark
	bestCost := math.Inf(1)
	for _, m := range marks {
		u := back(m)
		for _, dm := range d.Marks {
			if dm.Index != m.Index {
				continue
			}
			got, cost := pair([2]float64{dm.X - u[0], dm.Y - u[1]})
			if got = uniqueMarks(got); len(got) > len(use) || len(got) == len(use) && cost < bestCost {
				use, bestCost = got, cost
			}
		}
	}
	if len(use) < 4 {
		return nil, few(len(use))
	}
	// 3. The assembled chart's homography, the pairing again through it,
	// and each sheet's own.
	pose, _, _ := fitPose(d, use)
	if pose == nil {
		return nil, few(len(use))
	}
	var again []FoundMark
	for _, m := range marks {
		best, bd := -1, math.Inf(1)
		for k, dm := range d.Marks {
			if dm.Index != m.Index {
				continue
			}
			x, y := pose.H.Apply(dm.X, dm.Y)
			if e := math.Hypot(x-m.XPx, y-m.YPx); e < bd {
				best, bd = k, e
			}
		}
		if best >= 0 && bd < tol*scale {
			m.Sheet = d.Marks[best].Sheet
			again = append(again, m)
		}
	}
	if again = uniqueMarks(again); len(again) >= len(use) {
		if q, _, _ := fitPose(d, again); q != nil {
			pose, use = q, again
		}
	}
	pose.Sheets = make([]SheetPose, len(d.Sheets))
	for s := range d.Sheets {
		sp := SheetPose{Sheet: d.Sheets[s], H: pose.H, Inv: pose.Inv}
		for _, m := range use {
			if m.Sheet == s {
				sp.Marks = append(sp.Marks, m)
			}
		}
		if len(sp.Marks) >= 3 {
			if q, _, _ := fitPose(d, sp.Marks); q != nil {
				sp.H, sp.Inv, sp.Own = q.H, q.Inv, true
			}
		}
		pose.Sheets[s] = sp
	}
	pose.settle(use)
	if !pose.sizesAgree() {
		return nil, note.New(note.ChartMarksDisagree, "found chart marks that do not fit together: the photo may show two charts, or a mark is damaged")
	}
	pose.W, pose.Hpx = p.W, p.H
	return pose, note.Note{}
}

// settle fits the wall's homography and the sheets' turns and shifts on
// the wall in turn (step 4 above), and sets H and Inv to the wall's.
func (ps *Pose) settle(use []FoundMark) {
	d := ps.Design
	type rigid struct{ turn, tx, ty float64 }
	moves := make([]rigid, len(d.Sheets))
	centre := func(s int) (float64, float64) {
		sh := d.Sheets[s]
		return (sh.X0 + sh.X1) / 2, (sh.Y0 + sh.Y1) / 2
	}
	move := func(s int, x, y float64) (float64, float64) {
		cx, cy := centre(s)
		sn, cs := math.Sincos(moves[s].turn)
		return cs*(x-cx) - sn*(y-cy) + cx + moves[s].tx, sn*(x-cx) + cs*(y-cy) + cy + moves[s].ty
	}
	for range 5 {
		// Each sheet's turn and shift, given the wall's homography.
		var mt, mx, my float64
		var k int
		for s := range d.Sheets {
			cx, cy := centre(s)
			var src, dst [][2]float64
			for _, m := range use {
				if m.Sheet == s {
					dm := d.markOf(m)
					u, v := ps.Inv.Apply(m.XPx, m.YPx)
					src = append(src, [2]float64{dm.X - cx, dm.Y - cy})
					dst = append(dst, [2]float64{u - cx, v - cy})
				}
			}
			if len(src) < 2 {
				moves[s] = rigid{}
				continue
			}
			var sa, sb [2]float64
			for i := range src {
				sa[0], sa[1] = sa[0]+src[i][0], sa[1]+src[i][1]
				sb[0], sb[1] = sb[0]+dst[i][0], sb[1]+dst[i][1]
			}
			nn := float64(len(src))
			sa[0], sa[1], sb[0], sb[1] = sa[0]/nn, sa[1]/nn, sb[0]/nn, sb[1]/nn
			var cross, dot float64
			for i := range src {
				ax, ay := src[i][0]-sa[0], src[i][1]-sa[1]
				bx, by := dst[i][0]-sb[0], dst[i][1]-sb[1]
				cross += ax*by - ay*bx
				dot += ax*bx + ay*by
			}
			th := math.Atan2(cross, dot)
			sn, cs := math.Sincos(th)
			moves[s] = rigid{th, sb[0] - (cs*sa[0] - sn*sa[1]), sb[1] - (sn*sa[0] + cs*sa[1])}
			mt, mx, my, k = mt+th, mx+moves[s].tx, my+moves[s].ty, k+1
		}
		if k == 0 {
			return
		}
		for s := range moves {
			if moves[s] != (rigid{}) {
				moves[s].turn -= mt / float64(k)
				moves[s].tx -= mx / float64(k)
				moves[s].ty -= my / float64(k)
			}
		}
		// The wall's homography, given the sheets' moves.
		src := make([][2]float64, len(use))
		dst := make([][2]float64, len(use))
		for i, m := range use {
			dm := d.markOf(m)
			x, y := move(m.Sheet, dm.X, dm.Y)
			src[i], dst[i] = [2]float64{x, y}, [2]float64{m.XPx, m.YPx}
		}
		h, err := FitHomography(src, dst)
		if err != nil {
			return
		}
		inv, ok := h.Inverse()
		if !ok {
			return
		}
		ps.H, ps.Inv = h, inv
	}
}

// uniqueMarks keeps one found mark per designed mark (sheet and index): the
// most certain reading.
func uniqueMarks(ms []FoundMark) []FoundMark {
	type key struct{ s, i int }
	by := map[key]FoundMark{}
	for _, m := range ms {
		k := key{m.Sheet, m.Index}
		if o, dup := by[k]; !dup || m.Errors < o.Errors || m.Errors == o.Errors && m.margin > o.margin {
			by[k] = m
		}
	}
	out := make([]FoundMark, 0, len(by))
	for _, m := range by {
		out = append(out, m)
	}
	sort.Slice(out, func(a, b int) bool {
		if out[a].Sheet != out[b].Sheet {
			return out[a].Sheet < out[b].Sheet
		}
		return out[a].Index < out[b].Index
	})
	return out
}

// sheetOf returns the pose of the sheet under chart point (x, y) of the
// assembled chart, or nil for a chart on one sheet.
func (ps *Pose) sheetOf(x, y float64) *SheetPose {
	if len(ps.Sheets) == 0 {
		return nil
	}
	if s := ps.Design.SheetAt(x, y); s >= 0 && s < len(ps.Sheets) {
		return &ps.Sheets[s]
	}
	return nil
}

// Placed returns where the design's point (x, y) chart units, printed on
// the sheet whose piece holds it, lies on the assembled chart: the same
// point on a chart on one sheet; on a chart across sheets, the point moved
// with its sheet, in the assembled chart's units (its homography's).
func (ps *Pose) Placed(x, y float64) (float64, float64) {
	sp := ps.sheetOf(x, y)
	if sp == nil {
		return x, y
	}
	return ps.Inv.Apply(sp.H.Apply(x, y))
}

// At returns the homography (and its inverse) that maps the design's chart
// units near (x, y) to image px: its sheet's own on a chart across sheets,
// the chart's otherwise.
func (ps *Pose) At(x, y float64) (h, inv Homography) {
	if sp := ps.sheetOf(x, y); sp != nil {
		return sp.H, sp.Inv
	}
	return ps.H, ps.Inv
}

// ImageXY returns where the design's point (x, y) chart units appears in
// the photo, px: through its own sheet's homography on a chart across
// sheets.
func (ps *Pose) ImageXY(x, y float64) (float64, float64) {
	if sp := ps.sheetOf(x, y); sp != nil {
		return sp.H.Apply(x, y)
	}
	return ps.H.Apply(x, y)
}

// designXY returns the design's chart units of image point (x, y) px: on a
// chart across sheets through the assembled chart's homography first, to
// find the sheet, then through that sheet's own.
func (ps *Pose) designXY(x, y float64) (float64, float64) {
	u, v := ps.Inv.Apply(x, y)
	if sp := ps.sheetOf(u, v); sp != nil {
		return sp.Inv.Apply(x, y)
	}
	return u, v
}

// Seam is what the photo shows of the join between two neighbouring sheets,
// at the middle of their shared edge: the second sheet (to the right of or
// below the first) found GapMM farther from the first than designed across
// the seam (negative: overlapping), SlideMM along it (right or down
// positive), and turned TurnDeg against it (from +x towards +y).
type Seam struct {
	A, B    string // the sheets' numbers, e.g. "1-1" and "1-2"
	GapMM   float64
	SlideMM float64
	TurnDeg float64
}

// Limits of the seam checks: Sagitta's own choices. A millimetre or half a
// degree is more than careful hanging leaves and well within what the
// sheets' own poses follow; beyond it a sheet may also not lie flat.
const (
	MaxSeamMM  = 1.0
	MaxSeamDeg = 0.5
)

// Seams measures the joins between neighbouring sheets of a chart across
// sheets whose short side is shortMM printed mm (one chart unit); nil for a
// chart on one sheet or sheets without their own pose.
func (ps *Pose) Seams(shortMM float64) []Seam {
	var out []Seam
	d := ps.Design
	n := d.Code.Sheets
	if len(ps.Sheets) != n*n || n < 2 {
		return nil
	}
	wall := func(sp SheetPose, x, y float64) [2]float64 {
		u, v := ps.Inv.Apply(sp.H.Apply(x, y))
		return [2]float64{u, v}
	}
	angle := func(sp SheetPose, x, y, dx, dy float64) float64 {
		a, b := wall(sp, x, y), wall(sp, x+dx, y+dy)
		return math.Atan2(b[1]-a[1], b[0]-a[0])
	}
	for i, a := range ps.Sheets {
		for _, j := range []int{i + 1, i + n} {
			if j >= len(ps.Sheets) || (j == i+1 && a.Sheet.Col == n-1) {
				continue
			}
			b := ps.Sheets[j]
			if !a.Own || !b.Own {
				continue
			}
			right := j == i+1
			var mx, my, nx, ny float64
			if right {
				mx, my, nx, ny = a.Sheet.X1, (a.Sheet.Y0+a.Sheet.Y1)/2, 1, 0
			} else {
				mx, my, nx, ny = (a.Sheet.X0+a.Sheet.X1)/2, a.Sheet.Y1, 0, 1
			}
			pa, pb := wall(a, mx, my), wall(b, mx, my)
			dx, dy := pb[0]-pa[0], pb[1]-pa[1]
			const step = 0.05
			turn := angle(b, mx, my, ny*step, nx*step) - angle(a, mx, my, ny*step, nx*step)
			turn = math.Remainder(turn, 2*math.Pi)
			out = append(out, Seam{A: a.Sheet.Name(), B: b.Sheet.Name(),
				GapMM: (dx*nx + dy*ny) * shortMM, SlideMM: (dx*ny + dy*nx) * shortMM, TurnDeg: turn * 180 / math.Pi})
		}
	}
	return out
}

// SeamWarnings words the seams past the limits, with their codes
// (core/note).
func SeamWarnings(seams []Seam) (texts, codes []string) {
	for _, s := range seams {
		if math.Abs(s.GapMM) <= MaxSeamMM && math.Abs(s.SlideMM) <= MaxSeamMM && math.Abs(s.TurnDeg) <= MaxSeamDeg {
			continue
		}
		apart := fmt.Sprintf("%.1f mm apart", s.GapMM)
		if s.GapMM < 0 {
			apart = fmt.Sprintf("overlapping by %.1f mm", -s.GapMM)
		}
		texts = append(texts, fmt.Sprintf("Sheets %s and %s are %s, shifted %.1f mm along their edge and turned %.1f degrees to each other: each sheet is placed on its own, so the measurements are not affected, but hang the sheets edge to edge along the guides, flat on the wall.",
			s.A, s.B, apart, math.Abs(s.SlideMM), math.Abs(s.TurnDeg)))
		codes = append(codes, string(note.SetupSheetsMisaligned))
	}
	return texts, codes
}
