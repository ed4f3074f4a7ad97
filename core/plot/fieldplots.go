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

// Dash patterns, px.
var (
	tangentialDash = []float64{7, 4}
	referenceDash  = []float64{5, 3}
	nyquistDash    = []float64{2, 3}
)

// bandAlpha is the opacity of uncertainty bands.
const bandAlpha = 0x38

func translucent(c color.NRGBA, a uint8) color.NRGBA { c.A = a; return c }

// freqOrder returns the indices of freqs from coarse (lowest lp/mm) to fine.
func freqOrder(freqs []float64) []int {
	idx := make([]int, len(freqs))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return freqs[idx[a]] < freqs[idx[b]] })
	return idx
}

// rankOf returns, for each frequency index, its rank from coarse to fine.
func rankOf(freqs []float64) []int {
	r := make([]int, len(freqs))
	for rank, i := range freqOrder(freqs) {
		r[i] = rank
	}
	return r
}

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

// FieldCurves plots MTF at the field frequencies against image height, from
// the centre (0 mm) to the frame corner (s.CornerMM): for each orientation
// and frequency the measured points and the smooth curve through them,
// optionally with its uncertainty band. Sagittal and tangential differ by
// hue, frequencies by line weight (coarse thick, fine thin; points filled at
// the coarsest frequency, open at the others), edges and stars by marker
// shape; mixed-orientation points are grey.
func FieldCurves(s *field.Summary, opt FieldOptions) *Figure {
	f := &Figure{Title: titled("Field curves", opt.Label)}
	pn := &Panel{
		X: Axis{Title: "Image height (mm)", Min: 0, Max: s.CornerMM},
		Y: Axis{Title: "MTF", Min: 0},
	}
	f.Panels = []*Panel{pn}
	rank := rankOf(s.FreqsLPMM)
	nf := len(s.FreqsLPMM)
	var all [][]float64
	stars, gratings, mixed := false, false, false

	f.Data = Table{
		Caption: "Field curves: smooth-curve samples and measured points",
		Columns: []string{"Row", "Orientation", "Frequency (lp/mm)", "Target id", "Image height (mm)", "MTF", "Band low", "Band high"},
	}
	for _, k := range freqOrder(s.FreqsLPMM) {
		fr := s.FreqsLPMM[k]
		w := FreqWidth(rank[k], nf)
		for _, c := range s.Curves {
			if c.FreqLPMM != fr {
				continue
			}
			col := OrientationColour(c.Orientation)
			v := floats(c.Value)
			all = append(all, v)
			name := fmt.Sprintf("%s curve, %s lp/mm", orientationName(c.Orientation), fnum(fr))
			if opt.Band {
				pn.Bands = append(pn.Bands, Band{Name: name + ", uncertainty band", X: c.HeightMM, Lo: floats(c.BandLo), Hi: floats(c.BandHi), Colour: translucent(col, bandAlpha)})
			}
			pn.Series = append(pn.Series, Series{Name: name, X: c.HeightMM, Y: v, Colour: col, Width: w})
			for i, h := range c.HeightMM {
				f.Data.Rows = append(f.Data.Rows, []string{"smooth curve", string(c.Orientation), fnum(fr), "", cell(h, 3), cell(v[i], 4), cell(float64(c.BandLo[i]), 4), cell(float64(c.BandHi[i]), 4)})
			}
		}
	}
	if !opt.HidePoints {
		// Points: one series per orientation, kind and frequency; mixed
		// first so the curves' own points sit on top.
		for _, or := range []field.Orientation{field.Mixed, field.Sagittal, field.Tangential} {
			for _, kind := range TargetKinds {
				for _, k := range freqOrder(s.FreqsLPMM) {
					var xs, ys []float64
					for _, p := range s.Points {
						if p.Orientation != or || p.Kind != kind {
							continue
						}
						v := float64(p.MTF[k])
						if math.IsNaN(v) {
							continue
						}
						xs, ys = append(xs, p.HeightMM), append(ys, v)
						f.Data.Rows = append(f.Data.Rows, []string{kind, string(or), fnum(s.FreqsLPMM[k]), strconv.Itoa(p.ID), cell(p.HeightMM, 3), cell(v, 4), "", ""})
					}
					if len(xs) == 0 {
						continue
					}
					stars = stars || kind == "star"
					gratings = gratings || kind == "grating"
					mixed = mixed || or == field.Mixed
					all = append(all, ys)
					pn.Series = append(pn.Series, Series{
						Name: fmt.Sprintf("%s %ss, %s lp/mm", orientationName(or), kind, fnum(s.FreqsLPMM[k])),
						X:    xs, Y: ys, Colour: OrientationColour(or),
						Marker: KindMarker(kind), MarkerSize: 3.2, Open: rank[k] > 0,
					})
				}
			}
		}
	}
	pn.Y.Max = mtfTop(all...)

	for _, or := range []field.Orientation{field.Sagittal, field.Tangential} {
		for _, k := range freqOrder(s.FreqsLPMM) {
			e := LegendEntry{Label: fmt.Sprintf("%s, %s lp/mm", orientationName(or), fnum(s.FreqsLPMM[k])),
				Colour: OrientationColour(or), Width: FreqWidth(rank[k], nf)}
			if !opt.HidePoints {
				e.Marker, e.Open = EdgeMarker, rank[k] > 0
			}
			f.Legend = append(f.Legend, e)
		}
	}
	if mixed {
		f.Legend = append(f.Legend, LegendEntry{Label: "Mixed orientation (points only)", Colour: MixedColour, Marker: EdgeMarker})
	}
	if !opt.HidePoints {
		f.Legend = append(f.Legend, LegendEntry{Label: "Targets", Heading: true},
			LegendEntry{Label: "Edge", Colour: InkColour, Marker: EdgeMarker})
		if stars {
			f.Legend = append(f.Legend, LegendEntry{Label: "Star", Colour: InkColour, Marker: StarMarker})
		}
		if gratings {
			f.Legend = append(f.Legend, LegendEntry{Label: "Grating", Colour: InkColour, Marker: GratingMarker})
		}
	}
	if opt.Band {
		f.Legend = append(f.Legend, LegendEntry{Label: "Band: curve +/- 2 SE", Colour: translucent(InkColour, bandAlpha), Swatch: true})
	}
	f.Notes = []string{
		fmt.Sprintf("Height runs from the optical centre (0 mm) to the frame corner (%s mm). Curves are smoothed (LOWESS) and drawn only where measured.", cell(s.CornerMM, 2)),
	}
	f.Description = fmt.Sprintf("MTF at %s lp/mm against image height from 0 to %s mm, sagittal and tangential, from %d measurements",
		joinNums(s.FreqsLPMM), cell(s.CornerMM, 2), len(s.Points))
	return f
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

// Compare overlays the field curves of several photos (an aperture series,
// two copies of a lens): one colour per photo (PhotoColours, in order),
// orientation by line style (sagittal solid, tangential dashed) and
// frequency by line weight. Points are left out to keep it readable.
func Compare(photos []Photo, opt CompareOptions) *Figure {
	f := &Figure{Title: "Field curves compared"}
	pn := &Panel{X: Axis{Title: "Image height (mm)", Min: 0}, Y: Axis{Title: "MTF", Min: 0}}
	f.Panels = []*Panel{pn}
	f.Data = Table{
		Caption: "Field curves of several photos: smooth-curve samples",
		Columns: []string{"Photo", "Orientation", "Frequency (lp/mm)", "Image height (mm)", "MTF", "Band low", "Band high"},
	}
	// The frequencies in play, coarse to fine, for the weights.
	var freqs []float64
	want := func(fr float64) bool {
		if opt.FreqsLPMM == nil {
			return true
		}
		for _, w := range opt.FreqsLPMM {
			if w == fr {
				return true
			}
		}
		return false
	}
	for _, ph := range photos {
		if ph.Summary == nil {
			continue
		}
		pn.X.Max = math.Max(pn.X.Max, ph.Summary.CornerMM)
		for _, fr := range ph.Summary.FreqsLPMM {
			if want(fr) && !contains(freqs, fr) {
				freqs = append(freqs, fr)
			}
		}
	}
	sort.Float64s(freqs)
	if pn.X.Max == 0 {
		pn.X.Max = 1
	}
	var all [][]float64
	f.Legend = append(f.Legend, LegendEntry{Label: "Photos", Heading: true})
	for i, ph := range photos {
		col := PhotoColours[i%len(PhotoColours)]
		f.Legend = append(f.Legend, LegendEntry{Label: ph.Label, Colour: col, Width: CoarseWidth})
		if ph.Summary == nil {
			continue
		}
		for _, c := range ph.Summary.Curves {
			r := indexOf(freqs, c.FreqLPMM)
			if r < 0 {
				continue
			}
			var dash []float64
			if c.Orientation == field.Tangential {
				dash = tangentialDash
			}
			v := floats(c.Value)
			all = append(all, v)
			name := fmt.Sprintf("%s: %s, %s lp/mm", ph.Label, orientationName(c.Orientation), fnum(c.FreqLPMM))
			if opt.Band {
				pn.Bands = append(pn.Bands, Band{Name: name + ", uncertainty band", X: c.HeightMM, Lo: floats(c.BandLo), Hi: floats(c.BandHi), Colour: translucent(col, bandAlpha/2)})
			}
			pn.Series = append(pn.Series, Series{Name: name, X: c.HeightMM, Y: v, Colour: col, Width: FreqWidth(r, len(freqs)), Dash: dash})
			for j, h := range c.HeightMM {
				f.Data.Rows = append(f.Data.Rows, []string{ph.Label, string(c.Orientation), fnum(c.FreqLPMM), cell(h, 3), cell(v[j], 4), cell(float64(c.BandLo[j]), 4), cell(float64(c.BandHi[j]), 4)})
			}
		}
	}
	pn.Y.Max = mtfTop(all...)
	f.Legend = append(f.Legend, LegendEntry{Label: "Line style", Heading: true},
		LegendEntry{Label: "Sagittal", Colour: InkColour, Width: 1.8},
		LegendEntry{Label: "Tangential", Colour: InkColour, Width: 1.8, Dash: tangentialDash})
	for r, fr := range freqs {
		f.Legend = append(f.Legend, LegendEntry{Label: fnum(fr) + " lp/mm", Colour: InkColour, Width: FreqWidth(r, len(freqs))})
	}
	f.Notes = []string{"Curves are smoothed (LOWESS) and drawn only where measured; height runs to the largest frame corner."}
	f.Description = fmt.Sprintf("Field curves of %d photos at %s lp/mm against image height, sagittal and tangential", len(photos), joinNums(freqs))
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

// Astigmatism plots sagittal minus tangential MTF against image height at
// each field frequency (weight by frequency), with its uncertainty band
// when opt.Band is set and the largest notable gap marked.
func Astigmatism(s *field.Summary, opt FieldOptions) *Figure {
	f := &Figure{Title: titled("Astigmatism (sagittal minus tangential)", opt.Label)}
	pn := &Panel{
		X: Axis{Title: "Image height (mm)", Min: 0, Max: s.CornerMM},
		Y: Axis{Title: "Sagittal - tangential MTF"},
	}
	f.Panels = []*Panel{pn}
	f.Data = Table{
		Caption: "Sagittal minus tangential MTF against image height",
		Columns: []string{"Frequency (lp/mm)", "Image height (mm)", "Gap (S - T)", "Band low", "Band high"},
	}
	rank := rankOf(s.FreqsLPMM)
	top := 0.2
	for _, a := range s.Astigmatism {
		r := rank[indexOf(s.FreqsLPMM, a.FreqLPMM)]
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
		pn.Series = append(pn.Series, Series{Name: name, X: a.HeightMM, Y: g, Colour: InkColour, Width: FreqWidth(r, len(s.FreqsLPMM))})
		if a.Notable {
			pn.Marks = append(pn.Marks, Mark{X: a.MaxGapHeightMM, Y: a.MaxGap, Marker: Diamond, Size: 4.5, Colour: InkColour,
				Label: fmt.Sprintf("%+.2f at %s lp/mm", a.MaxGap, fnum(a.FreqLPMM))})
		}
		for i, h := range a.HeightMM {
			f.Data.Rows = append(f.Data.Rows, []string{fnum(a.FreqLPMM), cell(h, 3), cell(g[i], 4), cell(lo[i], 4), cell(hi[i], 4)})
		}
		f.Legend = append(f.Legend, LegendEntry{Label: fnum(a.FreqLPMM) + " lp/mm", Colour: InkColour, Width: FreqWidth(r, len(s.FreqsLPMM))})
	}
	top = math.Min(1, math.Ceil(top*10-1e-9)/10)
	pn.Y.Min, pn.Y.Max = -top, top
	pn.Refs = []RefLine{{At: 0, Colour: ReferenceColour, Width: 1}}
	if len(pn.Marks) > 0 {
		f.Legend = append(f.Legend, LegendEntry{Label: "Largest notable gap", Colour: InkColour, Marker: Diamond})
	}
	if opt.Band {
		f.Legend = append(f.Legend, LegendEntry{Label: "Band: gap +/- 2 SE", Colour: translucent(InkColour, bandAlpha), Swatch: true})
	}
	f.Notes = []string{"Above zero: sagittal detail is sharper; below zero: tangential detail is sharper. Drawn where both curves exist."}
	f.Description = fmt.Sprintf("Sagittal minus tangential MTF against image height from 0 to %s mm", cell(s.CornerMM, 2))
	return f
}
