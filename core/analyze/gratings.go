package analyze

import (
	"fmt"
	"math"
	"sort"

	"sagitta/core/chart"
	"sagitta/core/curve"
	"sagitta/core/field"
	"sagitta/core/sine"
)

// Sine gratings in the image JSON (GratingInfo, measured once) and in its
// records (one per set of gratings, made again by every summarise).

// gratingInfos describes every measured grating, measured against the
// sheet's reference (the grating of lowest frequency in the photo); the
// image height and orientation are set by gratingRecords.
func gratingInfos(gs []*sine.Grating) []GratingInfo {
	out := []GratingInfo{}
	if len(gs) == 0 {
		return out
	}
	ref := 0
	for i, g := range gs {
		if g.FreqCyPx < gs[ref].FreqCyPx {
			ref = i
		}
	}
	weakRef := gs[ref].FreqCyPx > maxRefFreqCyPx
	for i, g := range gs {
		info := GratingInfo{ID: i + 1, XPx: g.X, YPx: g.Y,
			Corners: g.Corners, FreqCyPx: g.FreqCyPx, DirectionDeg: g.DirectionDeg,
			Modulation: g.Modulation, ModStdErr: g.ModStdErr, MTF: Number(math.NaN()), Reference: i == ref, Flags: []string{}}
		if i != ref && gs[ref].Modulation > 0 {
			info.MTF = Number(g.Modulation / gs[ref].Modulation)
		}
		for _, f := range g.Flags {
			info.Flags = append(info.Flags, string(f))
		}
		if weakRef {
			info.Flags = append(info.Flags, string(sine.FlagWeakReference))
		}
		out = append(out, info)
	}
	return out
}

