package field

import (
	"math"

	"sagitta/core/internal/rank"
)

// MapCells is the number of map cells along the photo's longer side; the
// shorter side gets round(MapCells * short / long) cells (16 for 3:2).
const MapCells = 24

// Map is MTF50 over the frame, interpolated on a grid of cells from the
// measurement positions, for each orientation and for their mean.
//
// Interpolation is the modified Shepard method (D. Shepard, "A
// two-dimensional interpolation function for irregularly-spaced data",
// Proc. 23rd ACM National Conference (1968) 517-524,
// https://doi.org/10.1145/800186.810616; local weights after R. Franke and
// G. Nielson, "Smooth interpolation of large sets of scattered data",
// Int. J. Numer. Methods Eng. 15 (1980) 1691-1704):
//
//	value(x) = sum_i w_i v_i / sum_i w_i,  w_i = ((R - d_i)+ / (R d_i))^2,
//
// d_i the distance from x to measurement i and R = RadiusPx. It passes
// exactly through every measurement (w_i grows without bound as d_i -> 0)
// and uses only measurements within R. Sagittal and tangential
// measurements are interpolated separately (mixed ones join both), because
// near the corners the two orientations can differ by a factor of two and
// one blended interpolant would be a patchwork of whichever lies nearest;
// MTF50LPMM is the mean of the two. A cell whose centre is farther than
// MaskDistancePx from every measurement (of that orientation) is masked
// (null): the map does not invent values where nothing was measured.
type Map struct {
	// Cols and Rows are the grid size; cell (c, r) covers x in
	// [c*CellWPx, (c+1)*CellWPx) and y in [r*CellHPx, (r+1)*CellHPx), px,
	// and its value is taken at its centre.
	Cols    int
	Rows    int
	CellWPx float64
	CellHPx float64
	// MTF50LPMM holds the cells' MTF50 in lp/mm, the mean of the sagittal
	// and tangential values (or the one that exists), row by row from the
	// top left (index r*Cols + c); null marks a masked cell.
	MTF50LPMM []Number
	// SagittalLPMM and TangentialLPMM are the same for each orientation.
	SagittalLPMM   []Number
	TangentialLPMM []Number
	// Min and Max are the smallest and largest value of MTF50LPMM, lp/mm:
	// the ends of its colour scale.
	Min float64
	Max float64
	// Points is the number of measurements behind the map.
	Points int
	// MaskDistancePx is the distance from the nearest measurement beyond
	// which a cell is masked, px; RadiusPx the reach of each measurement.
	MaskDistancePx float64
	RadiusPx       float64
	// Method names the interpolation.
	Method string
}

// mapSite is one measurement on the map.
type mapSite struct{ x, y, v float64 }

// mtf50Map interpolates the MTF50 (lp/mm) of pts over the frame, or returns
// nil when no point has an MTF50.
func mtf50Map(geo Geometry, pts []Point) *Map {
	var all, sag, tan []mapSite
	mm := geo.PitchUM / 1000
	for _, p := range pts {
		if !finite(p.MTF50) {
			continue
		}
		st := mapSite{p.X, p.Y, p.MTF50 / mm}
		all = append(all, st)
		if p.Orientation != Tangential {
			sag = append(sag, st)
		}
		if p.Orientation != Sagittal {
			tan = append(tan, st)
		}
	}
	if len(all) == 0 {
		return nil
	}
	m := &Map{Method: "modified Shepard inverse-distance interpolation (Shepard 1968; Franke and Nielson 1980), per orientation", Points: len(all)}
	long, short := geo.Width, geo.Height
	if short > long {
		long, short = short, long
	}
	a, b := MapCells, max(1, int(math.Round(float64(MapCells)*float64(short)/float64(long))))
	if geo.Width >= geo.Height {
		m.Cols, m.Rows = a, b
	} else {
		m.Cols, m.Rows = b, a
	}
	m.CellWPx = float64(geo.Width) / float64(m.Cols)
	m.CellHPx = float64(geo.Height) / float64(m.Rows)
	m.MaskDistancePx = math.Max(siteSpacing(all), math.Hypot(m.CellWPx, m.CellHPx))
	m.RadiusPx = 2 * m.MaskDistancePx
	m.Min, m.Max = math.Inf(1), math.Inf(-1)
	n := m.Cols * m.Rows
	m.MTF50LPMM, m.SagittalLPMM, m.TangentialLPMM = make([]Number, n), make([]Number, n), make([]Number, n)
	at := func(sites []mapSite, x, y float64) float64 {
		if len(sites) == 0 || nearest(sites, x, y) > m.MaskDistancePx {
			return math.NaN()
		}
		return shepard(sites, x, y, m.RadiusPx)
	}
	for r := 0; r < m.Rows; r++ {
		for c := 0; c < m.Cols; c++ {
			x, y := (float64(c)+0.5)*m.CellWPx, (float64(r)+0.5)*m.CellHPx
			vs, vt := at(sag, x, y), at(tan, x, y)
			v := (vs + vt) / 2
			switch {
			case math.IsNaN(vs):
				v = vt
			case math.IsNaN(vt):
				v = vs
			}
			i := r*m.Cols + c
			m.MTF50LPMM[i], m.SagittalLPMM[i], m.TangentialLPMM[i] = Number(v), Number(vs), Number(vt)
			if !math.IsNaN(v) {
				m.Min, m.Max = math.Min(m.Min, v), math.Max(m.Max, v)
			}
		}
	}
	if math.IsInf(m.Min, 0) { // every cell masked: use the points' range
		for _, s := range all {
			m.Min, m.Max = math.Min(m.Min, s.v), math.Max(m.Max, s.v)
		}
	}
	return m
}

// shepard returns the modified Shepard interpolant of sites at (x, y) with
// radius R, px; NaN when no site lies within R. At a site (distance 0) it
// returns that site's value (the mean, if several sites coincide).
func shepard(sites []mapSite, x, y, R float64) float64 {
	var sw, swv, n0, v0 float64
	for _, s := range sites {
		d := math.Hypot(s.x-x, s.y-y)
		if d == 0 {
			n0++
			v0 += s.v
			continue
		}
		if d >= R {
			continue
		}
		w := (R - d) / (R * d)
		w *= w
		sw += w
		swv += w * s.v
	}
	switch {
	case n0 > 0:
		return v0 / n0
	case sw > 0:
		return swv / sw
	}
	return math.NaN()
}

// nearest returns the distance from (x, y) to the nearest site, px.
func nearest(sites []mapSite, x, y float64) float64 {
	d := math.Inf(1)
	for _, s := range sites {
		d = math.Min(d, math.Hypot(s.x-x, s.y-y))
	}
	return d
}

// siteSpacing is the typical distance between measurements: the median over
// sites of the distance to the 5th nearest other site (fewer when there are
// fewer sites). The 5th rather than the 1st, because the four sides of one
// square are measured close together; the 5th neighbour lies on the next
// target, so the spacing reflects how densely the frame is covered.
func siteSpacing(sites []mapSite) float64 {
	k := min(5, len(sites)-1)
	if k < 1 {
		return 0
	}
	d := make([]float64, len(sites)-1)
	kth := make([]float64, len(sites))
	for i, s := range sites {
		d = d[:0]
		for j, t := range sites {
			if j != i {
				dx, dy := s.x-t.x, s.y-t.y
				d = append(d, dx*dx+dy*dy)
			}
		}
		kth[i] = math.Sqrt(rank.Select(d, k-1))
	}
	return median(kth)
}
