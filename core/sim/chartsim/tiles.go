package chartsim

import (
	"math"

	"sagitta/core/chart"
	"sagitta/core/sim/simcam"
)

// Hung is how one sheet of a chart across sheets (core/chart, tiling.go)
// was hung on the wall: turned TurnDeg (from +x towards +y) about its
// piece's centre and moved by DXMM, DYMM from where the design puts it,
// printed mm.
type Hung struct {
	DXMM, DYMM, TurnDeg float64
}

// Map returns the map from the design's chart units on sheet s to the
// wall's (the assembled chart's as designed), for a chart whose short
// side is shortMM printed mm: a rotation about the piece's centre and a
// shift.
func (g Hung) Map(s chart.Sheet, shortMM float64) chart.Homography {
	cx, cy := (s.X0+s.X1)/2, (s.Y0+s.Y1)/2
	sn, cs := math.Sincos(g.TurnDeg * math.Pi / 180)
	tx, ty := g.DXMM/shortMM, g.DYMM/shortMM
	return chart.Homography{
		cs, -sn, cx - cs*cx + sn*cy + tx,
		sn, cs, cy - sn*cx - cs*cy + ty,
		0, 0, 1,
	}
}

// TiledScene returns a chart across sheets, design d, seen through
// homography h (wall chart units to image px), each sheet hung as hung[s]
// says (Design.Sheets' order; missing entries are hung as designed): each
// sheet's targets, marks and frame corner marks pass through h times the
// sheet's Map. The paper between sheets hung apart is the paper's level.
func TiledScene(d *chart.Design, h chart.Homography, hung []Hung, shortMM float64, pr Print) simcam.Scene {
	var out simcam.Scene
	for si, s := range d.Sheets {
		var g Hung
		if si < len(hung) {
			g = hung[si]
		}
		sub := *d
		sub.Squares, sub.Stars, sub.Gratings, sub.Marks, sub.Wedge = nil, nil, nil, nil, chart.Wedge{}
		on := func(x, y float64) bool { return d.SheetAt(x, y) == si }
		for _, q := range d.Squares {
			if on(q.X, q.Y) {
				sub.Squares = append(sub.Squares, q)
			}
		}
		for _, st := range d.Stars {
			if on(st.X, st.Y) {
				sub.Stars = append(sub.Stars, st)
			}
		}
		for _, gr := range d.Gratings {
			if on(gr.X, gr.Y) {
				sub.Gratings = append(sub.Gratings, gr)
			}
		}
		for _, m := range d.Marks {
			if m.Sheet == si {
				sub.Marks = append(sub.Marks, m)
			}
		}
		if on(d.Wedge.X, d.Wedge.Y) {
			sub.Wedge = d.Wedge
		}
		sc := scene(&sub, h.Mul(g.Map(s, shortMM)), pr, on)
		out.Background = sc.Background
		out.Polygons = append(out.Polygons, sc.Polygons...)
		out.Stars = append(out.Stars, sc.Stars...)
		out.Gratings = append(out.Gratings, sc.Gratings...)
	}
	return out
}
