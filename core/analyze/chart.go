package analyze

import (
	"sort"

	"sagitta/core/chart"
)

// ChartResult is what the analysis learnt from a Sagitta chart in the
// photo: which chart, where, how it was photographed, and which of its
// targets were measured.
type ChartResult struct {
	Code string `json:"code"` // the chart code printed on the sheet, e.g. "S1-3:2-L"
	// Marks are the recognition marks read in the photo.
	Marks []chart.FoundMark `json:"marks"`
	// Homography maps chart units (the chart's short side is 1, origin at
	// its centre, x right, y down) to image px, row-major 3 x 3.
	Homography chart.Homography `json:"homography"`
	Setup      chart.Setup      `json:"setup"`
	// EdgesExpected counts the square edges that lie inside the photo;
	// EdgesIdentified those measured and tagged with their target.
	EdgesExpected   int `json:"edges_expected"`
	EdgesIdentified int `json:"edges_identified"`
	// Patterns names the chart target of each sine pattern the analysis
	// measured (Image.Stars and Image.Gratings, by their ids).
	Patterns []PatternTarget `json:"patterns"`
	// Missing lists the targets inside the photo that gave no measurement,
	// with the reason when one is known; OutsideFrame the targets that lie
	// (partly) outside the photo.
	Missing      []MissingTarget `json:"missing"`
	OutsideFrame []string        `json:"outside_frame"`
	// IgnoredOnMarks and IgnoredOnPatterns count the straight runs that
	// lie on the recognition marks (and the frame's corner marks and the
	// grey steps) or inside the sine patterns: they are
	// parts of known chart features, not candidate targets, and are left
	// out of Image.Rejected.
	IgnoredOnMarks    int `json:"ignored_on_marks"`
	IgnoredOnPatterns int `json:"ignored_on_patterns"`
	// Print is the print assumed to cut sine patterns at its limit
	// (printlimit.go).
	Print PrintInfo `json:"print"`
}

// PatternTarget ties a measured sine pattern to its chart target.
type PatternTarget struct {
	Kind     string `json:"kind"` // "star" or "grating"
	ID       int    `json:"id"`   // in Image.Stars or Image.Gratings
	TargetID string `json:"target_id"`
}

// MissingTarget is a chart target (or one edge of a square) with no
// measurement.
type MissingTarget struct {
	TargetID string `json:"target_id"`
	Edge     int    `json:"target_edge,omitempty"`
	Reason   string `json:"reason"`
}

