package plot

import (
	"fmt"
	"math"

	"sagitta/core/analyze"
	"sagitta/core/field"
	"sagitta/core/optics"
)

// TargetData is what the target plot needs of one measurement.
type TargetData struct {
	// Title names the target, e.g. "Edge 12".
	Title string
	// Kind is "edge" or "star"; Orientation colours the curves.
	Kind        string
	Orientation field.Orientation
	// HeightMM is the image height of the target, mm.
	HeightMM float64
	// ESFX, ESFV: the edge spread function, x in px along the edge normal
	// (0 at the edge, positive on the light side), level 0 (dark) to 1.
	ESFX, ESFV []float64
	// LSFX, LSFV: the line spread function, px, peak 1.
	LSFX, LSFV []float64
	// Freq and MTF: the response, frequency in cy/px.
	Freq, MTF []float64
	// MTF50 in cy/px (NaN when not reached).
	MTF50 float64
	// PitchUM is the pixel pitch, um (for lp/mm and the reference curve).
	PitchUM float64
	// FNumber is the lens's f-number for the reference curve; 0
	// leaves the reference out.
	FNumber float64
}

// TargetOptions tune Target.
type TargetOptions struct {
	// LPMM puts the MTF panel's frequency axis in lp/mm on the sensor
	// instead of cy/px (needs PitchUM).
	LPMM bool
}

// ReferenceWording names the reference curve in every plot and on the
// page: "a perfect lens at f/N: diffraction (550 nm) × pixel area" (the
// curve itself is core/optics's PerfectLens).
func ReferenceWording(fNumber float64) string {
	return fmt.Sprintf("a perfect lens at f/%s: diffraction (%s nm) × pixel area", fnum(fNumber), fnum(optics.WavelengthUM*1000))
}

// TargetFromMeasurement gathers the target plot's data from a measurement
// of img (its pitch, and its f-number from Exif when known).
func TargetFromMeasurement(m analyze.Measurement, img *analyze.Image) TargetData {
	kind := "Edge"
	if m.Kind == "star" {
		kind = "Star"
	}
	return TargetData{
		Title:       fmt.Sprintf("%s %d", kind, m.ID),
		Kind:        m.Kind,
		Orientation: m.Orientation,
		HeightMM:    m.HeightMM,
		ESFX:        m.ESF.X, ESFV: m.ESF.V,
		LSFX: m.LSF.X, LSFV: m.LSF.V,
		Freq: m.Freq, MTF: m.MTF,
		MTF50:   float64(m.MTF50),
		PitchUM: img.PitchUM,
		FNumber: img.Exif.FNumber,
	}
}

