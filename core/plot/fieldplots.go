package plot

import (
	"fmt"
	"image/color"
	"math"
	"sort"
	"strconv"

	"sagitta/core/field"
)

// FieldOptions tune FieldCurves and Astigmatism.
type FieldOptions struct {
	// Label names the photo in the title (e.g. its file name); may be empty.
	Label string
	// Band draws the uncertainty band (curve +/- 2 standard errors).
	Band bool
	// HidePoints leaves out the measured points, drawing curves only.
	HidePoints bool
}

// referenceDash is the dash pattern of reference curves, px: the only
// dashed lines of the plots.
var referenceDash = []float64{6, 4}

// bandAlpha is the opacity of uncertainty bands.
const bandAlpha = 0x38

func translucent(c color.NRGBA, a uint8) color.NRGBA { c.A = a; return c }

func titled(base, label string) string {
	if label == "" {
		return base
	}
	return base + ": " + label
}

func orientationName(o field.Orientation) string {
	switch o {
	case field.Sagittal:
		return "Sagittal"
	case field.Tangential:
		return "Tangential"
	}
	return "Mixed orientation"
}

// mtfTop returns the top of an MTF axis: 1, or above it in steps of 0.1
// when sharpening lifts values over 1.
func mtfTop(vals ...[]float64) float64 {
	top := 1.0
	for _, vs := range vals {
		for _, v := range vs {
			if !math.IsNaN(v) && v > top {
				top = v
			}
		}
	}
	return math.Min(2, math.Ceil(top*10-1e-9)/10)
}

func floats(ns []field.Number) []float64 {
	out := make([]float64, len(ns))
	for i, n := range ns {
		out[i] = float64(n)
	}
	return out
}

// HeightAxisTitle is the one name of the x axis of every field plot.
const HeightAxisTitle = "distance from the optical centre (mm)"

// fieldOrients are the columns of a field-plot grid, left to right.
var fieldOrients = []field.Orientation{field.Sagittal, field.Tangential}

// fieldGrid returns the panels of a field plot: one row per frequency
// (coarse at the top), one column per orientation (sagittal left), each
// titled "10 lp/mm · sagittal", all on the same axes (0 to cornerMM, MTF
// from 0); the figure is sized for the rows.
func fieldGrid(f *Figure, freqs []float64, cornerMM float64) [][]*Panel {
	grid := make([][]*Panel, len(freqs))
	for r, fr := range freqs {
		for _, o := range fieldOrients {
			pn := &Panel{
				Title: fmt.Sprintf("%s lp/mm · %s", fnum(fr), lower(orientationName(o))),
				X:     Axis{Title: HeightAxisTitle, Min: 0, Max: cornerMM},
				Y:     Axis{Title: "MTF", Min: 0},
			}
			grid[r] = append(grid[r], pn)
			f.Panels = append(f.Panels, pn)
		}
	}
	f.Columns = len(fieldOrients)
	f.Height = math.Max(DefaultHeight, titleBand+float64(max(1, len(freqs)))*panelRowHeight+3*noteLine)
	return grid
}

// panelRowHeight is the height of one row of a field-plot grid, px.
const panelRowHeight = 250

// setTop puts the same MTF axis top on every panel.
func setTop(grid [][]*Panel, top float64) {
	for _, row := range grid {
		for _, pn := range row {
			pn.Y.Max = top
		}
	}
}

// column returns the grid column of an orientation (-1 for mixed).
func column(o field.Orientation) int {
	for i, x := range fieldOrients {
		if x == o {
			return i
		}
	}
	return -1
}

