package plot

import (
	"fmt"
	"math"

	"sagitta/core/analyze"
)

// DisplacementAxisTitle and FalloffAxisTitle are the y axes of the
// distortion and fall-off plots (glossary.txt).
const (
	DisplacementAxisTitle = "Radial displacement (%)"
	FalloffAxisTitle      = "Light fall-off (EV)"
)

// Distortion plots the radial displacement (per cent of the distance the
// point should have from the optical centre) against the distance from the
// optical centre: the fitted curve, each located chart target's own
// displacement by its marker (squares and marks open circles, stars
// triangles; targets the fit dropped in grey), the zero line, and the
// values at the frame's corner and the long side's end as readings.
func Distortion(d *analyze.Distortion, label string) *Figure {
	f := &Figure{Title: titled("Distortion", label)}
	f.Data = Table{
		Caption: "Radial displacement against the distance from the optical centre: the fitted curve, then each chart target",
		Columns: []string{"Row", HeightColumn, "Radial displacement (%)", "Residual (px)", "Used"},
	}
	pn := &Panel{
		X:    Axis{Title: HeightAxisTitle, Min: 0, Max: 1},
		Y:    Axis{Title: DisplacementAxisTitle},
		Refs: []RefLine{{At: 0, Colour: ReferenceColour, Width: 1}},
	}
	f.Panels = []*Panel{pn}
	if d == nil || !d.Measured {
		reason := "not measured"
		if d != nil && d.Reason != "" {
			reason = d.Reason
		}
		pn.Y.Min, pn.Y.Max = -1, 1
		f.Notes = []string{"Distortion " + reason + "."}
		f.Description = "Distortion " + reason
		return f
	}
	n := len(d.HeightMM)
	pn.X.Max = math.Max(d.HeightMM[n-1], 1e-3)
	lo, hi := 0.0, 0.0
	for i, h := range d.HeightMM {
		v := d.DisplacementPct[i]
		lo, hi = math.Min(lo, v), math.Max(hi, v)
		f.Data.Rows = append(f.Data.Rows, []string{"curve", cell(h, 3), cell(v, 4), "", ""})
	}
	var sx, sy, tx, ty, gx, gy []float64
	for _, t := range d.Targets {
		v := float64(t.DisplacementPct)
		used := "yes"
		if !t.Used {
			used = "no"
		}
		f.Data.Rows = append(f.Data.Rows, []string{t.Kind + " " + t.TargetID, cell(t.HeightMM, 3), cell(v, 4), cell(t.ResidualPx, 3), used})
		if math.IsNaN(v) {
			continue
		}
		lo, hi = math.Min(lo, v), math.Max(hi, v)
		switch {
		case !t.Used:
			gx, gy = append(gx, t.HeightMM), append(gy, v)
		case t.Kind == "star":
			tx, ty = append(tx, t.HeightMM), append(ty, v)
		default:
			sx, sy = append(sx, t.HeightMM), append(sy, v)
		}
	}
	pn.Y.Min, pn.Y.Max = axisAround(lo, hi)
	pn.Series = append(pn.Series, Series{Name: "Fitted curve", X: d.HeightMM, Y: d.DisplacementPct, Colour: InkColour, Width: LineWidth})
	f.Legend = []LegendEntry{{Label: "Fitted curve", Colour: InkColour, Width: LineWidth}}
	if len(sx) > 0 {
		pn.Series = append(pn.Series, Series{Name: "Squares and marks", X: sx, Y: sy, Colour: InkColour, Marker: EdgeMarker, MarkerSize: 2.4, Open: true})
		f.Legend = append(f.Legend, LegendEntry{Label: "Square or mark", Colour: InkColour, Marker: EdgeMarker, Open: true})
	}
	if len(tx) > 0 {
		pn.Series = append(pn.Series, Series{Name: "Stars", X: tx, Y: ty, Colour: InkColour, Marker: StarMarker, MarkerSize: 2.8, Open: true})
		f.Legend = append(f.Legend, LegendEntry{Label: "Star", Colour: InkColour, Marker: StarMarker, Open: true})
	}
	if len(gx) > 0 {
		pn.Series = append(pn.Series, Series{Name: "Left out of the fit", X: gx, Y: gy, Colour: MixedColour, Marker: Cross, MarkerSize: 3})
		f.Legend = append(f.Legend, LegendEntry{Label: "Left out of the fit", Colour: MixedColour, Marker: Cross})
	}
	pn.Marks = append(pn.Marks, Mark{X: d.HeightMM[n-1], Y: d.CornerPct, Marker: ReadingMarker, Size: 4, Colour: InkColour,
		Label: fmt.Sprintf("corner %+.2f %%", d.CornerPct)})
	f.Legend = append(f.Legend, LegendEntry{Label: "Value at the corner", Colour: InkColour, Marker: ReadingMarker})
	f.Notes = []string{
		fmt.Sprintf("Negative: barrel (lines bow outwards); positive: pincushion. %d targets, %.2f px rms about the curve.", d.Points, d.ResidualPx),
		"Each target's own value is unreliable near the centre and left out there.",
	}
	f.Description = fmt.Sprintf("Radial displacement against the distance from the optical centre, 0 to %s mm: %s, %+.2f %% at the corner",
		cell(d.HeightMM[n-1], 2), d.Kind, d.CornerPct)
	return f
}

