package plot

import (
	"fmt"
	"math"

	"sagitta/core/analyze"
)

// Colour fringes (lateral chromatic aberration, analyze.LateralCA): the
// displacement of red and of blue from green along the radius against the
// distance from the optical centre. One small panel per pair on the same
// axes (red - green, blue - green), in ink like every single-quantity plot:
// the used edges as the edge marker, the smooth curve through them with its
// ±2 standard-error band, the zero line and the verdict's thresholds as
// dashed reference lines, and the largest value marked with the
// ReadingMarker. Compare gives one colour per photo.

// caPairs names the two pairs, in panel order.
var caPairs = []struct{ key, title string }{
	{"R-G", "red - green"},
	{"B-G", "blue - green"},
}

// caAxisTitle is the y axis of the colour fringes plots.
const caAxisTitle = "displacement along the radius (px)"

// caTop returns the y range's half height: the largest displacement or
// band, at least the strong threshold, rounded up to 0.5 px.
func caTop(vals ...float64) float64 {
	top := 0.0
	for _, v := range vals {
		if !math.IsNaN(v) {
			top = math.Max(top, math.Abs(v))
		}
	}
	top = math.Max(top*1.1, 1.6)
	return math.Ceil(top*2) / 2
}

// caPanels returns the two pair panels on the same axes.
func caPanels(cornerMM, top float64, thresholds []float64) []*Panel {
	var out []*Panel
	for _, p := range caPairs {
		pn := &Panel{
			Title: p.title,
			X:     Axis{Title: HeightAxisTitle, Min: 0, Max: math.Max(cornerMM, 1)},
			Y:     Axis{Title: caAxisTitle, Min: -top, Max: top},
			Refs:  []RefLine{{At: 0, Colour: ReferenceColour, Width: 1}},
		}
		for _, t := range thresholds {
			for _, s := range []float64{-1, 1} {
				pn.Refs = append(pn.Refs, RefLine{At: s * t, Colour: ReferenceColour, Width: 1, Dash: []float64{4, 3}})
			}
		}
		out = append(out, pn)
	}
	return out
}

// pairValue returns a point's displacement of the pair and whether the
// pair's fit left it out.
func pairValue(p analyze.CAPoint, pair string) (float64, bool) {
	if pair == "R-G" {
		return p.RMinusGPx, p.OutlierRG
	}
	return p.BMinusGPx, p.OutlierBG
}

// LateralCA plots one photo's colour fringes; cornerMM is the height of
// the frame's farthest corner (the x axis runs to it). A result without
// curves (too few edges) draws its points alone.
func LateralCA(ca *analyze.LateralCA, cornerMM float64, opt FieldOptions) *Figure {
	f := &Figure{Title: titled("Colour fringes (red and blue against green)", opt.Label)}
	f.Data = Table{
		Caption: "Displacement of red and blue from green along the radius, against the distance from the optical centre",
		Columns: []string{"Pair", "Record", HeightColumn, "Displacement (px)", "Standard error (px)", "Curve or edge"},
	}
	var vals []float64
	for _, p := range ca.Points {
		vals = append(vals, p.RMinusGPx, p.BMinusGPx)
	}
	for _, c := range ca.Curves {
		for i := range c.Px {
			vals = append(vals, c.Px[i]+2*c.SEPx[i], c.Px[i]-2*c.SEPx[i])
		}
	}
	panels := caPanels(cornerMM, caTop(vals...), ca.Thresholds)
	f.Panels = panels
	outliers := false
	for k, pair := range caPairs {
		pn := panels[k]
		var xs, ys, ox, oy []float64
		for _, p := range ca.Points {
			v, out := pairValue(p, pair.key)
			se := p.RMinusGSE
			if pair.key == "B-G" {
				se = p.BMinusGSE
			}
			what := "edge"
			if out {
				ox, oy = append(ox, p.HeightMM), append(oy, v)
				what = "edge, left out of the curve"
				outliers = true
			} else {
				xs, ys = append(xs, p.HeightMM), append(ys, v)
			}
			f.Data.Rows = append(f.Data.Rows, []string{pair.key, fmt.Sprint(p.ID), cell(p.HeightMM, 3), cell(v, 4), cell(se, 4), what})
		}
		pn.Series = append(pn.Series, Series{Name: pair.title + ": edges", X: xs, Y: ys, Colour: InkColour, Marker: EdgeMarker, MarkerSize: 2.5})
		if len(ox) > 0 {
			pn.Series = append(pn.Series, Series{Name: pair.title + ": edges left out", X: ox, Y: oy, Colour: InkColour, Marker: EdgeMarker, MarkerSize: 2.5, Open: true})
		}
		for _, c := range ca.Curves {
			if c.Pair != pair.key {
				continue
			}
			lo, hi := make([]float64, len(c.Px)), make([]float64, len(c.Px))
			for i := range c.Px {
				lo[i], hi[i] = c.Px[i]-2*c.SEPx[i], c.Px[i]+2*c.SEPx[i]
				f.Data.Rows = append(f.Data.Rows, []string{pair.key, "", cell(c.HeightMM[i], 3), cell(c.Px[i], 4), cell(c.SEPx[i], 4), "curve"})
			}
			if opt.Band {
				pn.Bands = append(pn.Bands, Band{Name: pair.title + ", uncertainty band", X: c.HeightMM, Lo: lo, Hi: hi, Colour: translucent(InkColour, bandAlpha/2)})
			}
			pn.Series = append(pn.Series, Series{Name: pair.title + ": curve", X: c.HeightMM, Y: c.Px, Colour: InkColour, Width: LineWidth})
			pn.Marks = append(pn.Marks, Mark{X: c.MaxAtMM, Y: c.MaxPx, Marker: ReadingMarker, Size: 4, Colour: InkColour, Label: fmt.Sprintf("%+.2f px", c.MaxPx)})
		}
	}
	f.Legend = []LegendEntry{
		{Label: "Edges (normal along the radius)", Colour: InkColour, Marker: EdgeMarker},
	}
	if outliers {
		f.Legend = append(f.Legend, LegendEntry{Label: "Edges left out of the curve", Colour: InkColour, Marker: EdgeMarker, Open: true})
	}
	f.Legend = append(f.Legend,
		LegendEntry{Label: "Smooth curve", Colour: InkColour, Width: LineWidth},
		LegendEntry{Label: "Largest value", Colour: InkColour, Marker: ReadingMarker})
	if opt.Band {
		f.Legend = append(f.Legend, LegendEntry{Label: "curve ± 2 standard errors", Colour: translucent(InkColour, bandAlpha), Swatch: true})
	}
	f.Legend = append(f.Legend, LegendEntry{Label: "Verdict thresholds", Colour: ReferenceColour, Width: 1, Dash: []float64{4, 3}})
	f.Notes = []string{
		fmt.Sprintf("Above zero the colour lies farther from the optical centre than green. Dashed: %s px (barely visible below, strong above).", caThresholdWords(ca.Thresholds)),
	}
	f.Description = fmt.Sprintf("Displacement of red and of blue from green along the radius, in px, against the distance from the optical centre, 0 to %s mm, one panel per pair", cell(cornerMM, 2))
	return f
}

