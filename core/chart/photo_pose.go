package chart

import (
	"fmt"
	"math"

	"sagitta/core/note"
)

// Hit says what part of the chart lies under an image point.
type Hit struct {
	Kind  string  // "square", "star", "grating", "mark", "wedge", "chart" (blank paper inside the frame) or "outside"
	ID    string  // target id (squares, stars, gratings)
	Edge  int     // square edge 1..4 (see Square), 0 otherwise
	X, Y  float64 // the target's centre, chart units
	Field float64 // the target centre's distance from the chart centre over the half diagonal
	// Sheet is the number of the sheet the target is printed on ("1-2")
	// on a chart across sheets, "" on one sheet; PlacedX, PlacedY are
	// where its centre lies on the assembled chart (Pose.Placed), chart
	// units: X, Y on one sheet.
	Sheet            string
	PlacedX, PlacedY float64
}

// Kinds of Hit.
const (
	HitSquare  = "square"
	HitStar    = "star"
	HitGrating = "grating"
	HitMark    = "mark"
	HitWedge   = "wedge"
	HitChart   = "chart"
	HitOutside = "outside"
)

// edgeTol is how far from a square's edge, as a fraction of its side, a
// measured edge may lie and still belong to it.
const edgeTol = 0.15

// Locate returns the part of the chart under the image point (x, y) px. A
// point within edgeTol of a side of a square's edge (and within its length)
// is on that edge.
func (ps *Pose) Locate(x, y float64) Hit {
	h := ps.locate(x, y)
	if h.Kind == HitOutside || h.Kind == HitChart {
		return h
	}
	h.PlacedX, h.PlacedY = ps.Placed(h.X, h.Y)
	if sp := ps.sheetOf(h.X, h.Y); sp != nil {
		h.Sheet = sp.Sheet.Name()
	}
	return h
}

func (ps *Pose) locate(x, y float64) Hit {
	d := ps.Design
	u, v := ps.designXY(x, y)
	if math.IsNaN(u) || math.IsNaN(v) || math.Abs(u) > d.W/2 || math.Abs(v) > d.H/2 {
		return Hit{Kind: HitOutside}
	}
	for _, q := range d.Squares {
		s, c := math.Sincos(q.RotDeg * math.Pi / 180)
		a := (u-q.X)*c + (v-q.Y)*s  // along edge 1's normal
		b := -(u-q.X)*s + (v-q.Y)*c // along edge 2's normal
		h := q.Side / 2
		for k, e := range [4][2]float64{{a, b}, {b, -a}, {-a, -b}, {-b, a}} {
			if math.Abs(e[0]-h) <= edgeTol*q.Side && math.Abs(e[1]) <= h {
				return Hit{Kind: HitSquare, ID: q.ID, Edge: k + 1, X: q.X, Y: q.Y, Field: d.Field(q.X, q.Y)}
			}
		}
	}
	for _, st := range d.Stars {
		if math.Hypot(u-st.X, v-st.Y) <= 1.05*st.Radius {
			return Hit{Kind: HitStar, ID: st.ID, X: st.X, Y: st.Y, Field: d.Field(st.X, st.Y)}
		}
	}
	for _, g := range d.Gratings {
		if math.Abs(u-g.X) <= g.W/2+gratingGap/4 && math.Abs(v-g.Y) <= g.H/2+gratingGap/4 {
			return Hit{Kind: HitGrating, ID: g.ID, X: g.X, Y: g.Y, Field: d.Field(g.X, g.Y)}
		}
	}
	if w := d.Wedge; w.W > 0 && math.Abs(u-w.X) <= w.W/2+wedgeTol && math.Abs(v-w.Y) <= w.H/2+wedgeTol {
		return Hit{Kind: HitWedge, ID: "wedge", X: w.X, Y: w.Y, Field: d.Field(w.X, w.Y)}
	}
	for _, m := range d.Marks {
		if math.Hypot(u-m.X, v-m.Y) <= m.R {
			id := fmt.Sprintf("mark%d", m.Index)
			if len(d.Sheets) > 0 {
				id = fmt.Sprintf("mark%d-%s", m.Index, d.Sheets[m.Sheet].Name())
			}
			return Hit{Kind: HitMark, ID: id, X: m.X, Y: m.Y, Field: d.Field(m.X, m.Y)}
		}
	}
	return Hit{Kind: HitChart}
}

