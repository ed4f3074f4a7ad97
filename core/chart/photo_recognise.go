package chart

import (
	"fmt"
	"math"
	"sort"

	"sagitta/core/internal/coarse"
	"sagitta/core/note"
	"sagitta/core/plane"
)

// FoundMark is a mark read in a photo.
type FoundMark struct {
	Index  int     // which of the chart's eight marks
	XPx    float64 // centre of its disc, image px
	YPx    float64
	Errors int // code sectors read wrongly and corrected (0 or 1)
	// Sheet is the sheet the mark is printed on, for a chart across
	// several sheets (Design.Sheets); 0 otherwise.
	Sheet  int
	code   int
	turn   float64 // direction of the chart's +x at the mark, degrees in the image (from its ring)
	margin float64 // weakest sector's distance from the threshold, in units of the contrast
	rPx    float64 // disc radius, px (geometric mean of the ellipse's semi-axes)
}

// Pose is a recognised chart: which design it is, and where it lies in the
// photo.
type Pose struct {
	Code   Code
	Design *Design
	// H maps chart units (see Design) to image px; Inv maps back.
	H, Inv Homography
	// Marks are the marks that agree with the pose.
	Marks []FoundMark
	// Affine is true when only three marks were read and the pose is an
	// affine map (no perspective).
	Affine bool
	// W and Hpx are the photo's size in pixels.
	W, Hpx int
	// ResidualPx is the largest distance between a mark's found centre and
	// where the pose puts it, px.
	ResidualPx float64
	// Sheets are the poses of the sheets of a chart across several
	// (photo_tiles.go), in Design.Sheets' order; nil for one sheet. H and
	// Inv are then the one homography that fits all marks best: the
	// assembled chart as a whole, whose chart units are positions on the
	// wall.
	Sheets []SheetPose
}

// Recognise looks for a Sagitta chart in a linear-light photo. It returns
// nil and an empty note when the photo shows no chart marks at all (any
// other photo), nil and a note (plain words and a code, core/note) when
// marks were read but too few to place the chart or not fitting one chart,
// and the chart's pose otherwise.
//
// Method: candidate discs (findDiscs) are read as marks (readMark); the
// chart code held by most marks wins; with four or more marks of that code
// the pose is the homography fitted to their designed and found centres
// (FitHomography), with three an affine map. A mark whose found centre lies
// more than max(2 px, 1 % of the mark spacing) from the fitted pose is
// dropped and the pose refitted. The pose is accepted only when it maps
// each mark's disc to an ellipse of the size found (within 25 %), which
// also checks fits through exactly four points.
func Recognise(p *plane.Plane) (*Pose, note.Note) {
	return RecogniseIn(coarse.NewViews(p))
}

// RecogniseIn is Recognise on the plane of vs, taking its reduced view
// from vs (shared with the other searches of the photo).
func RecogniseIn(vs *coarse.Views) (*Pose, note.Note) {
	p := vs.Plane()
	var marks []FoundMark
	for _, d := range findDiscs(vs) {
		if m, ok := readMark(p, d); ok {
			marks = append(marks, m)
		}
	}
	if len(marks) == 0 {
		return nil, note.Note{}
	}
	// Majority code; one mark per index (the most certain reading).
	votes := map[int]int{}
	for _, m := range marks {
		votes[m.code]++
	}
	code, best := -1, 0
	for c, n := range votes {
		if n > best || n == best && c < code {
			code, best = c, n
		}
	}
	if tiled, n := tiledMarks(marks, code); tiled {
		return recogniseTiles(p, code, n, marks)
	}
	byIndex := map[int]FoundMark{}
	for _, m := range marks {
		if m.code != code {
			continue
		}
		if o, dup := byIndex[m.Index]; !dup || m.Errors < o.Errors || m.Errors == o.Errors && m.margin > o.margin {
			byIndex[m.Index] = m
		}
	}
	var use []FoundMark
	for _, m := range byIndex {
		use = append(use, m)
	}
	sort.Slice(use, func(a, b int) bool { return use[a].Index < use[b].Index })
	d, _ := NewDesign(codeOf(code))
	disagree := note.New(note.ChartMarksDisagree, "found chart marks that do not fit together: the photo may show two charts, or a mark is damaged")
	few := func() note.Note {
		return note.New(note.ChartFewMarks, fmt.Sprintf("found %d of the chart's 8 marks, too few to place it: frame the whole chart, or check focus and lighting", len(use)))
	}
	if len(use) < 3 {
		return nil, few()
	}
	for {
		pose, worst, res := fitPose(d, use)
		if pose == nil {
			return nil, few()
		}
		tol := math.Max(2, 0.01*pose.markSpacingPx())
		if res <= tol {
			if !pose.sizesAgree() {
				return nil, disagreeOrOneSheet(use, disagree)
			}
			pose.W, pose.Hpx = p.W, p.H
			return pose, note.Note{}
		}
		if len(use) <= 4 {
			return nil, disagreeOrOneSheet(use, disagree)
		}
		use = append(use[:worst], use[worst+1:]...)
	}
}