// recogniseChart looks for Sagitta's chart in the photo. When it is there,
// it tags every measurement with the target under it, sets aside edge
// measurements and rejected runs that lie on marks or sine patterns (they
// are counted, not listed) and lists the targets with no measurement; the
// set-up checks, which depend on the pixel pitch, are left to checkSetup.
// Photos without the chart's marks are left exactly as they were.
func recogniseChart(img *Image, pose *chart.Pose, note string, s Settings) {
	if pose == nil {
		if note != "" {
			img.Warnings = append(img.Warnings, "chart: "+note)
		}
		return
	}
	cr := &ChartResult{
		Code: pose.Code.String(), Marks: pose.Marks, Homography: pose.H,
		Patterns: []PatternTarget{}, Missing: []MissingTarget{}, OutsideFrame: []string{},
	}
	img.Chart = cr
	cr.Print = printInfo(s, pose.Code)
	cutAtPrint(img, pose, cr.Print)

	type key struct {
		id   string
		edge int
	}
	got := map[key]bool{}
	kept := img.Measurements[:0]
	for _, m := range img.Measurements {
		hit := pose.Locate(m.XPx, m.YPx)
		switch {
		case m.Kind == "edge" && (hit.Kind == chart.HitMark || hit.Kind == chart.HitWedge || pose.OnCornerMark(m.XPx, m.YPx, cr.Print.ChartMM)):
			cr.IgnoredOnMarks++
			continue
		case m.Kind == "edge" && (hit.Kind == chart.HitStar || hit.Kind == chart.HitGrating):
			cr.IgnoredOnPatterns++
			continue
		case m.Kind == "grating":
			// A grating record groups the gratings of one direction (sine.go);
			// ChartResult.Patterns names each grating's target instead.
		case hit.ID != "" && hit.Kind != chart.HitMark:
			m.TargetID, m.TargetEdge = hit.ID, hit.Edge
			m.ChartXY = &[2]float64{hit.X, hit.Y}
			f := hit.Field
			m.ChartField = &f
			got[key{hit.ID, hit.Edge}] = true
		}
		kept = append(kept, m)
	}
	img.Measurements = kept
	keptRej := img.Rejected[:0]
	for _, r := range img.Rejected {
		switch hit := pose.Locate((r.X0+r.X1)/2, (r.Y0+r.Y1)/2); {
		case hit.Kind == chart.HitMark || hit.Kind == chart.HitWedge || pose.OnCornerMark((r.X0+r.X1)/2, (r.Y0+r.Y1)/2, cr.Print.ChartMM):
			cr.IgnoredOnMarks++
		case hit.Kind == chart.HitStar || hit.Kind == chart.HitGrating:
			cr.IgnoredOnPatterns++
		default:
			keptRej = append(keptRej, r)
		}
	}
	img.Rejected = keptRej

	// Square edges inside the photo with no measurement: the reason of a
	// rejected candidate on that edge, if any.
	rejectedOn := map[key]string{}
	for _, r := range img.Rejected {
		hit := pose.Locate((r.X0+r.X1)/2, (r.Y0+r.Y1)/2)
		if hit.Kind == chart.HitSquare {
			if _, seen := rejectedOn[key{hit.ID, hit.Edge}]; !seen {
				rejectedOn[key{hit.ID, hit.Edge}] = r.Reason
			}
		}
	}
	margin := 2.0
	for _, q := range pose.Design.Squares {
		in := true
		for _, c := range q.Corners() {
			in = in && pose.InFrame(c[0], c[1], margin)
		}
		if !in {
			cr.OutsideFrame = append(cr.OutsideFrame, q.ID)
			continue
		}
		for e := 1; e <= 4; e++ {
			cr.EdgesExpected++
			if got[key{q.ID, e}] {
				cr.EdgesIdentified++
				continue
			}
			reason := rejectedOn[key{q.ID, e}]
			if reason == "" {
				reason = "not found"
			}
			cr.Missing = append(cr.Missing, MissingTarget{q.ID, e, reason})
		}
	}
	// The sine analysis's stars and gratings, by the target under each;
	// stars and gratings are listed as missing only when the photo's sine
	// analysis found any pattern at all.
	for _, st := range img.Stars {
		if hit := pose.Locate(st.XPx, st.YPx); hit.Kind == chart.HitStar {
			cr.Patterns = append(cr.Patterns, PatternTarget{"star", st.ID, hit.ID})
			got[key{hit.ID, 0}] = true
		}
	}
	for _, g := range img.Gratings {
		if hit := pose.Locate(g.XPx, g.YPx); hit.Kind == chart.HitGrating {
			cr.Patterns = append(cr.Patterns, PatternTarget{"grating", g.ID, hit.ID})
			got[key{hit.ID, 0}] = true
		}
	}
	sine := len(img.Stars)+len(img.Gratings) > 0
	inFrame := func(x0, y0, x1, y1 float64) bool {
		return pose.InFrame(x0, y0, margin) && pose.InFrame(x1, y1, margin) && pose.InFrame(x0, y1, margin) && pose.InFrame(x1, y0, margin)
	}
	for _, s := range pose.Design.Stars {
		switch {
		case !inFrame(s.X-s.Radius, s.Y-s.Radius, s.X+s.Radius, s.Y+s.Radius):
			cr.OutsideFrame = append(cr.OutsideFrame, s.ID)
		case sine && !got[key{s.ID, 0}]:
			cr.Missing = append(cr.Missing, MissingTarget{TargetID: s.ID, Reason: "not found as a sine star"})
		}
	}
	for _, g := range pose.Design.Gratings {
		switch {
		case !inFrame(g.X-g.W/2, g.Y-g.H/2, g.X+g.W/2, g.Y+g.H/2):
			cr.OutsideFrame = append(cr.OutsideFrame, g.ID)
		case sine && !got[key{g.ID, 0}]:
			cr.Missing = append(cr.Missing, MissingTarget{TargetID: g.ID, Reason: "not found as a sine grating"})
		}
	}
	sort.SliceStable(cr.Missing, func(a, b int) bool { return cr.Missing[a].TargetID < cr.Missing[b].TargetID })
}

// checkSetup sets the chart's set-up checks (chart.Pose.Check) from the
// stored chart code and homography: the tilt needs the focal length in
// pixels, from the Exif focal length and the pixel pitch. Run and
// Resummarise both check the set-up with it.
func checkSetup(img *Image) error {
	cr := img.Chart
	code, err := chart.ParseCode(cr.Code)
	if err != nil {
		return err
	}
	d, err := chart.NewDesign(code)
	if err != nil {
		return err
	}
	inv, ok := cr.Homography.Inverse()
	if !ok {
		return ResultError("the chart's homography cannot be inverted")
	}
	pose := &chart.Pose{Code: code, Design: d, H: cr.Homography, Inv: inv, Marks: cr.Marks, W: img.Width, Hpx: img.Height}
	focalPx := 0.0
	if f := img.Exif.FocalLengthMM; f > 0 && img.PitchUM > 0 {
		focalPx = f * 1000 / img.PitchUM
	}
	cr.Setup = pose.Check(focalPx)
	return nil
}