// wedgeTol widens the step wedge's block for Locate, chart units: an edge
// found along its border is centred on it, within the blur.
const wedgeTol = 0.01

// InFrame reports whether the chart point (x, y) maps inside the photo with
// margin px to spare.
func (ps *Pose) InFrame(x, y, margin float64) bool {
	u, v := ps.ImageXY(x, y)
	return u >= margin && v >= margin && u <= float64(ps.W)-margin && v <= float64(ps.Hpx)-margin
}

// Setup is what the chart's pose says about the way the photo was taken.
type Setup struct {
	// CoverPct is the share of the photo covered by the chart frame, %.
	CoverPct float64
	// VisiblePct is the share of the chart frame inside the photo, %.
	VisiblePct float64
	// RotationDeg is the chart's turn in the photo, degrees from +x towards
	// +y (the rotation of the nearest similarity at the chart's centre).
	RotationDeg float64
	// KeystoneLRPct is how much larger (per cent, in linear scale) the
	// chart's left side appears than its right side; KeystoneTBPct likewise
	// its top against its bottom. Both are 0 for a camera square to the
	// chart.
	KeystoneLRPct float64
	KeystoneTBPct float64
	// OffCentrePct is the distance of the chart's centre from the photo's
	// centre, % of the photo's shorter side.
	OffCentrePct float64
	// TiltDeg is the angle between the chart's normal and the camera's
	// optical axis, when the focal length is known (else 0).
	TiltDeg float64
	// Warnings word every check that failed, with what to change;
	// WarningCodes are their codes, aligned (core/note).
	Warnings     []string
	WarningCodes []string
}

// Thresholds of the set-up checks. They are Sagitta's own choices, not a
// standard's: a chart should fill the frame so that the corners are
// measured; a turn of a few degrees moves the frame's corners off the chart;
// a keystone of 1 % means one side of the chart is 1 % farther from the
// camera than the other, which at close range is a focus difference
// comparable with the depth of field of a wide aperture.
const (
	MinCoverPct     = 85
	MinVisiblePct   = 97
	MaxRotationDeg  = 2
	MaxKeystonePct  = 1
	MaxOffCentrePct = 5
)