// fitPose fits the pose to the marks and returns it with the index of the
// worst-fitting mark and its distance from the pose, px.
func fitPose(d *Design, use []FoundMark) (*Pose, int, float64) {
	src := make([][2]float64, len(use))
	dst := make([][2]float64, len(use))
	for i, m := range use {
		dm := d.markOf(m)
		src[i] = [2]float64{dm.X, dm.Y}
		dst[i] = [2]float64{m.XPx, m.YPx}
	}
	var h Homography
	var err error
	affine := len(use) < 4
	if affine {
		h, err = FitAffine(src, dst)
	} else {
		h, err = FitHomography(src, dst)
	}
	if err != nil {
		return nil, 0, 0
	}
	inv, ok := h.Inverse()
	if !ok {
		return nil, 0, 0
	}
	worst, res := 0, 0.0
	for i := range use {
		x, y := h.Apply(src[i][0], src[i][1])
		if e := math.Hypot(x-dst[i][0], y-dst[i][1]); e > res || math.IsNaN(e) {
			worst, res = i, e
		}
	}
	return &Pose{Code: d.Code, Design: d, H: h, Inv: inv, Marks: use, Affine: affine, ResidualPx: res}, worst, res
}

// markSpacingPx is the mean distance between the pose's marks in the photo.
func (ps *Pose) markSpacingPx() float64 {
	var s float64
	var n int
	for i, a := range ps.Marks {
		for _, b := range ps.Marks[i+1:] {
			s += math.Hypot(a.XPx-b.XPx, a.YPx-b.YPx)
			n++
		}
	}
	if n == 0 {
		return 0
	}
	return s / float64(n)
}

// sizesAgree checks that the pose maps each mark's disc (radius DiscOfR *
// R) to the area found, within 25 %, and keeps the chart's orientation (no
// mirror image).
func (ps *Pose) sizesAgree() bool {
	for _, m := range ps.Marks {
		dm := ps.Design.markOf(m)
		j := ps.H.Jacobian(dm.X, dm.Y)
		det := j[0][0]*j[1][1] - j[0][1]*j[1][0]
		if !(det > 0) {
			return false
		}
		want := DiscOfR * dm.R * math.Sqrt(det)
		if r := m.rPx / want; r < 0.75 || r > 1.25 {
			return false
		}
	}
	return true
}

// minMargin is the least distance of every sector's mean from the
// threshold, in units of the disc-to-gap contrast, for a reading to count:
// a sharp ring reads near 0.5; grey patterns and sectors split by the
// sampling read near 0.
const minMargin = 0.15

// readMark reads the ring of a candidate disc. The ring is sampled on the
// disc's own ellipse scaled by 1.9, 2.33 and 2.75 (the ring spans 1.6 to
// 3.07 disc radii), at 128 angles; a sector is dark when the mean of the
// four samples at its middle is below the midpoint of the disc's dark
// level and the gap's light level. The reading is tried at each of the
// eight sub-sector starting angles and decoded (decodeWord); the decoding
// with the fewest corrected sectors, then the largest margin, wins.
func readMark(p *plane.Plane, d disc) (FoundMark, bool) {
	a, b, c := sqrt2x2(d.sxx, d.sxy, d.syy)
	a, b, c = 2*a, 2*b, 2*c
	const per = 8
	const n = Sectors * per
	var vals [n]float64
	for i := range n {
		s, co := math.Sincos(2 * math.Pi * float64(i) / n)
		ex, ey := a*co+b*s, b*co+c*s
		var v float64
		for _, f := range [3]float64{1.9, 2.33, 2.75} {
			v += p.Bilinear(d.x+f*ex, d.y+f*ey)
		}
		vals[i] = v / 3
	}
	thr := (d.dark + d.light) / 2
	span := d.light - d.dark
	found, ok := FoundMark{}, false
	bestErr, bestMargin := Sectors, -1.0
	for o := range per {
		var word uint16
		margin := math.Inf(1)
		for k := range Sectors {
			var m float64
			for q := 2; q < 6; q++ {
				m += vals[(o+k*per+q)%n]
			}
			m /= 4
			if m < thr {
				word |= 1 << k
			}
			margin = math.Min(margin, math.Abs(m-thr)/span)
		}
		v, shift, dist, good := decodeWord(word)
		if !good || margin < minMargin {
			continue
		}
		if dist < bestErr || dist == bestErr && margin > bestMargin {
			bestErr, bestMargin = dist, margin
			l1, l2 := eigen2(d.sxx, d.sxy, d.syy)
			found = FoundMark{Index: v % marksPerChart, XPx: d.x, YPx: d.y, Errors: dist, code: v / marksPerChart,
				margin: margin, rPx: 2 * math.Pow(l1*l2, 0.25),
				// Reading sector i starts at sample o + 8i, angle 360 (o +
				// 8i) / 128 in the image, and holds the mark's sector i +
				// shift, which starts at 22.5 (i + shift) on the chart.
				turn: math.Mod(360*float64(o)/n-22.5*float64(shift)+720, 360)}
			ok = true
		}
	}
	return found, ok
}
