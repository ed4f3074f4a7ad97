package field

import (
	"fmt"
	"math"
	"sort"
)

// Point is one measurement as the field summaries see it: where it is, how
// it is oriented, and its response at the summary frequencies. Package
// analyze converts its measurements into Points; field does not depend on
// analyze.
type Point struct {
	ID          int         // the measurement's id in the photo's result
	Kind        string      // "edge" or "star"
	X, Y        float64     // position in the photo, px (x right, y down)
	HeightMM    float64     // image height, mm from the optical centre
	Orientation Orientation // sagittal, tangential or mixed
	MTF         []float64   // MTF at the summary frequencies, in their order; NaN = not measured
	MTF50       float64     // MTF50, cycles/pixel; NaN = not reached in the measured range
}

// Summary describes a photo's sharpness across the frame: field curves, the
// MTF50 map, astigmatism and the balance between opposite parts of the
// frame, with the cautions that every reading of them needs. Its JSON form
// is what the page and the command-line tool render.
type Summary struct {
	// FreqsLPMM are the field frequencies, lp/mm on the sensor, in the order
	// of every per-frequency list below.
	FreqsLPMM []float64
	// PitchUM is the pixel pitch, micrometres.
	PitchUM float64
	// CentrePx is the optical centre, px.
	CentrePx [2]float64
	// WidthPx and HeightPx are the photo's size, px.
	WidthPx  int
	HeightPx int
	// CornerMM is the image height of the farthest frame corner, mm: the
	// right end of every height axis.
	CornerMM float64
	// Smoother names the method behind every smooth curve.
	Smoother string
	// Points are the measurements, as used by every part of the summary.
	Points []SummaryPoint
	// Curves holds the field curves: MTF at each field frequency against
	// image height, one per orientation (sagittal, tangential) and frequency,
	// ordered by frequency then orientation. A curve is absent when its
	// orientation has too few points (see Warnings).
	Curves []Curve
	// MTF50Curves holds MTF50 (lp/mm) against image height, one per
	// orientation.
	MTF50Curves []Curve
	// Astigmatism holds sagittal minus tangential MTF against image height,
	// one per field frequency at which both curves exist.
	Astigmatism []Astigmatism
	// Map is MTF50 over the frame on a grid; nil without measurements.
	Map *Map
	// Balance compares opposite halves and quadrants of the frame.
	Balance Balance
	// Zones are the centre, mid-field and corner thirds of the image height
	// with their median MTF at each field frequency (all orientations,
	// sagittal, tangential): the numbers of the page's Compare table.
	Zones []Zone
	// Cautions are the set-up cautions to show beside any verdict.
	Cautions []string
	// Warnings say what could not be summarised and why; WarningCodes
	// are their codes, aligned (core/note).
	Warnings     []string
	WarningCodes []string
}

// SummaryPoint is a measurement in the summary: its place, orientation and
// values, and how much the smoother trusted it.
type SummaryPoint struct {
	ID          int
	Kind        string // "edge" or "star"
	XPx         float64
	YPx         float64
	HeightMM    float64
	Orientation Orientation
	// MTF is the response at each field frequency (null = not measured).
	MTF []Number
	// MTF50LPMM is MTF50 in lp/mm (null = not reached).
	MTF50LPMM Number
	// Weight is the robustness weight (0..1) the field curve at each field
	// frequency gave the point: 0 means it was treated as an outlier. Null
	// for mixed points, which are not in any curve.
	Weight []Number
}

// Curve is a smooth curve of one quantity against image height, sampled
// only over the heights that were measured: it covers [HMinMM, HMaxMM], the
// range of its points, and is never extrapolated towards the centre or the
// corner.
type Curve struct {
	// Orientation is sagittal or tangential.
	Orientation Orientation
	// Quantity is "mtf" (MTF at FreqLPMM) or "mtf50_lp_mm" (MTF50 in lp/mm).
	Quantity string
	// FreqLPMM is the field frequency for Quantity "mtf"; 0 otherwise.
	FreqLPMM float64
	// Points is the number of measurements the curve was fitted to.
	Points int
	// HMinMM and HMaxMM are the smallest and largest image height of those
	// measurements, mm: the curve's extent.
	HMinMM float64
	HMaxMM float64
	// Span is the fraction of the points in each local fit and Degree the
	// degree of the local polynomial (1 line, 2 parabola), both chosen by
	// cross-validation.
	Span   float64
	Degree int
	// ResidualSD is the robust standard deviation of the points about the
	// curve: the spread between repeated measurements at one height.
	ResidualSD float64
	// HeightMM are the sample heights, mm, evenly spaced over
	// [HMinMM, HMaxMM]; Value the curve there; BandLo and BandHi the curve
	// minus and plus two standard errors (about a 95 % pointwise band for
	// the curve, not for single measurements, smoothing bias not included).
	HeightMM []float64
	Value    []Number
	BandLo   []Number
	BandHi   []Number
}