// Check measures the set-up from the pose. focalPx is the lens's focal
// length in pixels (focal length / pixel pitch), or 0 when unknown; it is
// needed only for TiltDeg.
func (ps *Pose) Check(focalPx float64) Setup {
	d := ps.Design
	var s Setup
	quad := make([][2]float64, 4)
	for i, c := range [4][2]float64{{-1, -1}, {1, -1}, {1, 1}, {-1, 1}} {
		x, y := ps.H.Apply(c[0]*d.W/2, c[1]*d.H/2)
		quad[i] = [2]float64{x, y}
	}
	w, h := float64(ps.W), float64(ps.Hpx)
	inside := polyArea(clipRect(quad, w, h))
	if a := polyArea(quad); a > 0 {
		s.VisiblePct = 100 * inside / a
	}
	s.CoverPct = 100 * inside / (w * h)
	j := ps.H.Jacobian(0, 0)
	s.RotationDeg = math.Atan2(j[1][0]-j[0][1], j[0][0]+j[1][1]) * 180 / math.Pi
	scale := func(x, y float64) float64 {
		j := ps.H.Jacobian(x, y)
		return math.Sqrt(math.Abs(j[0][0]*j[1][1] - j[0][1]*j[1][0]))
	}
	s.KeystoneLRPct = 100 * (scale(-d.W/2, 0)/scale(d.W/2, 0) - 1)
	s.KeystoneTBPct = 100 * (scale(0, -d.H/2)/scale(0, d.H/2) - 1)
	cx, cy := ps.H.Apply(0, 0)
	s.OffCentrePct = 100 * math.Hypot(cx-w/2, cy-h/2) / math.Min(w, h)
	if focalPx > 0 {
		s.TiltDeg = tiltDeg(ps.H, focalPx, w/2, h/2)
	}
	s.Warnings, s.WarningCodes = []string{}, []string{}
	warn := func(c note.Code, format string, a ...any) {
		s.Warnings = append(s.Warnings, fmt.Sprintf(format, a...))
		s.WarningCodes = append(s.WarningCodes, string(c))
	}
	if s.CoverPct < MinCoverPct {
		warn(note.SetupCover, "The chart fills only %s %% of the frame, so the frame's edges and corners are not measured: move closer or zoom in until the chart's corner marks reach the corners of the frame.", pastLimit(s.CoverPct, MinCoverPct))
	}
	if s.VisiblePct < MinVisiblePct {
		warn(note.SetupCutOff, "%s %% of the chart lies outside the frame, so targets near its edges are cut off: step back or zoom out until the corner marks are just inside the frame.", pastLimit(100-s.VisiblePct, 100-MinVisiblePct))
	}
	if math.Abs(s.RotationDeg) > MaxRotationDeg {
		side := "clockwise"
		if s.RotationDeg < 0 {
			side = "anticlockwise"
		}
		warn(note.SetupRotated, "The chart is turned %.1f degrees %s in the frame: level the camera (or the chart) so the chart's sides run with the frame's.", math.Abs(s.RotationDeg), side)
	}
	tilt := ""
	if s.TiltDeg > 0 {
		tilt = fmt.Sprintf(" (about %.1f degrees)", s.TiltDeg)
	}
	if math.Abs(s.KeystoneLRPct) > MaxKeystonePct {
		near, far := "left", "right"
		if s.KeystoneLRPct < 0 {
			near, far = far, near
		}
		warn(note.SetupNotSquare, "The camera is not square to the chart%s: its %s side appears %.1f %% larger than its %s side, so the %s side is nearer. Turn the camera (or the chart) until both sides match; a tilted chart is sharp only along one line.", tilt, near, math.Abs(s.KeystoneLRPct), far, near)
	}
	if math.Abs(s.KeystoneTBPct) > MaxKeystonePct {
		near, far := "top", "bottom"
		if s.KeystoneTBPct < 0 {
			near, far = far, near
		}
		warn(note.SetupTilted, "The camera is tilted against the chart%s: its %s appears %.1f %% larger than its %s, so the %s is nearer. Tilt the camera (or the chart) until both match; a tilted chart is sharp only along one line.", tilt, near, math.Abs(s.KeystoneTBPct), far, near)
	}
	if s.OffCentrePct > MaxOffCentrePct {
		warn(note.SetupOffCentre, "The chart's centre is %s %% of the frame's height away from the frame's centre: aim the camera at the chart's centre.", pastLimit(s.OffCentrePct, MaxOffCentrePct))
	}
	return s
}

// pastLimit writes a percentage v that failed a check against limit so that
// the figure shown is on the same side of the limit as v: a whole number
// when rounding keeps it there, else one decimal rounded away from the limit
// (84.6 against a minimum of 85 reads "84.6", not "85").
func pastLimit(v, limit float64) string {
	if r := math.Round(v); (v < limit) == (r < limit) && r != limit {
		return fmt.Sprintf("%.0f", r)
	}
	if v < limit {
		return fmt.Sprintf("%.1f", math.Floor(v*10)/10)
	}
	return fmt.Sprintf("%.1f", math.Ceil(v*10)/10)
}