// Falloff plots the light fall-off in two panels: the map over the frame
// (each cell the median of its paper patches, on the sequential scale from
// the darkest cell to the centre's level, grey where no patch lay; the
// patches and the optical centre marked) and the curve against the
// distance from the optical centre with every patch.
func Falloff(img *analyze.Image, label string) *Figure {
	f := &Figure{Title: titled("Light fall-off", label), LegendBelow: true}
	fo := img.Falloff
	f.Data = Table{
		Caption: "Light fall-off: the curve against the distance from the optical centre, the map's cells, then each patch of paper",
		Columns: []string{"Row", HeightColumn, "x (mm)", "y (mm)", "Light fall-off (EV)"},
	}
	mm := img.PitchUM / 1000
	wmm, hmm := float64(img.Width)*mm, float64(img.Height)*mm
	curve := &Panel{
		Title: "Against the distance from the optical centre",
		X:     Axis{Title: HeightAxisTitle, Min: 0, Max: math.Max(img.CornerMM, 1e-3)},
		Y:     Axis{Title: FalloffAxisTitle},
		Refs:  []RefLine{{At: 0, Colour: ReferenceColour, Width: 1}},
	}
	frame := &Panel{
		Title:       "Over the frame",
		X:           Axis{Title: "Across the sensor (mm)", Min: 0, Max: math.Max(wmm, 1e-3)},
		Y:           Axis{Title: "Down the sensor (mm)", Min: 0, Max: math.Max(hmm, 1e-3), Reverse: true},
		EqualAspect: true,
	}
	f.Panels = []*Panel{frame, curve}
	f.Height = 420
	if fo == nil || !fo.Measured {
		reason := "not measured"
		if fo != nil && fo.Reason != "" {
			reason = fo.Reason
		}
		curve.Y.Min, curve.Y.Max = -1, 0.2
		f.Notes = []string{"Light fall-off " + reason + "."}
		f.Description = "Light fall-off " + reason
		return f
	}
	low := 0.0
	for i, h := range fo.HeightMM {
		low = math.Min(low, fo.EV[i])
		f.Data.Rows = append(f.Data.Rows, []string{"curve", cell(h, 3), "", "", cell(fo.EV[i], 3)})
	}
	var px, py, ph, pe []float64
	for _, p := range fo.Patches {
		v := float64(p.EV)
		f.Data.Rows = append(f.Data.Rows, []string{"patch", cell(p.HeightMM, 3), cell(p.XPx*mm, 2), cell(p.YPx*mm, 2), cell(v, 3)})
		if math.IsNaN(v) {
			continue
		}
		low = math.Min(low, v)
		px, py = append(px, p.XPx*mm), append(py, p.YPx*mm)
		ph, pe = append(ph, p.HeightMM), append(pe, v)
	}
	if m := fo.Map; m != nil {
		vals := floats(m.EV)
		mapLow := 0.0
		for _, v := range vals {
			if !math.IsNaN(v) {
				mapLow = math.Min(mapLow, v)
			}
		}
		if mapLow > -0.1 {
			mapLow = -0.1
		}
		frame.Heat = &HeatMap{X0: 0, X1: wmm, Y0: 0, Y1: hmm, Cols: m.Cols, Rows: m.Rows, Values: vals,
			Min: mapLow, Max: 0, Scale: SharpnessScale, KeyTitle: FalloffAxisTitle}
		for r := 0; r < m.Rows; r++ {
			for c := 0; c < m.Cols; c++ {
				f.Data.Rows = append(f.Data.Rows, []string{fmt.Sprintf("cell %d,%d", c+1, r+1), "",
					cell((float64(c)+0.5)*m.CellWPx*mm, 2), cell((float64(r)+0.5)*m.CellHPx*mm, 2), cell(vals[r*m.Cols+c], 3)})
			}
		}
	}
	frame.Series = []Series{{Name: "Patches of paper", X: px, Y: py, Colour: InkColour, Marker: Circle, MarkerSize: 1.6}}
	frame.Marks = []Mark{{X: img.CentrePx[0] * mm, Y: img.CentrePx[1] * mm, Marker: CentreMarker, Size: 7, Colour: InkColour, Label: "optical centre"}}
	curve.Series = []Series{
		{Name: "Patches of paper", X: ph, Y: pe, Colour: MixedColour, Marker: Circle, MarkerSize: 1.6},
		{Name: "Fitted curve", X: fo.HeightMM, Y: fo.EV, Colour: InkColour, Width: LineWidth},
	}
	n := len(fo.HeightMM)
	curve.Marks = []Mark{{X: fo.HeightMM[n-1], Y: fo.CornerEV, Marker: ReadingMarker, Size: 4, Colour: InkColour, Label: fmt.Sprintf("corner %+.2f EV", fo.CornerEV)}}
	step := 0.5
	if low < -3 {
		step = 1
	}
	curve.Y.Min, curve.Y.Max = -step*math.Ceil(-low/step+1e-9), step/2
	if curve.Y.Min == 0 {
		curve.Y.Min = -step
	}
	f.Legend = []LegendEntry{
		{Label: "Patch of paper", Colour: InkColour, Marker: Circle},
		{Label: "Fitted curve", Colour: InkColour, Width: LineWidth},
		{Label: "Value at the corner", Colour: InkColour, Marker: ReadingMarker},
		{Label: "Optical centre", Colour: InkColour, Marker: CentreMarker},
		{Label: "No paper sampled", Colour: MaskColour, Swatch: true},
	}
	f.Notes = []string{fmt.Sprintf("Stops relative to the centre of the frame (-1 EV: half the light). %d patches, %.3f EV rms about the curve. Uneven light on the chart looks the same.", fo.Points, fo.ResidualEV)}
	f.Description = fmt.Sprintf("Light fall-off over the %s x %s mm frame and against the distance from the optical centre: %+.2f EV at the corner",
		cell(wmm, 1), cell(hmm, 1), fo.CornerEV)
	return f
}

