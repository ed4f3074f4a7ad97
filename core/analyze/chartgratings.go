package analyze

import (
	"math"

	"sagitta/core/chart"
	"sagitta/core/plane"
	"sagitta/core/sine"
)

// Gratings measured through the recognised chart. The blind search
// (core/sine's Find) can miss a grating in a noisy, demosaiced, compressed
// photo, and estimates each grating's frequency from its own spectrum. With
// the chart recognised every grating's outline, direction and frequency are
// known from the design through the pose, so each grating inside the
// photo is measured from that: its outline mapped by the homography (the
// fit keeps clear of the blurred border, sine.GratingGuess.Exact) and its
// frequency fixed at the design's (sine.GratingOptions.FixedFreq): cycles
// per chart unit times the gradient of the chart coordinate along the
// modulation in the photo (the row of the inverse Jacobian of the
// homography at the grating's centre; exact for an affine view, within the
// perspective's change of scale across one grating otherwise).

// designGrating returns grating g of the design seen through pose: its
// outline in px and its frequency (cy/px) and direction (degrees) at its
// centre.
func designGrating(pose *chart.Pose, g chart.Grating) (q [4][2]float64, freq, dir float64) {
	h, _ := pose.At(g.X, g.Y) // its own sheet's on a chart across sheets
	for i, c := range [4][2]float64{{-1, -1}, {1, -1}, {1, 1}, {-1, 1}} {
		q[i][0], q[i][1] = h.Apply(g.X+c[0]*g.W/2, g.Y+c[1]*g.H/2)
	}
	j := h.Jacobian(g.X, g.Y)
	det := j[0][0]*j[1][1] - j[0][1]*j[1][0]
	// Rows of the inverse Jacobian: the gradients of u and v in px.
	gu := [2]float64{j[1][1] / det, -j[0][1] / det}
	gv := [2]float64{-j[1][0] / det, j[0][0] / det}
	grad := gu
	if g.DirDeg == 90 {
		grad = gv
	}
	fx, fy := g.FreqPerUnit*grad[0], g.FreqPerUnit*grad[1]
	dir = math.Mod(math.Atan2(fy, fx)*180/math.Pi+360, 180)
	return q, math.Hypot(fx, fy), dir
}

// designJobs lists every grating of the recognised chart that lies inside
// the photo, placed from the design (nothing when pose is nil).
func designJobs(pose *chart.Pose) []PatternJob {
	if pose == nil {
		return nil
	}
	var jobs []PatternJob
	for _, g := range pose.Design.Gratings {
		in := true
		for _, c := range [4][2]float64{{-1, -1}, {1, -1}, {1, 1}, {-1, 1}} {
			in = in && pose.InFrame(g.X+c[0]*g.W/2, g.Y+c[1]*g.H/2, 2)
		}
		if !in {
			continue
		}
		q, f, dir := designGrating(pose, g)
		jobs = append(jobs, PatternJob{Kind: jobDesign, Corners: q, FreqCyPx: f, DirectionDeg: dir})
	}
	return jobs
}

// gratingsFromChart puts the chart's gratings measured from the design
// (the design jobs among jobs, measured in parts) in place of the searched
// gratings on the same targets (searched gratings elsewhere, not the
// chart's, are kept). The areas kept clear of edge finding follow.
func (ps *patterns) gratingsFromChart(jobs []PatternJob, parts []Part, pose *chart.Pose) {
	if pose == nil {
		return
	}
	onDesign := func(x, y float64) bool { return pose.Locate(x, y).Kind == chart.HitGrating }
	var kept []*sine.Grating
	var quads [][4][2]float64
	for i, g := range ps.gratings {
		if !onDesign(g.X, g.Y) {
			kept = append(kept, g)
			if i < len(ps.quads) {
				quads = append(quads, ps.quads[i])
			}
		}
	}
	for i, j := range jobs {
		if j.Kind != jobDesign || parts[i].Grating == nil {
			continue
		}
		kept = append(kept, parts[i].Grating)
		quads = append(quads, grow(j.Corners, patternMarginPx))
	}
	ps.gratings, ps.quads = kept, quads
}

// measureGuessed measures a grating of known outline and frequency; a panic
// becomes an error.
func measureGuessed(p *plane.Plane, g sine.GratingGuess) (gr *sine.Grating, err error) {
	defer func() {
		if r := recover(); r != nil {
			gr, err = nil, sine.ErrNoGrating
		}
	}()
	return sine.MeasureGrating(p, g, sine.GratingOptions{FixedFreq: true})
}

// storedPose rebuilds the recognised chart's pose from the image's chart
// result (nil when there is none or it is unusable).
func storedPose(img *Image) *chart.Pose {
	cr := img.Chart
	if cr == nil {
		return nil
	}
	code, err := chart.ParseCode(cr.Code)
	if err != nil {
		return nil
	}
	d, err := chart.NewDesign(code)
	if err != nil {
		return nil
	}
	inv, ok := cr.Homography.Inverse()
	if !ok {
		return nil
	}
	return &chart.Pose{Code: code, Design: d, H: cr.Homography, Inv: inv, Marks: marks(cr.Marks), W: img.Width, Hpx: img.Height}
}