// FieldCurves plots MTF at the field frequencies against the distance from
// the optical centre, from the centre (0 mm) to the frame corner
// (s.CornerMM), as a grid of small panels on the same axes: one row per
// field frequency (coarse at the top), one column per orientation
// (sagittal left, tangential right). Each panel holds the measured points,
// the smooth curve through them and, optionally, its uncertainty band.
// Lines are all of one weight and solid; the orientation hue repeats what
// the column says; each kind of target has its marker shape (KindMarker);
// points measured in no particular orientation are grey, in both columns.
func FieldCurves(s *field.Summary, opt FieldOptions) *Figure {
	f := &Figure{Title: titled("Field curves", opt.Label)}
	freqs := sortedCopy(s.FreqsLPMM)
	grid := fieldGrid(f, freqs, s.CornerMM)
	var all [][]float64
	kinds := map[string]bool{}
	mixed := false

	f.Data = Table{
		Caption: "Field curves: smooth-curve samples and measured points",
		Columns: []string{"Row", "Orientation", "Frequency (lp/mm)", "Target id", HeightColumn, "MTF", "Band low", "Band high"},
	}
	for r, fr := range freqs {
		for _, c := range s.Curves {
			col := column(c.Orientation)
			if c.FreqLPMM != fr || col < 0 {
				continue
			}
			pn := grid[r][col]
			hue := OrientationColour(c.Orientation)
			v := floats(c.Value)
			all = append(all, v)
			name := fmt.Sprintf("%s curve, %s lp/mm", orientationName(c.Orientation), fnum(fr))
			if opt.Band {
				pn.Bands = append(pn.Bands, Band{Name: name + ", uncertainty band", X: c.HeightMM, Lo: floats(c.BandLo), Hi: floats(c.BandHi), Colour: translucent(hue, bandAlpha)})
			}
			pn.Series = append(pn.Series, Series{Name: name, X: c.HeightMM, Y: v, Colour: hue, Width: LineWidth})
			for i, h := range c.HeightMM {
				f.Data.Rows = append(f.Data.Rows, []string{"smooth curve", string(c.Orientation), fnum(fr), "", cell(h, 3), cell(v[i], 4), cell(float64(c.BandLo[i]), 4), cell(float64(c.BandHi[i]), 4)})
			}
		}
	}
	if !opt.HidePoints {
		// Points: one series per orientation and kind in each panel; mixed
		// first so the panel's own points sit on top.
		for _, or := range []field.Orientation{field.Mixed, field.Sagittal, field.Tangential} {
			for _, kind := range TargetKinds {
				for r, fr := range freqs {
					k := indexOf(s.FreqsLPMM, fr)
					var xs, ys []float64
					for _, p := range s.Points {
						if p.Orientation != or || p.Kind != kind || k >= len(p.MTF) {
							continue
						}
						v := float64(p.MTF[k])
						if math.IsNaN(v) {
							continue
						}
						xs, ys = append(xs, p.HeightMM), append(ys, v)
						f.Data.Rows = append(f.Data.Rows, []string{kind, string(or), fnum(fr), strconv.Itoa(p.ID), cell(p.HeightMM, 3), cell(v, 4), "", ""})
					}
					if len(xs) == 0 {
						continue
					}
					kinds[kind] = true
					mixed = mixed || or == field.Mixed
					all = append(all, ys)
					cols := []int{column(or)}
					if or == field.Mixed {
						cols = []int{0, 1}
					}
					for _, col := range cols {
						grid[r][col].Series = append(grid[r][col].Series, Series{
							Name: fmt.Sprintf("%s %ss, %s lp/mm", orientationName(or), kind, fnum(fr)),
							X:    xs, Y: ys, Colour: OrientationColour(or),
							Marker: KindMarker(kind), MarkerSize: 3,
						})
					}
				}
			}
		}
	}
	setTop(grid, mtfTop(all...))

	f.Legend = append(f.Legend,
		LegendEntry{Label: "Smooth curve", Heading: true},
		LegendEntry{Label: "Sagittal", Colour: SagittalColour, Width: LineWidth},
		LegendEntry{Label: "Tangential", Colour: TangentialColour, Width: LineWidth})
	if opt.Band {
		f.Legend = append(f.Legend, LegendEntry{Label: "curve ± 2 standard errors", Colour: translucent(InkColour, bandAlpha), Swatch: true})
	}
	if !opt.HidePoints {
		f.Legend = append(f.Legend, kindLegend(kinds)...)
	}
	if mixed {
		f.Legend = append(f.Legend, LegendEntry{Label: "No single orientation", Colour: MixedColour, Marker: EdgeMarker})
	}
	f.Notes = []string{
		fmt.Sprintf("Rows: field frequencies; columns: orientations; every panel has the same axes, from the optical centre (0 mm) to the frame corner (%s mm). Curves are smoothed and drawn only where measured.", cell(s.CornerMM, 2)),
	}
	f.Description = fmt.Sprintf("MTF at %s lp/mm against the distance from the optical centre, 0 to %s mm, one panel per frequency and orientation, from %d measurements",
		joinNums(freqs), cell(s.CornerMM, 2), len(s.Points))
	return f
}

// HeightColumn is the data-table (and CSV) column of the distance from the
// optical centre.
const HeightColumn = "Distance from the optical centre (mm)"

