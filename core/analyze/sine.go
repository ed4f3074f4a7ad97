package analyze

import (
	"errors"
	"fmt"
	"math"
	"sort"

	"sagitta/core/chart"
	"sagitta/core/curve"
	"sagitta/core/edgefind"
	"sagitta/core/field"
	"sagitta/core/internal/coarse"
	"sagitta/core/note"
	"sagitta/core/plane"
	"sagitta/core/sine"
)

// Sine patterns (sinusoidal Siemens stars and sine gratings) in the
// pipeline. They are found before the edges are measured, so that edge
// candidates traced along a star's spokes or a grating's lines are dropped,
// and they add records of kind "star" and "grating" to the measurements.
//
// How the records fill the contract's curve (freq_cy_px from 0, mtf 1 at
// 0): a pattern measures only some frequencies. Nothing outside them is
// invented:
//
//   - star records carry the grid 0, 0.01, ... up to the highest frequency
//     the star reached (0.5 when its centre is usable down to the Nyquist
//     radius N/pi px; less otherwise, and then the record stops there and is
//     flagged "short-range"). Between 0 and the frequency of the largest
//     ring the values follow the parabola the normalisation assumes; they
//     are not measurements. measured_cy_px gives the measured interval.
//   - grating records carry (0, 1) and one point per grating of a set,
//     nothing between or beyond; measured_cy_px gives the lowest and highest
//     grating.
//
// So a star or grating record may end below 0.5 cy/px, unlike an edge
// record; readers must take the end of freq_cy_px as the end of the data
// (curve.Curve.At returns NaN beyond it, written as null).

// Agreement settings.
const (
	// AgreeLoCyPx and AgreeHiCyPx bound the frequencies compared, where
	// both methods measure well.
	AgreeLoCyPx = 0.05
	AgreeHiCyPx = 0.35
	// DisagreeRMS is the rms difference above which stars and edges are
	// said to disagree: the accuracy to which the two methods agree on
	// simulated lenses in the tests (noise-free simulations agree within
	// 0.01). Sagitta's choice.
	DisagreeRMS = 0.05
	// nearHeightMM and nearHeightShare: an edge is near a star when their
	// image heights differ by at most the larger of these (mm, share of
	// the corner height).
	nearHeightMM    = 1.0
	nearHeightShare = 0.1
	// nearDistShare (of the image diagonal) bounds how far in the frame a
	// nearby edge may lie from the star, and nearestEdges how many of the
	// closest count.
	nearDistShare = 0.2
	nearestEdges  = 12
	// patternMarginPx keeps edge candidates this far clear of a pattern.
	patternMarginPx = 8
)

// patterns holds the sine patterns of one photo once measured.
type patterns struct {
	stars    []*StarPart
	gratings []*sine.Grating
	discs    [][3]float64    // x, y, r of areas kept clear of edge finding
	quads    [][4][2]float64 // likewise
	rejected []Rejected      // stars found but not measurable
}

// Kinds of PatternJob.
const (
	jobStar    = "star"    // a sine star found by the search
	jobGrating = "grating" // a sine grating found by the search
	jobDesign  = "design"  // a grating of the recognised chart, placed from its design (chartgratings.go)
)

// PatternJob is one sine pattern found in the photo and waiting to be
// measured (a part of the photo's targets, like an edge candidate). It
// passes between processes as JSON.
type PatternJob struct {
	Kind string `json:"kind"` // "star", "grating" or "design"
	// A star: its centre and outer radius as the search found them, and
	// the direction of the field radius through it (StarOptions.AlignDeg).
	X        float64 `json:"x_px,omitempty"`
	Y        float64 `json:"y_px,omitempty"`
	RadiusPx float64 `json:"radius_px,omitempty"`
	AlignDeg float64 `json:"align_deg,omitempty"`
	// A grating: its outline in px; a design grating also its frequency
	// (cy/px) and direction (degrees) from the chart's design.
	Corners      [4][2]float64 `json:"corners_px"`
	FreqCyPx     float64       `json:"freq_cy_px,omitempty"`
	DirectionDeg float64       `json:"direction_deg,omitempty"`
}

// StarPart is a measured star as a Part carries it: its description and
// its two records (along and across the field radius), numbered when the
// photo is finished.
type StarPart struct {
	Info    StarInfo      `json:"info"`
	Records []Measurement `json:"records"`
}