// Target plots one target in three panels: its edge profile (ESF), the
// profile's derivative (LSF) and its MTF with Nyquist (0.5 cy/px, a solid
// vertical line) and MTF50 marked, and, when the f-number is known, the
// reference curve (dashed): a perfect lens at that f-number, diffraction
// times the pixel area (core/optics). Processing is not in it, so a
// measured curve normally lies below it.
func Target(t TargetData, opt TargetOptions) *Figure {
	col := OrientationColour(t.Orientation)
	desc := fmt.Sprintf("%s, %s, %s mm from the optical centre", t.Title, lower(orientationName(t.Orientation)), cell(t.HeightMM, 1))
	f := &Figure{Title: "Target detail: " + desc, Width: 980, Height: 420}
	f.Data = Table{
		Caption: "Edge profile, its derivative and the MTF of " + t.Title,
		Columns: []string{"Curve", "x", "x unit", "Value"},
	}

	// ESF and LSF share an x range: the profile, at most 12 px each side.
	xlo, xhi := rangeOf(t.ESFX)
	xlo, xhi = math.Max(xlo, -12), math.Min(xhi, 12)
	if !(xhi > xlo) {
		xlo, xhi = -8, 8
	}
	elo, ehi := rangeOf(t.ESFV)
	esf := &Panel{Title: "Edge profile (ESF)",
		X: Axis{Title: "Distance from the edge (px)", Min: xlo, Max: xhi},
		Y: Axis{Title: "Level (dark 0, light 1)", Min: math.Min(-0.1, elo), Max: math.Max(1.1, ehi)},
	}
	esf.Series = []Series{{Name: "Edge profile", X: t.ESFX, Y: t.ESFV, Colour: col, Width: LineWidth}}
	llo, _ := rangeOf(t.LSFV)
	lsf := &Panel{Title: "Line spread (LSF)",
		X: Axis{Title: "Distance from the edge (px)", Min: xlo, Max: xhi},
		Y: Axis{Title: "Derivative (peak 1)", Min: math.Min(-0.2, llo), Max: 1.1},
	}
	lsf.Series = []Series{{Name: "Line spread", X: t.LSFX, Y: t.LSFV, Colour: col, Width: LineWidth}}
	lsf.Refs = []RefLine{{At: 0, Colour: GridColour, Width: 1}}

	// MTF panel.
	unit, scale := "cy/px", 1.0
	if opt.LPMM && t.PitchUM > 0 {
		unit, scale = "lp/mm", 1000/t.PitchUM
	}
	fmax := 1.0
	if _, hi := rangeOf(t.Freq); hi > 0 && hi < fmax {
		fmax = hi
	}
	xs := make([]float64, len(t.Freq))
	for i, v := range t.Freq {
		xs[i] = v * scale
	}
	mtf := &Panel{Title: "Response (MTF)",
		X: Axis{Title: "Frequency (" + unit + ")", Min: 0, Max: fmax * scale},
		Y: Axis{Title: "MTF", Min: 0, Max: mtfTop(t.MTF)},
	}
	mtf.Refs = []RefLine{{Vertical: true, At: 0.5 * scale, Label: "Nyquist", Colour: NyquistColour, Width: 1.2}}
	f.Legend = []LegendEntry{{Label: "Measured, " + lower(orientationName(t.Orientation)), Colour: col, Width: LineWidth}}
	if t.FNumber > 0 && t.PitchUM > 0 {
		var dx, vs []float64
		for i := 0; i <= 100; i++ {
			v := fmax * float64(i) / 100
			dx, vs = append(dx, v*scale), append(vs, v)
		}
		dy, _ := optics.PerfectLens(t.FNumber, t.PitchUM, optics.WavelengthUM, vs) // the one reference curve (core/optics)
		for i := range dx {
			f.Data.Rows = append(f.Data.Rows, []string{"Perfect lens", cell(dx[i], 4), unit, cell(dy[i], 4)})
		}
		mtf.Series = append(mtf.Series, Series{Name: "Reference: " + ReferenceWording(t.FNumber), X: dx, Y: dy, Colour: ReferenceColour, Width: 1.4, Dash: referenceDash})
		f.Legend = append(f.Legend, LegendEntry{Label: fmt.Sprintf("Perfect lens at f/%s", fnum(t.FNumber)), Colour: ReferenceColour, Width: 1.4, Dash: referenceDash})
		f.Notes = append(f.Notes, "Reference: "+ReferenceWording(t.FNumber)+"; processing is not in it, so a measured curve above it was sharpened.")
	}
	mtf.Series = append(mtf.Series, Series{Name: "Measured MTF", X: xs, Y: t.MTF, Colour: col, Width: LineWidth})
	f.Legend = append(f.Legend, LegendEntry{Label: "Nyquist, 0.5 cy/px", Colour: NyquistColour, Width: 1.2})
	if !math.IsNaN(t.MTF50) && t.MTF50 > 0 {
		mtf.Marks = []Mark{{X: t.MTF50 * scale, Y: 0.5, Marker: ReadingMarker, Size: 4, Colour: InkColour,
			Label: "MTF50 " + cell(t.MTF50*scale, unitDecimals(unit)) + " " + shortUnit(unit)}}
		f.Legend = append(f.Legend, LegendEntry{Label: "MTF50", Colour: InkColour, Marker: ReadingMarker})
	}
	f.Panels = []*Panel{esf, lsf, mtf}
	for i := range t.ESFX {
		f.Data.Rows = append(f.Data.Rows, []string{"ESF", cell(t.ESFX[i], 3), "px", cell(t.ESFV[i], 4)})
	}
	for i := range t.LSFX {
		f.Data.Rows = append(f.Data.Rows, []string{"LSF", cell(t.LSFX[i], 3), "px", cell(t.LSFV[i], 4)})
	}
	for i := range t.Freq {
		f.Data.Rows = append(f.Data.Rows, []string{"MTF", cell(xs[i], 4), unit, cell(t.MTF[i], 4)})
	}
	f.Notes = append(f.Notes, "Profile and derivative along the edge normal, positive towards the light side.")
	f.Description = "Edge profile, line spread and MTF of " + desc
	return f
}

func unitDecimals(unit string) int {
	if unit == "lp/mm" {
		return 1
	}
	return 3
}

func shortUnit(unit string) string { return unit }

func lower(s string) string {
	if s == "" {
		return s
	}
	b := []byte(s)
	if b[0] >= 'A' && b[0] <= 'Z' {
		b[0] += 'a' - 'A'
	}
	return string(b)
}

// rangeOf returns the smallest and largest finite value of v (NaN, NaN if
// there is none).
func rangeOf(v []float64) (lo, hi float64) {
	lo, hi = math.NaN(), math.NaN()
	for _, x := range v {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			continue
		}
		if math.IsNaN(lo) || x < lo {
			lo = x
		}
		if math.IsNaN(hi) || x > hi {
			hi = x
		}
	}
	return lo, hi
}