// kindLegend returns the legend's marker entries for the kinds of target
// present, in TargetKinds order.
func kindLegend(present map[string]bool) []LegendEntry {
	out := []LegendEntry{{Label: "Measured targets", Heading: true}}
	for _, k := range TargetKinds {
		if present[k] {
			out = append(out, LegendEntry{Label: KindName(k), Colour: InkColour, Marker: KindMarker(k)})
		}
	}
	if len(out) == 1 {
		return nil
	}
	return out
}

// KindName is the legend word for a kind of target.
func KindName(kind string) string {
	switch kind {
	case "star":
		return "Star"
	case "grating":
		return "Grating"
	}
	return "Edge"
}

func sortedCopy(v []float64) []float64 {
	out := append([]float64(nil), v...)
	sort.Float64s(out)
	return out
}

// joinNums lists numbers as "10 and 30" or "5, 10 and 20".
func joinNums(v []float64) string {
	out := ""
	for i, x := range v {
		switch {
		case i == 0:
		case i == len(v)-1:
			out += " and "
		default:
			out += ", "
		}
		out += fnum(x)
	}
	return out
}

// Photo is one photo's summary with the label it goes by in a comparison
// (a file name, or "f/4", "copy B").
type Photo struct {
	Label   string
	Summary *field.Summary
}

// CompareOptions tune Compare.
type CompareOptions struct {
	// FreqsLPMM restricts the plot to these field frequencies; nil plots
	// every frequency of every photo.
	FreqsLPMM []float64
	// Band draws each curve's uncertainty band.
	Band bool
}

// Compare draws the field curves of several photos (an aperture series,
// two copies of a lens) in the same grid as FieldCurves: one row per field
// frequency, one column per orientation, the same axes in every panel, and
// one colour per photo (PhotoColours, in order). Every line is solid and of
// one weight. Points are left out to keep it readable.
func Compare(photos []Photo, opt CompareOptions) *Figure {
	f := &Figure{Title: "Field curves compared"}
	f.Data = Table{
		Caption: "Field curves of several photos: smooth-curve samples",
		Columns: []string{"Photo", "Orientation", "Frequency (lp/mm)", HeightColumn, "MTF", "Band low", "Band high"},
	}
	var freqs []float64
	want := func(fr float64) bool { return opt.FreqsLPMM == nil || contains(opt.FreqsLPMM, fr) }
	corner := 0.0
	for _, ph := range photos {
		if ph.Summary == nil {
			continue
		}
		corner = math.Max(corner, ph.Summary.CornerMM)
		for _, fr := range ph.Summary.FreqsLPMM {
			if want(fr) && !contains(freqs, fr) {
				freqs = append(freqs, fr)
			}
		}
	}
	sort.Float64s(freqs)
	if corner == 0 {
		corner = 1
	}
	grid := fieldGrid(f, freqs, corner)
	var all [][]float64
	f.Legend = append(f.Legend, LegendEntry{Label: "Photos", Heading: true})
	for i, ph := range photos {
		col := PhotoColours[i%len(PhotoColours)]
		f.Legend = append(f.Legend, LegendEntry{Label: ph.Label, Colour: col, Width: LineWidth})
		if ph.Summary == nil {
			continue
		}
		for _, c := range ph.Summary.Curves {
			r, k := indexOf(freqs, c.FreqLPMM), column(c.Orientation)
			if r < 0 || k < 0 {
				continue
			}
			pn := grid[r][k]
			v := floats(c.Value)
			all = append(all, v)
			name := fmt.Sprintf("%s: %s, %s lp/mm", ph.Label, orientationName(c.Orientation), fnum(c.FreqLPMM))
			if opt.Band {
				pn.Bands = append(pn.Bands, Band{Name: name + ", uncertainty band", X: c.HeightMM, Lo: floats(c.BandLo), Hi: floats(c.BandHi), Colour: translucent(col, bandAlpha/2)})
			}
			pn.Series = append(pn.Series, Series{Name: name, X: c.HeightMM, Y: v, Colour: col, Width: LineWidth})
			for j, h := range c.HeightMM {
				f.Data.Rows = append(f.Data.Rows, []string{ph.Label, string(c.Orientation), fnum(c.FreqLPMM), cell(h, 3), cell(v[j], 4), cell(float64(c.BandLo[j]), 4), cell(float64(c.BandHi[j]), 4)})
			}
		}
	}
	setTop(grid, mtfTop(all...))
	if opt.Band {
		f.Legend = append(f.Legend, LegendEntry{Label: "curve ± 2 standard errors", Colour: translucent(InkColour, bandAlpha), Swatch: true})
	}
	f.Notes = []string{"Rows: field frequencies; columns: orientations; every panel has the same axes, out to the largest frame corner. Curves are smoothed and drawn only where measured."}
	f.Description = fmt.Sprintf("Field curves of %d photos at %s lp/mm against the distance from the optical centre, one panel per frequency and orientation, one colour per photo", len(photos), joinNums(freqs))
	return f
}

