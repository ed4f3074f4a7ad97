package field

import (
	"fmt"
	"math"

	"sagitta/core/note"
)

// CurveSamples is the number of heights at which a smooth curve is sampled.
const CurveSamples = 41

// MinCurvePoints is the fewest measurements of one orientation that make a
// field curve; fewer give points only.
const MinCurvePoints = 6

// NotableGap is the practical floor for a difference in MTF (0..1) worth
// reporting: smaller differences are not shown as findings even when they
// are statistically clear. 0.03 is about the scatter between repeated
// home measurements of one edge (common practice).
const NotableGap = 0.03

// NotableSE is how many standard errors a difference must exceed to be
// reported as a finding (2.5, a two-sided false-alarm rate of about 1 %
// per comparison for normal errors).
const NotableSE = 2.5

// orientations are the two orientations that get curves, in output order.
var orientations = [2]Orientation{Sagittal, Tangential}

// fitted is one smooth curve and the points behind it.
type fitted struct {
	sm    *smooth
	idx   []int // summary point index of each smoother datum (sorted by height)
	curve Curve
}

// fitSet holds the fits of a summary: per orientation, one per field
// frequency (nil where there were too few points) and one of MTF50.
type fitSet struct {
	mtf   [2][]*fitted
	mtf50 [2]*fitted
	pos   [2][][]int // pos[o][k][i]: datum of point i in mtf[o][k], -1 if none
}

// weight returns the robustness weight of point i in the field curve of its
// orientation at frequency k, or NaN if it is not in one.
func (fs *fitSet) weight(i, k int) float64 {
	for o := range orientations {
		if f := fs.mtf[o][k]; f != nil {
			if j := fs.pos[o][k][i]; j >= 0 {
				return f.sm.rw[j]
			}
		}
	}
	return math.NaN()
}

// fieldCurves fits the field curves and MTF50 curves of pts (sorted by
// height) and stores them in s.
func (s *Summary) fieldCurves(pts []Point) *fitSet {
	fs := &fitSet{}
	for o, or := range orientations {
		fs.mtf[o] = make([]*fitted, len(s.FreqsLPMM))
		fs.pos[o] = make([][]int, len(s.FreqsLPMM))
		for k, f := range s.FreqsLPMM {
			fs.pos[o][k] = make([]int, len(pts))
			fit := fitCurve(pts, or, func(p Point) float64 { return p.MTF[k] })
			if fit == nil {
				s.Warnings = append(s.Warnings, fmt.Sprintf("no %s field curve at %s lp/mm: fewer than %d %s measurements over a range of heights", or, fmtNum(f), MinCurvePoints, or))
				s.WarningCodes = append(s.WarningCodes, string(note.NoFieldCurve))
			} else {
				fit.curve.Quantity, fit.curve.FreqLPMM = "mtf", f
				s.Curves = append(s.Curves, fit.curve)
			}
			fs.mtf[o][k] = fit
			for i := range fs.pos[o][k] {
				fs.pos[o][k][i] = -1
			}
			if fit != nil {
				for j, i := range fit.idx {
					fs.pos[o][k][i] = j
				}
			}
		}
		mm := s.PitchUM / 1000
		fit := fitCurve(pts, or, func(p Point) float64 { return p.MTF50 / mm })
		if fit != nil {
			fit.curve.Quantity = "mtf50_lp_mm"
			s.MTF50Curves = append(s.MTF50Curves, fit.curve)
		}
		fs.mtf50[o] = fit
	}
	// Order Curves by frequency, then orientation.
	ordered := make([]Curve, 0, len(s.Curves))
	for _, f := range s.FreqsLPMM {
		for _, or := range orientations {
			for _, c := range s.Curves {
				if c.FreqLPMM == f && c.Orientation == or {
					ordered = append(ordered, c)
				}
			}
		}
	}
	s.Curves = ordered
	return fs
}

// fitCurve fits the points of orientation or whose value is finite, or
// returns nil when there are fewer than MinCurvePoints or they all lie at
// one height.
func fitCurve(pts []Point, or Orientation, value func(Point) float64) *fitted {
	var x, y []float64
	var idx []int
	for i, p := range pts {
		if p.Orientation != or {
			continue
		}
		if v := value(p); finite(v) {
			x, y, idx = append(x, p.HeightMM), append(y, v), append(idx, i)
		}
	}
	if len(x) < MinCurvePoints || !(x[len(x)-1] > x[0]) {
		return nil
	}
	sm := newSmooth(x, y) // x is already sorted: the order, and idx, stay
	sm.chooseSpan(Spans, Degrees, RobustIterations)
	c := Curve{
		Orientation: or, Points: len(x),
		HMinMM: x[0], HMaxMM: x[len(x)-1],
		Span: sm.span, Degree: sm.degree, ResidualSD: sm.sigma,
	}
	c.HeightMM = sampleHeights(c.HMinMM, c.HMaxMM)
	for _, h := range c.HeightMM {
		v, se := sm.at(h)
		c.Value = append(c.Value, Number(v))
		c.BandLo = append(c.BandLo, Number(v-2*se))
		c.BandHi = append(c.BandHi, Number(v+2*se))
	}
	return &fitted{sm: sm, idx: idx, curve: c}
}

