package analyze

import (
	"math"
	"sort"

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
// img.Gratings and returns one record per set of gratings: gratings of one
// orientation and direction (within 10 degrees) lying close together
// (centres within 1.5 times the sum of their half-diagonals), the
// reference left out. Sets depend on the orientations, so on the optical
// centre. Values are modulation ratios to the reference, computed from the
// modulations (full precision) rather than from GratingInfo.MTF.
func gratingRecords(img *Image, geo field.Geometry) []Measurement {
	gs := img.Gratings
	ref := -1
	for i, g := range gs {
		img.Gratings[i].HeightMM = geo.HeightMM(g.XPx, g.YPx)
		img.Gratings[i].Orientation, _ = geo.Classify(g.XPx, g.YPx, g.DirectionDeg)
		if g.Reference {
			ref = i
		}
	}
	if ref < 0 {
		return nil
	}
	half := func(g GratingInfo) float64 {
		q := g.Corners
		return 0.5 * math.Hypot(q[2][0]-q[0][0], q[2][1]-q[0][1])
	}
	// Sets by single linkage.
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
			if a.Orientation != b.Orientation || axisDiff(a.DirectionDeg, b.DirectionDeg) > 10 {
				continue
			}
			if math.Hypot(a.XPx-b.XPx, a.YPx-b.YPx) <= 1.5*(half(a)+half(b)) {
				set[root(j)] = root(i)
			}
		}
	}
	groups := map[int][]int{}
	var order []int
	for i := range gs {
		if i == ref {
			continue
		}
		r := root(i)
		if _, ok := groups[r]; !ok {
			order = append(order, r)
		}
		groups[r] = append(groups[r], i)
	}
	var out []Measurement
	for _, r := range order {
		members := groups[r]
		sort.Slice(members, func(a, b int) bool { return gs[members[a]].FreqCyPx < gs[members[b]].FreqCyPx })
		c := curve.Curve{Freq: []float64{0}, Value: []float64{1}}
		se := []float64{0}
		var x, y, dir float64
		flags := map[string]bool{}
		for _, i := range members {
			g := gs[i]
			c.Freq = append(c.Freq, g.FreqCyPx)
			c.Value = append(c.Value, g.Modulation/gs[ref].Modulation)
			se = append(se, g.ModStdErr/gs[ref].Modulation)
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
		rec.Region = gs[members[0]].Corners
		out = append(out, rec)
	}
	return out
}

// maxRefFreqCyPx is the highest frequency at which a reference grating's
// own MTF is taken as 1 without a warning.
const maxRefFreqCyPx = 0.05