// Summarise builds the summary of a photo's measurements. freqsLPMM are the
// field frequencies (lp/mm) at which every Point carries its MTF. Points
// whose height is not finite are ignored. It returns an error for an
// unusable geometry, a frequency that is not positive, or a point whose MTF
// list does not match freqsLPMM.
func Summarise(geo Geometry, points []Point, freqsLPMM []float64) (*Summary, error) {
	if err := geo.Validate(); err != nil {
		return nil, err
	}
	for _, f := range freqsLPMM {
		if !(f > 0) || math.IsInf(f, 0) {
			return nil, fmt.Errorf("field: field frequency %g lp/mm is not positive and finite", f)
		}
	}
	s := &Summary{
		FreqsLPMM: append([]float64{}, freqsLPMM...),
		PitchUM:   geo.PitchUM,
		CentrePx:  [2]float64{geo.CentreX, geo.CentreY},
		WidthPx:   geo.Width, HeightPx: geo.Height,
		CornerMM:     geo.CornerMM(),
		Smoother:     smootherName,
		Points:       []SummaryPoint{},
		Curves:       []Curve{},
		MTF50Curves:  []Curve{},
		Astigmatism:  []Astigmatism{},
		Cautions:     append([]string{}, Cautions...),
		Warnings:     []string{},
		WarningCodes: []string{},
	}
	pts := make([]Point, 0, len(points))
	for _, p := range points {
		if len(p.MTF) != len(freqsLPMM) {
			return nil, fmt.Errorf("field: point %d has %d MTF values for %d field frequencies", p.ID, len(p.MTF), len(freqsLPMM))
		}
		if !finite(p.HeightMM) || !finite(p.X) || !finite(p.Y) {
			continue
		}
		pts = append(pts, p)
	}
	sort.SliceStable(pts, func(a, b int) bool { return pts[a].HeightMM < pts[b].HeightMM })

	fits := s.fieldCurves(pts)
	s.Astigmatism = astigmatism(fits, freqsLPMM)
	s.Map = mtf50Map(geo, pts)
	s.Balance = balance(geo, pts, fits, freqsLPMM)
	s.Zones = zones(s.CornerMM, geo.PitchUM, pts, len(freqsLPMM))

	for i, p := range pts {
		sp := SummaryPoint{
			ID: p.ID, Kind: p.Kind, XPx: p.X, YPx: p.Y, HeightMM: p.HeightMM,
			Orientation: p.Orientation, MTF: numbers(p.MTF),
			MTF50LPMM: Number(p.MTF50 / (geo.PitchUM / 1000)),
			Weight:    make([]Number, len(freqsLPMM)),
		}
		for k := range freqsLPMM {
			sp.Weight[k] = Number(fits.weight(i, k))
		}
		s.Points = append(s.Points, sp)
	}
	return s, nil
}

// smootherName describes the method behind the smooth curves.
const smootherName = "LOWESS (Cleveland 1979): local lines with tricube weights, 2 bisquare robustness passes, span by cross-validation; band = curve +/- 2 standard errors"

// Cautions are shown with every verdict: home measurements are relative, and
// a set-up fault looks like a lens fault (common practice).
var Cautions = []string{
	"A chart that is not parallel to the sensor, missed focus, camera shake and uneven light all look like lens faults: check the set-up before blaming the lens.",
	"Repeat the shot (refocus, and turn the camera or the chart by 180 degrees) and see whether the pattern follows the lens before you draw a conclusion.",
	"These are relative measurements made at home. A repair or warranty decision belongs with the maker's service, which can test the lens properly.",
}
