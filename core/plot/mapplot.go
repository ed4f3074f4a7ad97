package plot

import (
	"fmt"
	"math"
	"strconv"

	"sagitta/core/field"
)

// MapOptions tune Map.
type MapOptions struct {
	// Label names the photo in the title; may be empty.
	Label string
}

// Map plots the MTF50 map, MTF50 interpolated over the frame: the interpolated grid of s.Map on the
// SharpnessScale (dark = soft, light = sharp) with its colour key, grey
// cells where nothing was measured nearby, every measurement marked by its
// kind's shape, and the optical centre marked with a cross. Axes are mm on
// the sensor from the top-left corner of the photo, y downwards as in the
// photo. Without a map (no MTF50 anywhere) the panel shows the points only.
func Map(s *field.Summary, opt MapOptions) *Figure {
	mm := s.PitchUM / 1000
	wmm, hmm := float64(s.WidthPx)*mm, float64(s.HeightPx)*mm
	f := &Figure{Title: titled("MTF50 map", opt.Label), LegendBelow: true}
	// Height for the frame's aspect at the default width: the plot area is
	// the width less the margins and the colour key, plus title, axis,
	// legend and note bands; at most 900 px (portrait frames then narrow).
	f.Width = DefaultWidth
	f.Height = DefaultHeight
	if wmm > 0 {
		plotW := float64(DefaultWidth - marginLeft - marginRight - keyWidth)
		f.Height = math.Min(900, math.Round(titleBand+12+plotW*hmm/wmm+marginBot+2*legendRow+8+noteLine+8))
	}
	pn := &Panel{
		X:           Axis{Title: "Across the sensor (mm)", Min: 0, Max: wmm},
		Y:           Axis{Title: "Down the sensor (mm)", Min: 0, Max: hmm, Reverse: true},
		EqualAspect: true,
	}
	f.Panels = []*Panel{pn}
	f.Data = Table{
		Caption: "MTF50 map cells (empty where nothing was measured nearby) and the measurements behind them",
		Columns: []string{"Row", "Target id", "x (mm)", "y (mm)", "MTF50 (lp/mm)"},
	}
	if m := s.Map; m != nil {
		hm := &HeatMap{X0: 0, X1: wmm, Y0: 0, Y1: hmm, Cols: m.Cols, Rows: m.Rows,
			Values: floats(m.MTF50LPMM), Min: m.Min, Max: m.Max, Scale: SharpnessScale, KeyTitle: "MTF50 (lp/mm)"}
		pn.Heat = hm
		for r := 0; r < m.Rows; r++ {
			for c := 0; c < m.Cols; c++ {
				x, y := (float64(c)+0.5)*m.CellWPx*mm, (float64(r)+0.5)*m.CellHPx*mm
				f.Data.Rows = append(f.Data.Rows, []string{fmt.Sprintf("cell %d,%d", c+1, r+1), "", cell(x, 2), cell(y, 2), cell(hm.Values[r*m.Cols+c], 1)})
			}
		}
	}
	stars, gratings := false, false
	for _, kind := range TargetKinds {
		var xs, ys []float64
		for _, p := range s.Points {
			if p.Kind != kind {
				continue
			}
			xs, ys = append(xs, p.XPx*mm), append(ys, p.YPx*mm)
			f.Data.Rows = append(f.Data.Rows, []string{kind, strconv.Itoa(p.ID), cell(p.XPx*mm, 2), cell(p.YPx*mm, 2), cell(float64(p.MTF50LPMM), 1)})
		}
		if len(xs) > 0 {
			stars = stars || kind == "star"
			gratings = gratings || kind == "grating"
			pn.Series = append(pn.Series, Series{Name: "Measured " + kind + "s", X: xs, Y: ys, Colour: InkColour, Marker: KindMarker(kind), MarkerSize: 2.4, Open: true})
		}
	}
	pn.Marks = []Mark{{X: s.CentrePx[0] * mm, Y: s.CentrePx[1] * mm, Marker: CentreMarker, Size: 7, Colour: InkColour, Label: "optical centre"}}

	f.Legend = []LegendEntry{{Label: "Edge", Colour: InkColour, Marker: EdgeMarker, Open: true}}
	if stars {
		f.Legend = append(f.Legend, LegendEntry{Label: "Star", Colour: InkColour, Marker: StarMarker, Open: true})
	}
	if gratings {
		f.Legend = append(f.Legend, LegendEntry{Label: "Grating", Colour: InkColour, Marker: GratingMarker, Open: true})
	}
	f.Legend = append(f.Legend,
		LegendEntry{Label: "Optical centre", Colour: InkColour, Marker: CentreMarker},
		LegendEntry{Label: "Nothing measured near", Colour: MaskColour, Swatch: true})
	lo, hi := math.NaN(), math.NaN()
	if s.Map != nil {
		lo, hi = s.Map.Min, s.Map.Max
		f.Legend = append(f.Legend,
			LegendEntry{Label: "Soft: " + cell(lo, 0) + " lp/mm", Colour: SharpnessScale.At(0), Swatch: true},
			LegendEntry{Label: "Sharp: " + cell(hi, 0) + " lp/mm", Colour: SharpnessScale.At(1), Swatch: true})
	}
	f.Notes = []string{"Mean of sagittal and tangential MTF50, each interpolated between measurements: between targets the values are not measured, only estimated."}
	f.Description = fmt.Sprintf("MTF50 over the %s x %s mm frame from %d measurements, from %s to %s lp/mm",
		cell(wmm, 1), cell(hmm, 1), len(s.Points), cell(lo, 0), cell(hi, 0))
	return f
}
