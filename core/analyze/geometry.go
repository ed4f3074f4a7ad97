package analyze

import (
	"fmt"
	"math"

	"sagitta/core/chart"
	"sagitta/core/distortion"
	"sagitta/core/falloff"
	"sagitta/core/field"
	"sagitta/core/note"
	"sagitta/core/plane"
)

// What the chart tells about the frame's geometry and light: distortion
// from the located targets' centres (core/distortion), fall-off from the
// paper between them (core/falloff). Run samples the paper (samplePaper);
// summarise fits both (summariseGeometry) from what the Image keeps, so
// Resummarise gives the same with a new centre or pitch.

// Reasons given when the chart is not there.
const (
	noChartDistortion = "not measured: the photo shows neither Sagitta's chart nor enough long straight edges (two, each measured in four pieces or more)"
	noChartFalloff    = "not measured: the photo does not show Sagitta's chart, whose blank paper it samples"
)

// samplePaper sets img.Falloff's patches: the mean linear level of p over
// patches of blank paper on the recognised chart, at the grid's corners
// and the middles of the cells' sides wherever nothing is printed near
// them and the patch lies inside the photo.
func samplePaper(img *Image, p *plane.Plane, pose *chart.Pose) {
	if pose == nil {
		img.Falloff = &Falloff{Reason: noChartFalloff, ReasonCode: string(note.FalloffNoChart)}
		return
	}
	img.Falloff = &Falloff{Patches: []FalloffPatch{}}
	for _, b := range blanks(pose) {
		u, v := pose.ImageXY(b[0], b[1])
		m, n := meanIn(p, pose, b[0]-b[2], b[1]-b[2], b[0]+b[2], b[1]+b[2])
		if n < minPatchPx {
			continue
		}
		img.Falloff.Patches = append(img.Falloff.Patches, FalloffPatch{XPx: u, YPx: v, Level: m})
	}
}

// minPatchPx pixels make a patch of paper.
const minPatchPx = 9

// blanks returns the blank patches' centres and half-sides (chart units)
// on the chart of pose: grid corners and side middles, kept where the
// patch and a margin around it hold only paper (Locate) and lie inside the
// photo.
func blanks(pose *chart.Pose) [][3]float64 {
	d := pose.Design
	cw, ch := d.W/float64(d.Cols), d.H/float64(d.Rows)
	cell := math.Min(cw, ch)
	var out [][3]float64
	for j := 0; j <= 2*d.Rows; j++ {
		for i := 0; i <= 2*d.Cols; i++ {
			if i%2 == 1 && j%2 == 1 {
				continue // a cell's centre: its target
			}
			half := 0.05 * cell // side middles: between two targets
			if i%2 == 0 && j%2 == 0 {
				half = 0.09 * cell // grid corners: between four
			}
			x := -d.W/2 + float64(i)*cw/2
			y := -d.H/2 + float64(j)*ch/2
			// Keep patches on the frame's border inside it.
			x = math.Max(-d.W/2+1.5*half, math.Min(d.W/2-1.5*half, x))
			y = math.Max(-d.H/2+1.5*half, math.Min(d.H/2-1.5*half, y))
			if paperAround(pose, x, y, 1.4*half) {
				out = append(out, [3]float64{x, y, half})
			}
		}
	}
	return out
}

// paperAround reports whether the chart holds only paper within r chart
// units of (x, y) (checked at the centre and 16 points around it) and the
// square around it lies inside the photo.
func paperAround(pose *chart.Pose, x, y, r float64) bool {
	for k := -1; k < 16; k++ {
		px, py := x, y
		if k >= 0 {
			s, c := math.Sincos(float64(k) * math.Pi / 8)
			px, py = x+r*c, y+r*s
		}
		u, v := pose.ImageXY(px, py)
		if hit := pose.Locate(u, v); hit.Kind != chart.HitChart || !pose.InFrame(px, py, 1) || nearSeam(pose, px, py) {
			return false
		}
	}
	return true
}

// nearSeam reports whether the chart point (x, y) lies on a join of a
// chart across sheets, where cutting and overlap guides are printed and
// two sheets' paper meet: within 1 % of the chart's short side of an edge
// of its sheet that is not the chart's own border.
func nearSeam(pose *chart.Pose, x, y float64) bool {
	d := pose.Design
	if len(d.Sheets) == 0 {
		return false
	}
	m := 0.01 * math.Min(d.W, d.H)
	for _, sh := range d.Sheets {
		if !sh.Contains(x, y) {
			continue
		}
		inner := func(v, edge, border float64) bool { return math.Abs(v-edge) < m && math.Abs(edge-border) > 1e-9 }
		if inner(x, sh.X0, -d.W/2) || inner(x, sh.X1, d.W/2) || inner(y, sh.Y0, -d.H/2) || inner(y, sh.Y1, d.H/2) {
			return true
		}
	}
	return false
}