func contains(v []float64, x float64) bool { return indexOf(v, x) >= 0 }

func indexOf(v []float64, x float64) int {
	for i, y := range v {
		if y == x {
			return i
		}
	}
	return -1
}

// Astigmatism plots sagittal minus tangential MTF against the distance
// from the optical centre, one small panel per field frequency side by side
// on the same axes, with its uncertainty band when opt.Band is set and the
// largest notable gap marked with the ReadingMarker.
func Astigmatism(s *field.Summary, opt FieldOptions) *Figure {
	f := &Figure{Title: titled("Astigmatism (sagittal minus tangential)", opt.Label)}
	f.Data = Table{
		Caption: "Sagittal minus tangential MTF against the distance from the optical centre",
		Columns: []string{"Frequency (lp/mm)", HeightColumn, "Gap (S - T)", "Band low", "Band high"},
	}
	top := 0.2
	marked := false
	for _, a := range s.Astigmatism {
		pn := &Panel{
			Title: fnum(a.FreqLPMM) + " lp/mm",
			X:     Axis{Title: HeightAxisTitle, Min: 0, Max: s.CornerMM},
			Y:     Axis{Title: "Sagittal - tangential MTF"},
			Refs:  []RefLine{{At: 0, Colour: ReferenceColour, Width: 1}},
		}
		f.Panels = append(f.Panels, pn)
		g := floats(a.Gap)
		lo, hi := floats(a.BandLo), floats(a.BandHi)
		for i := range g {
			top = math.Max(top, math.Abs(g[i]))
			if opt.Band {
				top = math.Max(top, math.Max(math.Abs(lo[i]), math.Abs(hi[i])))
			}
		}
		name := fmt.Sprintf("Gap at %s lp/mm", fnum(a.FreqLPMM))
		if opt.Band {
			pn.Bands = append(pn.Bands, Band{Name: name + ", uncertainty band", X: a.HeightMM, Lo: lo, Hi: hi, Colour: translucent(InkColour, bandAlpha/2)})
		}
		pn.Series = append(pn.Series, Series{Name: name, X: a.HeightMM, Y: g, Colour: InkColour, Width: LineWidth})
		if a.Notable {
			marked = true
			pn.Marks = append(pn.Marks, Mark{X: a.MaxGapHeightMM, Y: a.MaxGap, Marker: ReadingMarker, Size: 4, Colour: InkColour,
				Label: fmt.Sprintf("%+.2f", a.MaxGap)})
		}
		for i, h := range a.HeightMM {
			f.Data.Rows = append(f.Data.Rows, []string{fnum(a.FreqLPMM), cell(h, 3), cell(g[i], 4), cell(lo[i], 4), cell(hi[i], 4)})
		}
	}
	top = math.Min(1, math.Ceil(top*10-1e-9)/10)
	for _, pn := range f.Panels {
		pn.Y.Min, pn.Y.Max = -top, top
	}
	if len(f.Panels) == 0 {
		f.Panels = []*Panel{{X: Axis{Title: HeightAxisTitle, Min: 0, Max: math.Max(1, s.CornerMM)}, Y: Axis{Title: "Sagittal - tangential MTF", Min: -top, Max: top}}}
	}
	f.Legend = append(f.Legend, LegendEntry{Label: "Sagittal - tangential", Colour: InkColour, Width: LineWidth})
	if marked {
		f.Legend = append(f.Legend, LegendEntry{Label: "Largest notable gap", Colour: InkColour, Marker: ReadingMarker})
	}
	if opt.Band {
		f.Legend = append(f.Legend, LegendEntry{Label: "gap ± 2 standard errors", Colour: translucent(InkColour, bandAlpha), Swatch: true})
	}
	f.Notes = []string{"One panel per field frequency, same axes. Above zero: sagittal detail is sharper; below zero: tangential detail is sharper. Drawn where both curves exist."}
	f.Description = fmt.Sprintf("Sagittal minus tangential MTF against the distance from the optical centre, 0 to %s mm, one panel per field frequency", cell(s.CornerMM, 2))
	return f
}
