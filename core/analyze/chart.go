package analyze

import (
	"sort"

	"sagitta/core/chart"
	"sagitta/core/note"
)

// recogniseChart looks for Sagitta's chart in the photo. When it is there,
// it tags every measurement with the target under it, sets aside edge
// measurements and rejected runs that lie on marks or sine patterns (they
// are counted, not listed) and lists the targets with no measurement; the
// set-up checks, which depend on the pixel pitch, are left to checkSetup.
// Photos without the chart's marks are left exactly as they were.
func recogniseChart(img *Image, pose *chart.Pose, why note.Note, s Settings) {
	if pose == nil {
		if why.Text != "" {
			img.warn(note.New(why.Code, "chart: "+why.Text))
		}
		return
	}
	cr := &ChartResult{
		Code: pose.Code.String(), Marks: marksOf(pose.Marks), Homography: pose.H,
		Patterns: []PatternTarget{}, Missing: []MissingTarget{}, OutsideFrame: []string{},
	}
	img.Chart = cr
	for _, sp := range pose.Sheets {
		cr.Sheets = append(cr.Sheets, SheetResult{Sheet: sp.Sheet.Name(), Homography: sp.H, Own: sp.Own, Marks: len(sp.Marks)})
	}
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
			if hit.Sheet != "" {
				m.Sheet, m.PlacedXY = hit.Sheet, &[2]float64{hit.PlacedX, hit.PlacedY}
			}
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
	rejectedOn := map[key]Rejected{}
	for _, r := range img.Rejected {
		hit := pose.Locate((r.X0+r.X1)/2, (r.Y0+r.Y1)/2)
		if hit.Kind == chart.HitSquare {
			if _, seen := rejectedOn[key{hit.ID, hit.Edge}]; !seen {
				rejectedOn[key{hit.ID, hit.Edge}] = r
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
			r, ok := rejectedOn[key{q.ID, e}]
			if !ok {
				r.Reason, r.ReasonCode = "not found", string(note.NotFound)
			}
			cr.Missing = append(cr.Missing, MissingTarget{q.ID, e, r.Reason, r.ReasonCode})
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
			cr.Missing = append(cr.Missing, MissingTarget{TargetID: s.ID, Reason: "not found as a sine star", ReasonCode: string(note.StarNotFound)})
		}
	}
	for _, g := range pose.Design.Gratings {
		switch {
		case !inFrame(g.X-g.W/2, g.Y-g.H/2, g.X+g.W/2, g.Y+g.H/2):
			cr.OutsideFrame = append(cr.OutsideFrame, g.ID)
		case sine && !got[key{g.ID, 0}]:
			cr.Missing = append(cr.Missing, MissingTarget{TargetID: g.ID, Reason: "not found as a sine grating", ReasonCode: string(note.GratingNotFound)})
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
	pose := &chart.Pose{Code: code, Design: d, H: cr.Homography, Inv: inv, Marks: marks(cr.Marks), W: img.Width, Hpx: img.Height}
	focalPx := 0.0
	if f := img.Exif.FocalLengthMM; f > 0 && img.PitchUM > 0 {
		focalPx = f * 1000 / img.PitchUM
	}
	cr.Setup = setupOf(pose.Check(focalPx))
	if len(cr.Sheets) > 0 {
		if len(cr.Sheets) != len(d.Sheets) {
			return ResultError("the chart's sheets do not match its code")
		}
		pose.Sheets = make([]chart.SheetPose, len(d.Sheets))
		for i, sr := range cr.Sheets {
			inv, ok := sr.Homography.Inverse()
			if !ok {
				return ResultError("a sheet's homography cannot be inverted")
			}
			pose.Sheets[i] = chart.SheetPose{Sheet: d.Sheets[i], H: sr.Homography, Inv: inv, Own: sr.Own}
		}
		seams := pose.Seams(cr.Print.ChartMM)
		cr.Seams = cr.Seams[:0]
		for _, sm := range seams {
			cr.Seams = append(cr.Seams, SeamResult(sm))
		}
		texts, codes := chart.SeamWarnings(seams)
		cr.Setup.Warnings = append(cr.Setup.Warnings, texts...)
		cr.Setup.WarningCodes = append(cr.Setup.WarningCodes, codes...)
	}
	return nil
}
