package analyze

import (
	"errors"
	"math"
	"slices"
	"sort"

	"sagitta/core/curve"
	"sagitta/core/field"
	"sagitta/core/note"
)

// errNoRecords is summarise's report of an image with no measurement
// record (Run turns it into a noTargets error).
var errNoRecords = errors.New("analyze: no measurement records")

// noEdgeWarning is the image's warning when only sine patterns were
// measured.
const noEdgeWarning = "no measurable edge was found in this photo, only sine patterns"

// summarise finishes an analysis from what was measured, for the pixel
// pitch, optical centre and field frequencies of geo and img.FreqsLPMM
// (placeFrame): it places every record in the field (place), sets the
// stars' and gratings' image heights and groups the gratings into records,
// orders the records by image height and numbers them, compares the stars
// with the edges, checks the chart's set-up, sets the warnings (base, then
// derivedWarnings) and summarises the frame. Run ends with it and
// Resummarise repeats it on a copy cleared of its results (clearSummary),
// so that the two give the same numbers.
func summarise(img *Image, geo field.Geometry, base []note.Note) error {
	for i := range img.Stars {
		img.Stars[i].HeightMM = geo.HeightMM(img.Stars[i].XPx, img.Stars[i].YPx)
	}
	img.Measurements = append(img.Measurements, gratingRecords(img, geo)...)
	if len(img.Measurements) == 0 {
		return errNoRecords
	}
	for i := range img.Measurements {
		place(&img.Measurements[i], geo, img.FreqsLPMM)
	}
	sort.SliceStable(img.Measurements, func(a, b int) bool {
		return img.Measurements[a].HeightMM < img.Measurements[b].HeightMM
	})
	for i := range img.Measurements {
		img.Measurements[i].ID = i + 1
	}
	agreement(img)
	if img.Chart != nil {
		if err := checkSetup(img); err != nil {
			return err
		}
	}
	img.Warnings, img.WarningCodes = note.Split(append(slices.Clip(base), derivedWarnings(img)...))
	sum, err := field.Summarise(geo, fieldPoints(img.Measurements), img.FreqsLPMM)
	img.Summary = SummaryOf(sum)
	return err
}

// place sets what a record's numbers become in the field of geo: its image
// height, its orientation and angle to the radius (from its direction of
// measurement), its MTF50, MTF50P and value at Nyquist (cycles/pixel), its
// MTF50 in lp/mm, and its MTF at the field frequencies freqs (lp/mm). All
// come from the record's position, direction and curve; a sine pattern's
// figures only where its curve was measured (MeasuredCyPx), NaN elsewhere.
func place(m *Measurement, geo field.Geometry, freqs []float64) {
	c := curve.Curve{Freq: m.Freq, Value: m.MTF}
	lo, hi := math.Inf(-1), math.Inf(1)
	if m.MeasuredCyPx != nil {
		lo, hi = m.MeasuredCyPx[0], m.MeasuredCyPx[1]
	}
	inRange := func(f float64) Number {
		if f >= lo && f <= hi {
			return Number(f)
		}
		return Number(math.NaN())
	}
	m.HeightMM = geo.HeightMM(m.XPx, m.YPx)
	var ang float64
	m.Orientation, ang = geo.Classify(m.XPx, m.YPx, m.NormalDeg)
	m.RadiusAngleDeg = Number(ang)
	m.MTF50 = inRange(c.MTF50())
	m.MTF50P = inRange(c.MTF50P())
	m.MTFNyquist = Number(c.AtNyquist())
	m.MTF50LPMM = Number(curve.LPPerMM(float64(m.MTF50), geo.PitchUM))
	m.MTFAtFreqs = make([]Number, len(freqs))
	for k, f := range freqs {
		fc := curve.CyPerPx(f, geo.PitchUM)
		v := math.NaN()
		if fc >= lo && fc <= hi {
			v = c.At(fc)
		}
		m.MTFAtFreqs[k] = Number(v)
	}
}

// derivedWarnings are the image's warnings that summarise derives, in this
// order: the chart's set-up checks, the disagreement of stars and edges,
// and the lack of any edge. The image's other warnings (the file's, the
// chart search's) come before them.
func derivedWarnings(img *Image) []note.Note {
	var w []note.Note
	if img.Chart != nil {
		s := img.Chart.Setup
		for i, t := range s.Warnings {
			c := ""
			if i < len(s.WarningCodes) {
				c = s.WarningCodes[i]
			}
			w = append(w, note.New(note.Code(c), t))
		}
	}
	if d, ok := disagreement(img.Agreement); ok {
		w = append(w, d)
	}
	edges := false
	for _, m := range img.Measurements {
		edges = edges || m.Kind == "edge"
	}
	if !edges {
		w = append(w, note.New(note.NoEdges, noEdgeWarning))
	}
	return w
}

// fieldPoints converts measurements into the field package's points for the
// summaries: position, height, orientation, MTF at the field frequencies
// and MTF50 in cycles/pixel (NaN where not measured).
func fieldPoints(ms []Measurement) []field.Point {
	pts := make([]field.Point, len(ms))
	for i, m := range ms {
		p := field.Point{
			ID: m.ID, Kind: m.Kind, X: m.XPx, Y: m.YPx, HeightMM: m.HeightMM,
			Orientation: m.Orientation, MTF50: float64(m.MTF50),
			MTF: make([]float64, len(m.MTFAtFreqs)),
		}
		for k, v := range m.MTFAtFreqs {
			p.MTF[k] = float64(v)
		}
		if math.IsInf(p.MTF50, 0) {
			p.MTF50 = math.NaN()
		}
		pts[i] = p
	}
	return pts
}

// notes returns the image's warnings with their codes; false when the
// codes do not match the warnings (a result changed by hand).
func (img *Image) notes() ([]note.Note, bool) {
	return note.Join(img.Warnings, img.WarningCodes)
}

// warn adds a warning with its code.
func (img *Image) warn(n note.Note) {
	img.Warnings = append(img.Warnings, n.Text)
	img.WarningCodes = append(img.WarningCodes, string(n.Code))
}