// gratingRecords sets the image height and orientation of every grating in
// img.Gratings and returns one record per set of gratings. On a recognised
// chart a set is the design's: the gratings modulated in one direction of
// the chart (one orientation), measured against that direction's
// low-frequency reference (the set's grating of fewest cycles per chart
// unit), and a set ends at the print's limit (printlimit.go). Elsewhere a
// set is gratings of one orientation and direction (within 10 degrees)
// lying close together (centres within 1.5 times the sum of their
// half-diagonals), against the photo's reference (the grating of lowest
// frequency). The reference is left out of its set's record. Sets depend on
// the orientations, so on the optical centre. Values are modulation ratios
// to the reference, computed from the modulations (full precision) rather
// than from GratingInfo.MTF.
func gratingRecords(img *Image, geo field.Geometry) []Measurement {
	gs := img.Gratings
	ref := -1
	for i, g := range gs {
		img.Gratings[i].HeightMM = geo.HeightMM(g.XPx, g.YPx)
		img.Gratings[i].Orientation, _ = geo.Classify(g.XPx, g.YPx, g.DirectionDeg)
		if g.Reference && (ref < 0 || g.FreqCyPx < gs[ref].FreqCyPx) {
			ref = i
		}
	}
	if ref < 0 {
		return nil
	}
	type group struct {
		members []int
		ref     int
		limit   float64 // cy/px; +Inf when the print is unknown
	}
	var groups []*group
	// The design's sets on a recognised chart.
	inDesign := make([]bool, len(gs))
	if pose := storedPose(img); pose != nil {
		byID := map[string]chart.Grating{}
		for _, g := range pose.Design.Gratings {
			byID[g.ID] = g
		}
		byDir := map[float64]*group{}
		var dirs []float64
		cycles := map[int]float64{}
		for i, g := range gs {
			hit := pose.Locate(g.XPx, g.YPx)
			dg, ok := byID[hit.ID]
			if hit.Kind != chart.HitGrating || !ok {
				continue
			}
			inDesign[i] = true
			cycles[i] = dg.FreqPerUnit
			gr := byDir[dg.DirDeg]
			if gr == nil {
				gr = &group{ref: -1, limit: math.Inf(1)}
				byDir[dg.DirDeg] = gr
				dirs = append(dirs, dg.DirDeg)
			}
			gr.members = append(gr.members, i)
			if gr.ref < 0 || dg.FreqPerUnit < cycles[gr.ref] {
				gr.ref = i
			}
		}
		sort.Float64s(dirs)
		for _, d := range dirs {
			gr := byDir[d]
			var x, y float64
			for _, i := range gr.members {
				x += gs[i].XPx / float64(len(gr.members))
				y += gs[i].YPx / float64(len(gr.members))
			}
			if dpp := dotsPerPx(pose, img.Chart.Print, x, y); dpp > 0 {
				gr.limit = dpp / chart.PrintLimitDots
			}
			groups = append(groups, gr)
		}
	}
	// Sets by single linkage for the other gratings.
	half := func(g GratingInfo) float64 {
		q := g.Corners
		return 0.5 * math.Hypot(q[2][0]-q[0][0], q[2][1]-q[0][1])
	}
	set := make([]int, len(gs))
	for i := range set {
		set[i] = i
	}
	var root func(int) int
	root = func(i int) int {
		for set[i] != i {
			i = set[i]
		}
		return i
	}
	for i := range gs {
		for j := i + 1; j < len(gs); j++ {
			a, b := gs[i], gs[j]
			if inDesign[i] || inDesign[j] || a.Orientation != b.Orientation || axisDiff(a.DirectionDeg, b.DirectionDeg) > 10 {
				continue
			}
			if math.Hypot(a.XPx-b.XPx, a.YPx-b.YPx) <= 1.5*(half(a)+half(b)) {
				set[root(j)] = root(i)
			}
		}
	}
	byRoot := map[int]*group{}
	for i := range gs {
		if inDesign[i] {
			continue
		}
		r := root(i)
		gr := byRoot[r]
		if gr == nil {
			gr = &group{ref: ref, limit: math.Inf(1)}
			byRoot[r] = gr
			groups = append(groups, gr)
		}
		gr.members = append(gr.members, i)
	}
	var out []Measurement
	for _, gr := range groups {
		rm := gs[gr.ref].Modulation
		var members []int
		cut := false
		for _, i := range gr.members {
			if inDesign[i] {
				// The design's reference and its set's values.
				img.Gratings[i].Reference = i == gr.ref
				img.Gratings[i].MTF = Number(math.NaN())
				if i != gr.ref && rm > 0 {
					img.Gratings[i].MTF = Number(gs[i].Modulation / rm)
				}
			}
			if i == gr.ref {
				continue
			}
			if gs[i].FreqCyPx > gr.limit {
				cut = true
				continue
			}
			members = append(members, i)
		}
		if len(members) == 0 {
			continue
		}
		sort.Slice(members, func(a, b int) bool { return gs[members[a]].FreqCyPx < gs[members[b]].FreqCyPx })
		c := curve.Curve{Freq: []float64{0}, Value: []float64{1}}
		se := []float64{0}
		var x, y, dir float64
		flags := map[string]bool{}
		for _, i := range members {
			g := gs[i]
			c.Freq = append(c.Freq, g.FreqCyPx)
			c.Value = append(c.Value, g.Modulation/rm)
			se = append(se, g.ModStdErr/rm)
			x += g.XPx / float64(len(members))
			y += g.YPx / float64(len(members))
			dir = g.DirectionDeg
			for _, f := range g.Flags {
				flags[f] = true
			}
		}
		rec := patternRecord("grating", x, y, dir, c, c.Freq[1], c.Freq[len(c.Freq)-1])
		rec.PatternID = gs[members[0]].ID
		rec.StdErr = se
		for _, f := range sortedKeys(flags) {
			rec.Flags = append(rec.Flags, f)
			rec.Warnings = append(rec.Warnings, sineFlagText[sine.Flag(f)])
		}
		if cut {
			rec.Flags = append(rec.Flags, FlagPrintLimit)
			rec.Warnings = append(rec.Warnings, fmt.Sprintf("gratings finer than %.2f cy/px are left out: the print holds no finer detail there", gr.limit))
		}
		rec.Region = gs[members[0]].Corners
		out = append(out, rec)
	}
	return out
}

// maxRefFreqCyPx is the highest frequency at which a reference grating's
// own MTF is taken as 1 without a warning.
const maxRefFreqCyPx = 0.05