// summariseGeometry fits the distortion and the fall-off for the field
// geometry geo from what img keeps: the chart's tagged edges, marks and
// stars, and the paper patches.
func summariseGeometry(img *Image, geo field.Geometry) {
	fr := distortion.Frame{W: img.Width, H: img.Height, CentreX: geo.CentreX, CentreY: geo.CentreY}
	img.Distortion = distortionOf(img, fr)
	if img.Falloff != nil && (img.Falloff.Measured || img.Falloff.Patches != nil) {
		img.Falloff = falloffOf(img.Falloff.Patches, falloff.Frame(fr), img.PitchUM)
	}
}

// distortionOf fits the distortion to the chart's located targets.
func distortionOf(img *Image, fr distortion.Frame) *Distortion {
	if img.Chart == nil {
		return distortionFromEdges(img, fr)
	}
	if len(img.Chart.Sheets) > 0 {
		// Each sheet hangs a little off (up to millimetres): one homography
		// for the whole chart does not hold, and each sheet's own takes up
		// part of the distortion.
		return &Distortion{Reason: "not measured: the chart is printed across sheets, which never hang exactly in line; photograph a chart on one sheet for distortion",
			ReasonCode: string(note.DistortionTiled)}
	}
	pts := chartPoints(img)
	fit, err := distortion.FitChart(pts, [9]float64(img.Chart.Homography), fr)
	if err != nil {
		return &Distortion{Reason: "not measured: too few of the chart's targets were located to fit the distortion",
			ReasonCode: string(note.DistortionFewPoints)}
	}
	r := distortion.Summarise(fit, pts, fr, img.PitchUM, len(img.Chart.Setup.WarningCodes) > 0)
	R := fr.HalfDiagPx()
	out := &Distortion{
		Measured: true, Source: "chart", K1: r.K1, K2: r.K2, HalfDiagonalPx: R,
		HeightMM: r.HeightMM, HeightFrac: r.HeightS, DisplacementPct: r.DisplacementPct,
		CornerPct: r.CornerPct, LongEdgePct: r.LongEdgePct,
		Kind: r.Kind, Text: r.Text, Code: r.Code, ResidualPx: r.RMSPx, Points: r.N,
		Targets: make([]DistortionTarget, len(pts)),
	}
	out.Cautions, out.CautionCodes = note.Split(r.Cautions)
	for i, p := range pts {
		q := r.Points[i]
		out.Targets[i] = DistortionTarget{
			Kind: p.Kind, TargetID: p.ID, XPx: p.XPx, YPx: p.YPx, ChartXY: [2]float64{p.ChartX, p.ChartY},
			HeightFrac: q.HeightS, HeightMM: q.HeightS * R * img.PitchUM / 1000,
			DisplacementPct: Number(q.DisplacementPct), ResidualPx: q.ResidualPx, Used: q.Used,
		}
	}
	return out
}

// minPiecePx is the shortest edge record taken as a piece of a long
// straight edge: shorter ones are mostly the ends of bars and the sides of
// small targets.
const minPiecePx = 64

// distortionFromEdges fits K1 to the long straight runs among the edge
// records (the plumb-line method, core/distortion), when there are enough.
func distortionFromEdges(img *Image, fr distortion.Frame) *Distortion {
	var pieces []distortion.Line
	for _, m := range img.Measurements {
		if m.Kind == "edge" && m.LengthPx >= minPiecePx {
			pieces = append(pieces, distortion.Line{X: m.XPx, Y: m.YPx, NormalDeg: m.NormalDeg})
		}
	}
	runs := distortion.Runs(pieces, fr)
	fit, err := distortion.FitLines(pieces, runs, fr)
	if err != nil {
		return &Distortion{Reason: noChartDistortion, ReasonCode: string(note.DistortionNoChart)}
	}
	r := distortion.Summarise(fit, nil, fr, img.PitchUM, false)
	cautions := append([]note.Note{note.New(note.DistortionFromEdges, fmt.Sprintf(
		"Measured from how %d long edges bend (%d pieces), not from the chart: only the first term of the curve, and only if those edges are straight in the scene.",
		fit.Runs, fit.N))}, r.Cautions...)
	out := &Distortion{
		Measured: true, Source: "edges", K1: r.K1, HalfDiagonalPx: fr.HalfDiagPx(),
		HeightMM: r.HeightMM, HeightFrac: r.HeightS, DisplacementPct: r.DisplacementPct,
		CornerPct: r.CornerPct, LongEdgePct: r.LongEdgePct,
		Kind: r.Kind, Text: r.Text, Code: r.Code, ResidualPx: r.RMSPx, Points: r.N, Lines: fit.Runs,
	}
	out.Cautions, out.CautionCodes = note.Split(cautions)
	return out
}