// tiltDeg returns the angle between the chart's normal and the optical
// axis: with K = [[f, 0, cx], [0, f, cy], [0, 0, 1]], the columns of
// K^-1 H are proportional to r1, r2 and t of the camera's pose
// (Hartley and Zisserman, 2nd ed., section 8.1.1); the normal is r1 x r2,
// and the tilt is the angle whose cosine is its component along the axis.
func tiltDeg(h Homography, f, cx, cy float64) float64 {
	col := func(j int) [3]float64 {
		x, y, w := h[j], h[3+j], h[6+j]
		return [3]float64{(x - cx*w) / f, (y - cy*w) / f, w}
	}
	r1, r2 := col(0), col(1)
	n := [3]float64{r1[1]*r2[2] - r1[2]*r2[1], r1[2]*r2[0] - r1[0]*r2[2], r1[0]*r2[1] - r1[1]*r2[0]}
	l := math.Sqrt(n[0]*n[0] + n[1]*n[1] + n[2]*n[2])
	if !(l > 0) {
		return 0
	}
	return math.Acos(math.Min(math.Abs(n[2])/l, 1)) * 180 / math.Pi
}

// polyArea returns the area of a simple polygon (shoelace formula).
func polyArea(p [][2]float64) float64 {
	var a float64
	for i := range p {
		q := p[(i+1)%len(p)]
		a += p[i][0]*q[1] - q[0]*p[i][1]
	}
	return math.Abs(a) / 2
}

// clipRect clips a convex polygon to [0, w] x [0, h] (Sutherland-Hodgman).
func clipRect(p [][2]float64, w, h float64) [][2]float64 {
	type edge struct {
		in  func(q [2]float64) bool
		cut func(a, b [2]float64) [2]float64
	}
	at := func(a, b [2]float64, t float64) [2]float64 {
		return [2]float64{a[0] + t*(b[0]-a[0]), a[1] + t*(b[1]-a[1])}
	}
	edges := []edge{
		{func(q [2]float64) bool { return q[0] >= 0 }, func(a, b [2]float64) [2]float64 { return at(a, b, a[0]/(a[0]-b[0])) }},
		{func(q [2]float64) bool { return q[0] <= w }, func(a, b [2]float64) [2]float64 { return at(a, b, (w-a[0])/(b[0]-a[0])) }},
		{func(q [2]float64) bool { return q[1] >= 0 }, func(a, b [2]float64) [2]float64 { return at(a, b, a[1]/(a[1]-b[1])) }},
		{func(q [2]float64) bool { return q[1] <= h }, func(a, b [2]float64) [2]float64 { return at(a, b, (h-a[1])/(b[1]-a[1])) }},
	}
	for _, e := range edges {
		if len(p) == 0 {
			break
		}
		var out [][2]float64
		for i, cur := range p {
			prev := p[(i+len(p)-1)%len(p)]
			switch {
			case e.in(cur) && e.in(prev):
				out = append(out, cur)
			case e.in(cur):
				out = append(out, e.cut(prev, cur), cur)
			case e.in(prev):
				out = append(out, e.cut(prev, cur))
			}
		}
		p = out
	}
	return p
}

// OnCornerMark reports whether the image point (x, y) px lies on or next to
// one of the frame's corner marks (layout.go), outside the chart frame, for
// a chart printed chartMM mm along its short side: within 2 mm of the L's
// outline, beyond the frame on at least one axis. Nothing there is a
// target: a line 0.3 mm wide blurs into a faint, narrow bar whose "edge"
// would read a contrast near 1 and an MTF above 1.
func (ps *Pose) OnCornerMark(x, y, chartMM float64) bool {
	if !(chartMM > 0) {
		return false
	}
	d := ps.Design
	u, v := ps.designXY(x, y)
	if math.IsNaN(u) || math.IsNaN(v) {
		return false
	}
	const slack = 2.0 // mm
	for _, s := range [4][2]float64{{-1, -1}, {1, -1}, {1, 1}, {-1, 1}} {
		// Distances outward from the frame's corner, mm.
		du := s[0] * (u - s[0]*d.W/2) * chartMM
		dv := s[1] * (v - s[1]*d.H/2) * chartMM
		far := CornerOffMM + CornerWidthMM + slack
		near := -(CornerMarkMM + slack)
		if du <= far && dv <= far && du >= near && dv >= near && (du > 0 || dv > 0) {
			return true
		}
	}
	return false
}