// findPatterns finds the sine patterns of the linear plane of vs (the search of
// core/sine, and the gratings of the recognised chart when pose is not
// nil), to be measured later (measurePattern).
func findPatterns(vs *coarse.Views, geo field.Geometry, pose *chart.Pose) []PatternJob {
	var jobs []PatternJob
	for _, c := range sine.Find(vs.Plane(), sine.FindOptions{Views: vs}) {
		if c.Kind == sine.KindStar {
			align := math.Atan2(c.Y-geo.CentreY, c.X-geo.CentreX) * 180 / math.Pi
			jobs = append(jobs, PatternJob{Kind: jobStar, X: c.X, Y: c.Y, RadiusPx: c.RadiusPx, AlignDeg: align})
		} else {
			jobs = append(jobs, PatternJob{Kind: jobGrating, Corners: c.Corners})
		}
	}
	return append(jobs, designJobs(pose)...)
}

// possibleAreas are the areas the found patterns would keep clear of edge
// finding if every one of them measured as found: the parts of the plan
// leave out the edge candidates that meet them (Finish measures those
// that are not kept clear after all).
func possibleAreas(jobs []PatternJob) *patterns {
	ps := &patterns{}
	for _, j := range jobs {
		if j.Kind == jobStar {
			ps.discs = append(ps.discs, [3]float64{j.X, j.Y, j.RadiusPx + math.Max(patternMarginPx, 0.05*j.RadiusPx)})
		} else {
			ps.quads = append(ps.quads, grow(j.Corners, patternMarginPx))
		}
	}
	return ps
}

// measurePattern measures one found pattern in the linear plane p whose
// optical centre is centre: a Part with a star, a grating, a star too
// small to measure (rejected), or nothing.
func measurePattern(p *plane.Plane, j PatternJob, centre [2]float64, index int) Part {
	part := Part{Index: index}
	switch j.Kind {
	case jobStar:
		s, err := measureStar(p, sine.StarGuess{X: j.X, Y: j.Y, RadiusPx: j.RadiusPx}, j.AlignDeg)
		switch {
		case s != nil:
			part.Star = starPart(s, centre)
		case errors.Is(err, sine.ErrStarTooSmall):
			part.Rejected = &Rejected{j.X - j.RadiusPx, j.Y, j.X + j.RadiusPx, j.Y,
				"sine star too small for its number of cycles", string(note.StarTooSmall)}
		}
	case jobGrating:
		part.Grating, _ = measureGrating(p, j.Corners)
	case jobDesign:
		g, err := measureGuessed(p, sine.GratingGuess{Corners: j.Corners, FreqCyPx: j.FreqCyPx, DirectionDeg: j.DirectionDeg, Exact: true})
		if err == nil {
			part.Grating = g
		}
	}
	return part
}

// patternsOf gathers the measured patterns from their parts (in the order
// of jobs), in the order the records take: the searched stars and
// gratings, with the chart's gratings measured from the design in place of
// searched ones on the same targets (gratingsFromChart), and the areas
// kept clear of edge finding.
func patternsOf(jobs []PatternJob, parts []Part, pose *chart.Pose) *patterns {
	ps := &patterns{}
	for i, j := range jobs {
		p := parts[i]
		switch {
		case j.Kind == jobDesign:
		case p.Star != nil:
			ps.stars = append(ps.stars, p.Star)
			rad := math.Max(p.Star.Info.RadiusPx, j.RadiusPx)
			ps.discs = append(ps.discs, [3]float64{p.Star.Info.XPx, p.Star.Info.YPx, rad + math.Max(patternMarginPx, 0.05*rad)})
		case p.Grating != nil:
			ps.gratings = append(ps.gratings, p.Grating)
			ps.quads = append(ps.quads, grow(j.Corners, patternMarginPx))
		case p.Rejected != nil:
			ps.rejected = append(ps.rejected, *p.Rejected)
		}
	}
	ps.gratingsFromChart(jobs, parts, pose)
	return ps
}

// measureStar and measureGrating turn a panic into an error so that one
// odd pattern cannot take the photo's analysis down.
func measureStar(p *plane.Plane, g sine.StarGuess, align float64) (s *sine.Star, err error) {
	defer func() {
		if r := recover(); r != nil {
			s, err = nil, fmt.Errorf("internal error: %v", r)
		}
	}()
	return sine.MeasureStar(p, g, sine.StarOptions{AlignDeg: align})
}