// sampleHeights returns CurveSamples heights evenly spaced over [lo, hi].
func sampleHeights(lo, hi float64) []float64 {
	h := make([]float64, CurveSamples)
	for i := range h {
		h[i] = lo + (hi-lo)*float64(i)/float64(CurveSamples-1)
	}
	h[CurveSamples-1] = hi
	return h
}

// Astigmatism is the sagittal minus the tangential field curve at one field
// frequency, over the heights both curves cover.
type Astigmatism struct {
	// FreqLPMM is the field frequency, lp/mm.
	FreqLPMM float64
	// HeightMM are the sample heights, mm, over the common range of the two
	// curves; Gap is sagittal minus tangential MTF there, BandLo and BandHi
	// the gap minus and plus two standard errors (the two curves' errors
	// combined as independent).
	HeightMM []float64
	Gap      []Number
	BandLo   []Number
	BandHi   []Number
	// MaxGap is the gap of largest size (signed: positive = sagittal
	// higher), MaxGapHeightMM where it occurs, MaxGapSE its standard error.
	MaxGap         float64
	MaxGapHeightMM float64
	MaxGapSE       float64
	// Notable is true when the largest gap exceeds both NotableSE standard
	// errors and NotableGap.
	Notable bool
	// Text says it in words first, numbers second.
	Text string
	// Caution is the set-up caution that belongs with this result.
	Caution string
}

// astigmatismCaution goes with every astigmatism result.
const astigmatismCaution = "Focus a little in front of or behind the chart, or a chart that is not flat, moves sagittal and tangential sharpness apart too. Refocus, check the chart, and repeat before calling it astigmatism."

// astigmatism differences the sagittal and tangential fits at each field
// frequency.
func astigmatism(fs *fitSet, freqs []float64) []Astigmatism {
	out := []Astigmatism{}
	for k, f := range freqs {
		sf, tf := fs.mtf[0][k], fs.mtf[1][k]
		if sf == nil || tf == nil {
			continue
		}
		lo := math.Max(sf.curve.HMinMM, tf.curve.HMinMM)
		hi := math.Min(sf.curve.HMaxMM, tf.curve.HMaxMM)
		if !(hi > lo) {
			continue
		}
		a := Astigmatism{FreqLPMM: f, HeightMM: sampleHeights(lo, hi), MaxGapHeightMM: math.NaN()}
		for _, h := range a.HeightMM {
			vs, ses := sf.sm.at(h)
			vt, set := tf.sm.at(h)
			g, se := vs-vt, math.Hypot(ses, set)
			a.Gap = append(a.Gap, Number(g))
			a.BandLo = append(a.BandLo, Number(g-2*se))
			a.BandHi = append(a.BandHi, Number(g+2*se))
			if math.IsNaN(a.MaxGapHeightMM) || math.Abs(g) > math.Abs(a.MaxGap) {
				a.MaxGap, a.MaxGapHeightMM, a.MaxGapSE = g, h, se
			}
		}
		a.Notable = math.Abs(a.MaxGap) > NotableSE*a.MaxGapSE && math.Abs(a.MaxGap) >= NotableGap
		a.Text, a.Caution = astigmatismText(a), astigmatismCaution
		out = append(out, a)
	}
	return out
}

// astigmatismText words an astigmatism result: the finding, then the numbers.
func astigmatismText(a Astigmatism) string {
	lower := "tangential"
	if a.MaxGap < 0 {
		lower = "sagittal"
	}
	nums := fmt.Sprintf("%.3f +/- %.3f, one standard error", math.Abs(a.MaxGap), a.MaxGapSE)
	if a.Notable {
		return fmt.Sprintf("Sagittal and tangential detail differ at %s lp/mm: %s detail is softer, most at %.1f mm from the optical centre, by %.2f (%s). A gap like this is astigmatism, or the chart or the focus not being flat across the frame.",
			fmtNum(a.FreqLPMM), lower, a.MaxGapHeightMM, math.Abs(a.MaxGap), nums)
	}
	why := "within the measurement uncertainty"
	if math.Abs(a.MaxGap) > NotableSE*a.MaxGapSE {
		why = fmt.Sprintf("below %.2f, too small to matter", NotableGap)
	}
	return fmt.Sprintf("Sagittal and tangential detail agree at %s lp/mm: the largest gap, %.2f at %.1f mm from the optical centre, is %s (%s).",
		fmtNum(a.FreqLPMM), math.Abs(a.MaxGap), a.MaxGapHeightMM, why, nums)
}

// fmtNum formats a frequency or height without trailing zeros.
func fmtNum(v float64) string { return fmt.Sprintf("%g", math.Round(v*100)/100) }