// chartPoints returns the located targets of the chart: squares whose four
// edges were measured (their centre from the four lines), the marks read,
// and the sine stars found.
func chartPoints(img *Image) []distortion.Point {
	cr := img.Chart
	code, err := chart.ParseCode(cr.Code)
	if err != nil {
		return nil
	}
	d, err := chart.NewDesign(code)
	if err != nil {
		return nil
	}
	type sq struct {
		sides [4]distortion.Line
		got   [4]bool
		x, y  float64
	}
	squares := map[string]*sq{}
	var order []string
	for _, m := range img.Measurements {
		if m.Kind != "edge" || m.TargetEdge < 1 || m.TargetEdge > 4 || m.ChartXY == nil {
			continue
		}
		s := squares[m.TargetID]
		if s == nil {
			s = &sq{x: m.ChartXY[0], y: m.ChartXY[1]}
			squares[m.TargetID] = s
			order = append(order, m.TargetID)
		}
		if !s.got[m.TargetEdge-1] {
			s.sides[m.TargetEdge-1] = distortion.Line{X: m.XPx, Y: m.YPx, NormalDeg: m.NormalDeg}
			s.got[m.TargetEdge-1] = true
		}
	}
	var pts []distortion.Point
	for _, id := range order {
		s := squares[id]
		if s.got != [4]bool{true, true, true, true} {
			continue
		}
		if x, y, ok := distortion.SquareCentre(s.sides); ok {
			pts = append(pts, distortion.Point{Kind: "square", ID: id, XPx: x, YPx: y, ChartX: s.x, ChartY: s.y})
		}
	}
	for _, m := range cr.Marks {
		for _, dm := range d.Marks {
			if dm.Index == m.Index {
				pts = append(pts, distortion.Point{Kind: "mark", ID: fmt.Sprintf("mark%d", m.Index), XPx: m.XPx, YPx: m.YPx, ChartX: dm.X, ChartY: dm.Y})
			}
		}
	}
	for _, pt := range cr.Patterns {
		if pt.Kind != "star" {
			continue
		}
		for _, st := range img.Stars {
			if st.ID != pt.ID {
				continue
			}
			for _, ds := range d.Stars {
				if ds.ID == pt.TargetID {
					pts = append(pts, distortion.Point{Kind: "star", ID: ds.ID, XPx: st.XPx, YPx: st.YPx, ChartX: ds.X, ChartY: ds.Y})
				}
			}
		}
	}
	return pts
}

// falloffOf fits the fall-off to the patches.
func falloffOf(ps []FalloffPatch, fr falloff.Frame, pitchUM float64) *Falloff {
	in := make([]falloff.Patch, len(ps))
	for i, p := range ps {
		in[i] = falloff.Patch{XPx: p.XPx, YPx: p.YPx, Level: p.Level}
	}
	out := &Falloff{Patches: make([]FalloffPatch, len(ps))}
	for i, p := range ps {
		out.Patches[i] = FalloffPatch{XPx: p.XPx, YPx: p.YPx, Level: p.Level, EV: Number(math.NaN())}
	}
	r, err := falloff.Measure(in, fr, pitchUM)
	if err != nil {
		out.Reason, out.ReasonCode = "not measured: too few patches of the chart's blank paper were inside the photo and unclipped", string(note.FalloffFewPatches)
		return out
	}
	R := math.Hypot(float64(fr.W), float64(fr.H)) / 2
	out.Measured = true
	out.HeightMM, out.HeightFrac, out.EV = r.HeightMM, r.HeightS, r.EV
	out.CornerEV, out.LongEdgeEV, out.ResidualEV, out.Points, out.UnevenEV = r.CornerEV, r.LongEdgeEV, r.ResidualEV, r.N, r.Uneven
	out.Map = &FalloffMap{Cols: r.Cols, Rows: r.Rows, CellWPx: r.CellW, CellHPx: r.CellH, EV: make([]Number, len(r.MapEV))}
	for i, v := range r.MapEV {
		out.Map.EV[i] = Number(v)
	}
	out.Cautions, out.CautionCodes = note.Split(r.Cautions)
	for i := range out.Patches {
		out.Patches[i].HeightFrac = r.PatchS[i]
		out.Patches[i].HeightMM = r.PatchS[i] * R * pitchUM / 1000
		out.Patches[i].EV = Number(r.PatchEV[i])
	}
	return out
}
