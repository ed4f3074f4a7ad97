package analyze

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"

	"sagitta/core/curve"
	"sagitta/core/edge"
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
		diffractionCheck(&img.Measurements[i], img)
	}
	sort.SliceStable(img.Measurements, func(a, b int) bool {
		return img.Measurements[a].HeightMM < img.Measurements[b].HeightMM
	})
	for i := range img.Measurements {
		img.Measurements[i].ID = i + 1
	}
	img.LateralCA = lateralCA(img, geo) // colour fringes (fringes.go)
	agreement(img)
	if img.Chart != nil {
		if err := checkSetup(img); err != nil {
			return err
		}
	}
	summariseGeometry(img, geo) // distortion and fall-off (geometry.go)
	img.Exposure = exposureAdvice(img)
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
	m.MTFAtFreqsSE = make([]Number, len(freqs))
	var se curve.Curve
	if len(m.StdErr) == len(m.Freq) {
		se = curve.Curve{Freq: m.Freq, Value: m.StdErr}
	}
	for k, f := range freqs {
		fc := curve.CyPerPx(f, geo.PitchUM)
		v, e := math.NaN(), math.NaN()
		if fc >= lo && fc <= hi {
			v = c.At(fc)
			if se.Freq != nil {
				e = se.At(fc)
			}
		}
		m.MTFAtFreqs[k] = Number(v)
		m.MTFAtFreqsSE[k] = Number(e)
	}
	m.MTF50SE = Number(math.NaN())
	if se.Freq != nil && finite(float64(m.MTF50)) {
		m.MTF50SE = Number(c.MTF50SE(m.StdErr))
	}
}

// diffractionCheck sets or clears the sign "above-diffraction-limit" of an
// edge record (and with the signs the flag "sharpened" and its warning)
// for the image's pitch and its Exif f-number, when the pitch is not a
// guess (see edge.Sharpening). It is idempotent, so Resummarise gives what
// Run gives.
func diffractionCheck(m *Measurement, img *Image) {
	if m.Kind != "edge" || m.Sharpening == nil {
		return
	}
	sh := new(Sharpening) // a copy: Resummarise must not change its input
	*sh = *m.Sharpening
	m.Sharpening = sh
	signs := sh.Signs[:0:0]
	for _, s := range sh.Signs {
		if s != edge.SignDiffraction {
			signs = append(signs, s)
		}
	}
	if !img.PitchAssumed &&
		edge.AboveDiffraction(curve.Curve{Freq: m.Freq, Value: m.MTF}, m.StdErr, m.NormalDeg, img.Exif.FNumber, img.PitchUM) {
		signs = append(signs, edge.SignDiffraction)
	}
	sh.Signs = signs
	flag := string(edge.FlagSharpened)
	flags, warns := m.Flags[:0:0], m.Warnings[:0:0]
	for _, f := range m.Flags {
		if f != flag {
			flags = append(flags, f)
		}
	}
	for _, w := range m.Warnings {
		if !strings.HasPrefix(w, flagText[edge.FlagSharpened]) {
			warns = append(warns, w)
		}
	}
	if len(signs) > 0 {
		flags = append(flags, flag)
		warns = append(warns, sharpenedText(sh.MTF50Lift))
	}
	m.Flags, m.Warnings = flags, warns
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

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
	if a := img.Exposure; a != nil {
		w = append(w, note.New(note.Code(a.Code), a.Text))
	}
	return w
}

// ExposureAdvice is one sentence of advice on the photo's exposure, with a
// code for programs.
type ExposureAdvice struct {
	// Code is "overexposed" or "underexposed".
	Code string `json:"code"`
	// Stops is the suggested change of exposure, in stops (negative:
	// darker).
	Stops float64 `json:"stops"`
	// Text is the advice in words (it is also among the image's warnings).
	Text string `json:"text"`
}

// Exposure thresholds. The paper (the chart's white) should sit near 80 %
// of full scale in the file's values, sRGB code 0.8, linear 0.604 (IEC
// 61966-2-1 transfer function): bright enough for a good signal-to-noise
// ratio, with room for the edge's light side (common practice).
const (
	paperTarget = 0.604 // linear level of 80 % of full scale in sRGB code values
	paperHigh   = 0.95  // a median paper level (linear) above this counts as at the top
	paperLow    = 0.15  // below this (sRGB code 0.42) as dark
	noisySNR    = 20    // a median edge SNR below this counts as noisy
)

// exposureAdvice advises on the exposure when most edges are clipped or at
// the limit of the file's values, or the paper is near it (overexposed), or
// the paper is dark or the edges noisy (underexposed); nil otherwise. The
// stops are log2 of the paper's level over paperTarget, rounded to half
// stops; where most edges were clipped the paper's true level is unknown
// and the figure is a least one.
func exposureAdvice(img *Image) *ExposureAdvice {
	var light, snr []float64
	atLimit, clipped := 0, 0
	for _, m := range img.Measurements {
		if m.Kind != "edge" {
			continue
		}
		light = append(light, m.LightLinear)
		snr = append(snr, float64(m.SNR))
		if slices.Contains(m.Flags, string(edge.FlagAtLimit)) {
			atLimit++
		}
	}
	for _, r := range img.Rejected {
		if strings.HasPrefix(r.Reason, clippedReason) {
			clipped++
		}
	}
	n := len(light) + clipped
	if n == 0 {
		return nil
	}
	paper := median(light)
	half := func(x float64) float64 { return math.Max(0.5, math.Ceil(2*x-0.25)/2) }
	if 2*clipped > n || 2*(clipped+atLimit) > n || paper > paperHigh {
		level := paper
		if 2*clipped > n || math.IsNaN(level) {
			level = 1
		}
		stops := half(math.Log2(level / paperTarget))
		least := "about "
		if 2*clipped > n {
			least = "at least "
		}
		return &ExposureAdvice{Code: string(note.Overexposed), Stops: -stops, Text: fmt.Sprintf(
			"The paper is at the top of the file's values: shoot %s%s darker (the paper should sit near 80 %% of full scale; common practice).",
			least, stopWords(stops))}
	}
	if paper < paperLow || median(snr) < noisySNR {
		stops := half(math.Log2(paperTarget / paper))
		if paper >= paperLow {
			stops = 0.5
		}
		return &ExposureAdvice{Code: string(note.Underexposed), Stops: stops, Text: fmt.Sprintf(
			"The paper is dark or the edges are noisy in the file (paper at %.0f %% of full scale): shoot about %s brighter, with more light rather than a higher ISO (the paper should sit near 80 %% of full scale; common practice).",
			100*srgbCode(paper), stopWords(stops))}
	}
	return nil
}

// stopWords writes a number of stops: "half a stop", "1 stop", "1.5 stops".
func stopWords(x float64) string {
	switch x {
	case 0.5:
		return "half a stop"
	case 1:
		return "1 stop"
	}
	return strconv.FormatFloat(x, 'f', -1, 64) + " stops"
}

// srgbCode is the sRGB code value (0..1) of linear level l (IEC 61966-2-1).
func srgbCode(l float64) float64 {
	if l <= 0.0031308 {
		return 12.92 * l
	}
	return 1.055*math.Pow(l, 1/2.4) - 0.055
}

// median returns the median of v (NaN when empty); v is not changed.
func median(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	w := slices.Clone(v)
	sort.Float64s(w)
	if len(w)%2 == 1 {
		return w[len(w)/2]
	}
	return 0.5 * (w[len(w)/2-1] + w[len(w)/2])
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