// caThresholdWords lists the thresholds, "0.5 and 1.5".
func caThresholdWords(t []float64) string {
	switch len(t) {
	case 0:
		return "none"
	case 1:
		return fnum(t[0])
	}
	return fnum(t[0]) + " and " + fnum(t[1])
}

// CAPhoto is one photo's colour fringes for CompareCA.
type CAPhoto struct {
	Label     string
	LateralCA *analyze.LateralCA // nil: the photo draws nothing but keeps its colour
	CornerMM  float64
}

// CompareCA overlays the colour fringe curves of several photos, one
// colour per photo (PhotoColours, in order), in the two pair panels.
func CompareCA(photos []CAPhoto, opt CompareOptions) *Figure {
	f := &Figure{Title: "Colour fringes compared"}
	f.Data = Table{
		Caption: "Colour fringes of several photos: smooth-curve samples",
		Columns: []string{"Photo", "Pair", HeightColumn, "Displacement (px)", "Standard error (px)"},
	}
	corner := 1.0
	var vals []float64
	var thresholds []float64
	for _, ph := range photos {
		corner = math.Max(corner, ph.CornerMM)
		if ph.LateralCA == nil {
			continue
		}
		thresholds = ph.LateralCA.Thresholds
		for _, c := range ph.LateralCA.Curves {
			for i := range c.Px {
				vals = append(vals, c.Px[i]+2*c.SEPx[i], c.Px[i]-2*c.SEPx[i])
			}
		}
	}
	panels := caPanels(corner, caTop(vals...), thresholds)
	f.Panels = panels
	f.Legend = append(f.Legend, LegendEntry{Label: "Photos", Heading: true})
	for n, ph := range photos {
		col := PhotoColours[n%len(PhotoColours)]
		f.Legend = append(f.Legend, LegendEntry{Label: ph.Label, Colour: col, Width: LineWidth})
		if ph.LateralCA == nil {
			continue
		}
		for k, pair := range caPairs {
			for _, c := range ph.LateralCA.Curves {
				if c.Pair != pair.key {
					continue
				}
				name := ph.Label + ": " + pair.title
				if opt.Band {
					lo, hi := make([]float64, len(c.Px)), make([]float64, len(c.Px))
					for i := range c.Px {
						lo[i], hi[i] = c.Px[i]-2*c.SEPx[i], c.Px[i]+2*c.SEPx[i]
					}
					panels[k].Bands = append(panels[k].Bands, Band{Name: name + ", uncertainty band", X: c.HeightMM, Lo: lo, Hi: hi, Colour: translucent(col, bandAlpha/2)})
				}
				panels[k].Series = append(panels[k].Series, Series{Name: name, X: c.HeightMM, Y: c.Px, Colour: col, Width: LineWidth})
				for i := range c.Px {
					f.Data.Rows = append(f.Data.Rows, []string{ph.Label, pair.key, cell(c.HeightMM[i], 3), cell(c.Px[i], 4), cell(c.SEPx[i], 4)})
				}
			}
		}
	}
	if opt.Band {
		f.Legend = append(f.Legend, LegendEntry{Label: "curve ± 2 standard errors", Colour: translucent(InkColour, bandAlpha), Swatch: true})
	}
	f.Legend = append(f.Legend, LegendEntry{Label: "Verdict thresholds", Colour: ReferenceColour, Width: 1, Dash: []float64{4, 3}})
	f.Notes = []string{"One panel per pair, same axes, out to the largest frame corner; above zero the colour lies farther out than green. Curves are drawn only where measured."}
	f.Description = fmt.Sprintf("Colour fringe curves of %d photos against the distance from the optical centre, one panel per pair, one colour per photo", len(photos))
	return f
}
