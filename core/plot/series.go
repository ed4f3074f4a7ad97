package plot

import (
	"fmt"
	"math"

	"sagitta/core/series"
)

// ApertureSeries plots an aperture series: MTF50 against f-number in one
// panel per zone (centre, middle, corners) on the same axes, the measured
// medians with a band of two standard errors, a perfect lens at each f-number
// (diffraction and pixel area) for reference, and the sharpest stop marked.
func ApertureSeries(a *series.Aperture) *Figure {
	f := &Figure{
		Title:       "Sharpness at each f-number",
		Description: "MTF50 in lp/mm against f-number in the centre, the middle and the corners of the frame, with a perfect lens for reference.",
		Width:       900, Height: 420,
	}
	xs := make([]float64, len(a.Stops))
	perfect := make([]float64, len(a.Stops))
	yMax := 0.0
	for i, st := range a.Stops {
		xs[i] = st.FNumber
		perfect[i] = float64(st.PerfectMTF50LPMM)
		yMax = math.Max(yMax, perfect[i])
		for _, v := range st.MTF50LPMM {
			if hi := float64(v.Value) + 2*seOr0(float64(v.SE)); hi > yMax {
				yMax = hi
			}
		}
	}
	if !(yMax > 0) {
		yMax = 1
	}
	xMin, xMax := 0.0, 1.0
	if len(xs) > 0 {
		xMin, xMax = xs[0], xs[len(xs)-1]
	}
	pad := 0.05 * (xMax - xMin)
	if pad == 0 {
		pad = 1
	}
	titles := map[string]string{series.ZoneCentre: "Centre", series.ZoneMiddle: "Mid-field", series.ZoneCorner: "Corners"}
	colour := PhotoColours[0]
	cols := []string{"f-number"}
	for z, zone := range a.Zones {
		p := &Panel{
			Title: titles[zone],
			X:     Axis{Title: "f-number", Min: xMin - pad, Max: xMax + pad, Ticks: xs},
			Y:     Axis{Title: "MTF50 (lp/mm)", Min: 0, Max: yMax * 1.08},
		}
		y := make([]float64, len(xs))
		lo := make([]float64, len(xs))
		hi := make([]float64, len(xs))
		for i, st := range a.Stops {
			v := st.MTF50LPMM[z]
			y[i] = float64(v.Value)
			se := seOr0(float64(v.SE))
			lo[i], hi[i] = y[i]-2*se, y[i]+2*se
		}
		p.Bands = append(p.Bands, Band{Name: "two standard errors", X: xs, Lo: lo, Hi: hi, Colour: translucent(colour, 0x40)})
		p.Series = append(p.Series,
			Series{Name: "perfect lens", X: xs, Y: perfect, Colour: ReferenceColour, Width: 1.4, Dash: referenceDash},
			Series{Name: "measured " + zone, X: xs, Y: y, Colour: colour, Width: LineWidth})
		if sh := a.Sharpest[z]; sh.FNumber > 0 {
			p.Marks = append(p.Marks, Mark{X: sh.FNumber, Y: float64(sh.MTF50LPMM), Marker: ReadingMarker, Size: 4, Colour: InkColour, Label: "sharpest"})
		}
		f.Panels = append(f.Panels, p)
		cols = append(cols, zone+" MTF50 (lp/mm)", zone+" ±2 SE")
	}
	f.Legend = []LegendEntry{
		{Label: "measured (median of the zone's targets)", Colour: colour, Width: LineWidth},
		{Label: "± 2 standard errors", Colour: translucent(colour, 0x40), Swatch: true},
		{Label: "perfect lens: diffraction (550 nm) × pixel area", Colour: ReferenceColour, Width: 1.4, Dash: referenceDash},
		{Label: "sharpest stop", Colour: InkColour, Marker: ReadingMarker},
	}
	f.Notes = []string{a.Caution}
	cols = append(cols, "perfect lens MTF50 (lp/mm)")
	f.Data = Table{Caption: "MTF50 per zone at each f-number (median of the zone's targets, two standard errors) and a perfect lens", Columns: cols}
	for i, st := range a.Stops {
		row := []string{fmt.Sprintf("%g", st.FNumber)}
		for z := range a.Zones {
			v := st.MTF50LPMM[z]
			row = append(row, cell(float64(v.Value), 1), cell(2*float64(v.SE), 1))
		}
		row = append(row, cell(perfect[i], 1))
		f.Data.Rows = append(f.Data.Rows, row)
	}
	return f
}

func seOr0(v float64) float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0
	}
	return v
}