// GeometryPhoto is one photo's distortion and fall-off with the label it
// goes by in a comparison.
type GeometryPhoto struct {
	Label      string
	Distortion *analyze.Distortion
	Falloff    *analyze.Falloff
}

// CompareDistortion overlays the distortion curves of several photos, one
// colour per photo (PhotoColours, in order).
func CompareDistortion(photos []GeometryPhoto) *Figure {
	return compareGeometry(photos, "Distortion compared", DisplacementAxisTitle, "Radial displacement (%)",
		func(p GeometryPhoto) ([]float64, []float64, bool) {
			if d := p.Distortion; d != nil && d.Measured {
				return d.HeightMM, d.DisplacementPct, true
			}
			return nil, nil, false
		})
}

// CompareFalloff overlays the light fall-off curves of several photos, one
// colour per photo.
func CompareFalloff(photos []GeometryPhoto) *Figure {
	return compareGeometry(photos, "Light fall-off compared", FalloffAxisTitle, "Light fall-off (EV)",
		func(p GeometryPhoto) ([]float64, []float64, bool) {
			if f := p.Falloff; f != nil && f.Measured {
				return f.HeightMM, f.EV, true
			}
			return nil, nil, false
		})
}

func compareGeometry(photos []GeometryPhoto, title, yTitle, column string, get func(GeometryPhoto) ([]float64, []float64, bool)) *Figure {
	f := &Figure{Title: title}
	f.Data = Table{Caption: title + ": smooth-curve samples", Columns: []string{"Photo", HeightColumn, column}}
	pn := &Panel{X: Axis{Title: HeightAxisTitle, Min: 0}, Y: Axis{Title: yTitle}, Refs: []RefLine{{At: 0, Colour: ReferenceColour, Width: 1}}}
	f.Panels = []*Panel{pn}
	f.Legend = append(f.Legend, LegendEntry{Label: "Photos", Heading: true})
	lo, hi, xmax := 0.0, 0.0, 0.0
	for i, p := range photos {
		col := PhotoColours[i%len(PhotoColours)]
		f.Legend = append(f.Legend, LegendEntry{Label: p.Label, Colour: col, Width: LineWidth})
		x, y, ok := get(p)
		if !ok || len(x) == 0 {
			continue
		}
		pn.Series = append(pn.Series, Series{Name: p.Label, X: x, Y: y, Colour: col, Width: LineWidth})
		for j := range x {
			lo, hi, xmax = math.Min(lo, y[j]), math.Max(hi, y[j]), math.Max(xmax, x[j])
			f.Data.Rows = append(f.Data.Rows, []string{p.Label, cell(x[j], 3), cell(y[j], 4)})
		}
	}
	pn.X.Max = math.Max(xmax, 1)
	pn.Y.Min, pn.Y.Max = axisAround(lo, hi)
	f.Notes = []string{"One colour per photo; photos where it was not measured draw no curve."}
	f.Description = fmt.Sprintf("%s for %d photos against the distance from the optical centre", title, len(photos))
	return f
}

// axisAround returns a y range holding [lo, hi] (lo <= 0 <= hi) and zero,
// in steps of 0.1, 0.5 or 1 by the span, with a margin of at least a
// seventh of the span on the side without data.
func axisAround(lo, hi float64) (float64, float64) {
	span := math.Max(hi-lo, 0.2)
	step := 0.1
	switch {
	case span > 4:
		step = 1
	case span > 1.5:
		step = 0.5
	}
	return -step * math.Ceil(math.Max(-lo, span/7)/step-1e-9), step * math.Ceil(math.Max(hi, span/7)/step-1e-9)
}