func measureGrating(p *plane.Plane, corners [4][2]float64) (g *sine.Grating, err error) {
	defer func() {
		if r := recover(); r != nil {
			g, err = nil, fmt.Errorf("internal error: %v", r)
		}
	}()
	return sine.MeasureGrating(p, sine.GratingGuess{Corners: corners}, sine.GratingOptions{})
}

// coversReject reports whether a rejected run of the edge search lies on
// a pattern: a star's spokes and a grating's lines are not edges.
func (ps *patterns) coversReject(r edgefind.Reject) bool {
	mx, my := 0.5*(r.X0+r.X1), 0.5*(r.Y0+r.Y1)
	return ps.overlaps([4][2]float64{{r.X0, r.Y0}, {mx, my}, {r.X1, r.Y1}, {mx, my}})
}

// overlaps reports whether the convex quadrilateral q meets any pattern
// area.
func (ps *patterns) overlaps(q [4][2]float64) bool {
	for _, d := range ps.discs {
		if distToQuad(q, d[0], d[1]) < d[2] {
			return true
		}
	}
	for _, a := range ps.quads {
		if quadsMeet(q, a) {
			return true
		}
	}
	return false
}

// distToQuad returns the distance from (x, y) to the convex quadrilateral
// q (0 inside).
func distToQuad(q [4][2]float64, x, y float64) float64 {
	if insideQuad(q, x, y) {
		return 0
	}
	d := math.Inf(1)
	for i := range 4 {
		a, b := q[i], q[(i+1)%4]
		dx, dy := b[0]-a[0], b[1]-a[1]
		l2 := dx*dx + dy*dy
		t := 0.0
		if l2 > 0 {
			t = math.Max(0, math.Min(1, ((x-a[0])*dx+(y-a[1])*dy)/l2))
		}
		d = math.Min(d, math.Hypot(x-a[0]-t*dx, y-a[1]-t*dy))
	}
	return d
}

// insideQuad reports whether (x, y) lies inside the convex quadrilateral q
// (either winding).
func insideQuad(q [4][2]float64, x, y float64) bool {
	pos, neg := false, false
	for i := range 4 {
		a, b := q[i], q[(i+1)%4]
		c := (b[0]-a[0])*(y-a[1]) - (b[1]-a[1])*(x-a[0])
		pos = pos || c > 0
		neg = neg || c < 0
	}
	return !(pos && neg)
}

// quadsMeet reports whether two convex quadrilaterals intersect
// (separating axis test on the sides of both).
func quadsMeet(a, b [4][2]float64) bool {
	for _, q := range [2][4][2]float64{a, b} {
		for i := range 4 {
			nx, ny := -(q[(i+1)%4][1] - q[i][1]), q[(i+1)%4][0]-q[i][0]
			amin, amax := project(a, nx, ny)
			bmin, bmax := project(b, nx, ny)
			if amax < bmin || bmax < amin {
				return false
			}
		}
	}
	return true
}

func project(q [4][2]float64, nx, ny float64) (float64, float64) {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, p := range q {
		v := p[0]*nx + p[1]*ny
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	return lo, hi
}

// grow moves each corner of a convex quadrilateral m px away from its
// centroid along the diagonal (enough to clear a blurred border).
func grow(q [4][2]float64, m float64) [4][2]float64 {
	var cx, cy float64
	for _, p := range q {
		cx += p[0] / 4
		cy += p[1] / 4
	}
	for i, p := range q {
		dx, dy := p[0]-cx, p[1]-cy
		l := math.Hypot(dx, dy)
		if l > 0 {
			q[i] = [2]float64{p[0] + m*math.Sqrt2*dx/l, p[1] + m*math.Sqrt2*dy/l}
		}
	}
	return q
}

// starPart describes a measured star and makes its two records: along and
// across the field radius through the star (at the optical centre, +x and
// +y). Its segments were aligned with that radius when it was measured
// (findPatterns), so the records depend on the optical centre; what
// depends on the pitch and the field frequencies is left to place. The
// star's number is set by starRecords.
func starPart(s *sine.Star, centre [2]float64) *StarPart {
	info := StarInfo{XPx: s.X, YPx: s.Y,
		CentreUncPx: s.CentreUncPx, Cycles: s.Cycles, RadiusPx: s.RadiusPx, InnerPx: s.InnerPx,
		OuterPx: s.OuterPx, Modulation: s.Modulation, RefFreq: s.RefFreq, MaxFreq: s.MaxFreq, Resolved: s.ResolvedFreq,
		AliasMod: s.AliasMod, Segments: segmentsOf(s.Segments), Flags: []string{}, Warnings: []string{}, Records: []int{}}
	for _, f := range s.Flags {
		info.Flags = append(info.Flags, string(f))
		info.Warnings = append(info.Warnings, sineFlagText[f])
	}
	// The field radius through the star; at the optical centre, +x.
	radial := math.Atan2(s.Y-centre[1], s.X-centre[0]) * 180 / math.Pi
	var out []Measurement
	for _, dir := range []float64{radial, radial + 90} {
		c, se := s.Along(dir)
		dir = math.Mod(dir+360, 180)
		if dir > 180-1e-9 {
			dir = 0
		}
		rec := patternRecord("star", s.X, s.Y, dir, c, s.RefFreq, s.MaxFreq)
		rec.StdErr = se
		rec.Flags, rec.Warnings = append(rec.Flags, info.Flags...), append(rec.Warnings, info.Warnings...)
		r := s.RadiusPx
		rec.Region = [4][2]float64{{s.X - r, s.Y - r}, {s.X + r, s.Y - r}, {s.X + r, s.Y + r}, {s.X - r, s.Y + r}}
		rec.Contrast = Number(math.NaN()) // light/dark ratio; undefined for a modulation of 1 or more (bars)
		if s.Modulation < 1 {
			rec.Contrast = Number((1 + s.Modulation) / (1 - s.Modulation))
		}
		if s.NoiseRMS > 0 {
			rec.SNR = Number(s.Modulation * s.Mean / s.NoiseRMS)
		} else {
			rec.SNR = Number(math.Inf(1))
		}
		out = append(out, rec)
	}
	return &StarPart{Info: info, Records: out}
}

// starRecords numbers the measured stars (1, 2, ...), fills img.Stars and
// returns their records.
func (ps *patterns) starRecords(img *Image) []Measurement {
	var out []Measurement
	for i, sp := range ps.stars {
		info := sp.Info
		info.ID = i + 1
		for _, rec := range sp.Records {
			rec.PatternID = info.ID
			out = append(out, rec)
		}
		img.Stars = append(img.Stars, info)
	}
	return out
}

// patternRecord builds the common part of a star or grating record whose
// direction of measurement is dir degrees and which measured the
// frequencies [lo, hi] of curve c (see place for the rest).
func patternRecord(kind string, x, y, dir float64, c curve.Curve, lo, hi float64) Measurement {
	return Measurement{
		Kind: kind, XPx: x, YPx: y,
		NormalDeg:    dir,
		Freq:         c.Freq,
		MTF:          c.Value,
		Warnings:     []string{},
		Flags:        []string{},
		ESF:          Profile{X: []float64{}, V: []float64{}},
		LSF:          Profile{X: []float64{}, V: []float64{}},
		SNR:          Number(math.NaN()),
		Contrast:     Number(math.NaN()),
		MeasuredCyPx: &[2]float64{lo, hi},
	}
}

// agreement compares every star record with the edge records of the same
// orientation at a similar image height, sets the star's and the photo's
// agreement figures, and flags disagreeing records (the photo's warning is
// disagreement's).
func agreement(img *Image) {
	hTol := math.Max(nearHeightMM, nearHeightShare*img.CornerMM)
	var sum2, sumD float64
	var n int
	starIdx := map[int]int{}
	for i, s := range img.Stars {
		starIdx[s.ID] = i
	}
	for ri := range img.Measurements {
		m := &img.Measurements[ri]
		if m.Kind != "star" {
			continue
		}
		if si, ok := starIdx[m.PatternID]; ok {
			img.Stars[si].Records = append(img.Stars[si].Records, m.ID)
		}
		star := curve.Curve{Freq: m.Freq, Value: m.MTF}
		// Nearby edges: same orientation, similar image height, and close
		// in the frame (a decentred lens differs between the two sides at
		// equal height), the nearestEdges closest.
		type cand struct {
			d float64
			c curve.Curve
		}
		var cs []cand
		maxDist := nearDistShare * math.Hypot(float64(img.Width), float64(img.Height))
		for _, e := range img.Measurements {
			if e.Kind == "edge" && e.Orientation == m.Orientation && m.Orientation != field.Mixed &&
				math.Abs(e.HeightMM-m.HeightMM) <= hTol {
				if d := math.Hypot(e.XPx-m.XPx, e.YPx-m.YPx); d <= maxDist {
					cs = append(cs, cand{d, curve.Curve{Freq: e.Freq, Value: e.MTF}})
				}
			}
		}
		sort.Slice(cs, func(a, b int) bool { return cs[a].d < cs[b].d })
		var near []curve.Curve
		for i := 0; i < len(cs) && i < nearestEdges; i++ {
			near = append(near, cs[i].c)
		}
		if len(near) == 0 {
			continue
		}
		var s2, sd float64
		var k int
		for f := AgreeLoCyPx; f <= AgreeHiCyPx+1e-9; f += 0.01 {
			sv := star.At(f)
			if math.IsNaN(sv) || f < m.MeasuredCyPx[0] {
				continue
			}
			var ev float64
			var ne int
			for _, e := range near {
				if v := e.At(f); !math.IsNaN(v) {
					ev += v
					ne++
				}
			}
			if ne == 0 {
				continue
			}
			d := ev/float64(ne) - sv
			s2 += d * d
			sd += d
			k++
		}
		if k == 0 {
			continue
		}
		a := &StarAgreement{Edges: len(near), RMSDiff: math.Sqrt(s2 / float64(k)), MeanDiff: sd / float64(k)}
		m.Agreement = a
		if si, ok := starIdx[m.PatternID]; ok && (img.Stars[si].Agreement == nil || a.RMSDiff > img.Stars[si].Agreement.RMSDiff) {
			img.Stars[si].Agreement = a
		}
		sum2 += a.RMSDiff * a.RMSDiff
		sumD += a.MeanDiff
		n++
		if a.RMSDiff > DisagreeRMS {
			m.Flags = append(m.Flags, string(sine.FlagDisagree))
			m.Warnings = append(m.Warnings, disagreeText(a))
		}
	}
	if n == 0 {
		return
	}
	img.Agreement = &Agreement{Records: n, RMSDiff: math.Sqrt(sum2 / float64(n)), MeanDiff: sumD / float64(n),
		LoCyPx: AgreeLoCyPx, HiCyPx: AgreeHiCyPx}
}

// disagreement is the image's warning when stars and edges disagree (see
// derivedWarnings); false when they agree.
func disagreement(a *Agreement) (note.Note, bool) {
	if a == nil || !(a.RMSDiff > DisagreeRMS) {
		return note.Note{}, false
	}
	return note.New(note.StarsEdgesDisagree, "sine stars and edges disagree: "+disagreeText(&StarAgreement{RMSDiff: a.RMSDiff, MeanDiff: a.MeanDiff})), true
}

// disagreeText words a disagreement for people.
func disagreeText(a *StarAgreement) string {
	s := fmt.Sprintf("edges and the sine star differ by %.2f rms in MTF at %.2f-%.2f cy/px", a.RMSDiff, AgreeLoCyPx, AgreeHiCyPx)
	if a.MeanDiff > 0 {
		return s + "; the edges read higher, as in-camera sharpening makes them"
	}
	return s + "; the edges read lower (noise reduction, or a soft or curved edge?)"
}

// sineFlagText words each pattern flag for people.
var sineFlagText = map[sine.Flag]string{
	sine.FlagCentreUncertain: "the star's centre is uncertain: its frequencies may be off",
	sine.FlagAliased:         "moire at the star's centre: the system passes detail beyond Nyquist",
	sine.FlagClipped:         "the pattern reaches the limit of the file's values",
	sine.FlagFewCycles:       "few cycles resolved: the fit rests on little of the pattern",
	sine.FlagShortRange:      "measured only part of the way to Nyquist",
	sine.FlagNotSine:         "the pattern is not sinusoidal (bars, or a tone curve that is not linear)",
	sine.FlagNoisy:           "noisy",
	sine.FlagWeakReference:   "the low-frequency reference is not low enough: values may read high",
	sine.FlagSharpened:       "the star's modulation rises with frequency (in-camera sharpening): it is normalised at its largest ring, so it reads low by that ring's own gain",
	sine.FlagDisagree:        "disagrees with nearby edges",
}

func axisDiff(a, b float64) float64 {
	d := math.Mod(math.Abs(a-b), 180)
	return math.Min(d, 180-d)
}

func sortedKeys(m map[string]bool) []string {
	out := make([]string, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}
