// Package edge measures the spatial frequency response (SFR, the system MTF)
// of a camera from the image of one straight, slanted edge: the e-SFR method
// of ISO 12233 (ISO 12233:2017, Photography - Electronic still picture
// imaging - Resolution and spatial frequency responses, edge-based SFR annex;
// method due to P. D. Burns, "Slanted-edge MTF for digital camera and
// scanner analysis", Proc. IS&T PICS 2000, pp. 135-138).
//
// Two estimators share the region handling, the edge fit used for geometry
// and the quality checks:
//
//   - ISO follows the published procedure step by step (per-line centroid
//     of the windowed derivative, line fit, whole phase cycles, 4x binning,
//     central-difference derivative, Hamming window, DFT, correction for the
//     derivative filter); see iso.go.
//   - Refined (the default) is Sagitta's own estimator; see refined.go for
//     what it does differently and why.
//
// All frequencies are cycles/pixel along the edge normal; curves run from 0
// to Options.MaxFreq.
package edge

import (
	"errors"
	"fmt"
	"math"

	"sagitta/core/curve"
	"sagitta/core/plane"
)

// Method selects the estimator.
type Method int

const (
	// Refined is Sagitta's own estimator (the default).
	Refined Method = iota
	// ISO is the published ISO 12233 e-SFR procedure.
	ISO
)

// String returns the method's name as used on the command line and in JSON.
func (m Method) String() string {
	if m == ISO {
		return "iso"
	}
	return "refined"
}

// ParseMethod accepts "refined" (or "") and "iso".
func ParseMethod(s string) (Method, error) {
	switch s {
	case "", "refined":
		return Refined, nil
	case "iso":
		return ISO, nil
	}
	return Refined, fmt.Errorf("edge: unknown method %q (want refined or iso)", s)
}

// Options controls a measurement. The zero value is ready to use.
type Options struct {
	Method   Method
	FreqStep float64 // spacing of the output curve, cycles/pixel (default 0.01)
	MaxFreq  float64 // highest frequency of the output curve, cycles/pixel (default 1)
	// FNumber and PitchUM, when both are known (> 0), let the sharpening
	// check compare the curve with the diffraction limit (sharpen.go).
	FNumber, PitchUM float64
}

func (o Options) grid() []float64 {
	step, top := o.FreqStep, o.MaxFreq
	if step <= 0 {
		step = 0.01
	}
	if top <= 0 {
		top = 1
	}
	n := int(math.Round(top/step)) + 1
	f := make([]float64, n)
	for i := range f {
		f[i] = float64(i) * step
	}
	return f
}

// Flag is a quality warning attached to a measurement.
type Flag string

// Quality flags. Each marks a condition under which the measured curve may
// mislead; thresholds are documented in quality.go.
const (
	FlagClippedDark  Flag = "clipped-dark"   // the dark side lost signal below the bottom code value (see judgeClip)
	FlagClippedLight Flag = "clipped-light"  // the light side lost signal above full scale (see judgeClip)
	FlagAtLimit      Flag = "at-limit"       // a plateau sits at a limit of the file's values without loss (a caution)
	FlagLowContrast  Flag = "low-contrast"   // light/dark ratio below 1.5
	FlagShortEdge    Flag = "short-edge"     // fewer than 40 px of edge length
	FlagCurved       Flag = "curved-edge"    // the edge bows by more than 0.5 px over the region
	FlagCritical     Flag = "critical-angle" // the slant samples the edge profile coarsely
	FlagNoisy        Flag = "noisy"          // step below 20x the noise rms
	FlagSharpened    Flag = "sharpened"      // physical signs of sharpening beyond the noise (sharpen.go)
)

// Profile is a sampled curve across the edge: X in px along the normal
// (0 at the edge, positive on the light side), V normalised so that the dark
// plateau is 0 and the light plateau 1 (ESF) or the peak is 1 (LSF).
type Profile struct {
	X []float64
	V []float64
}

// Measurement is the result of measuring one edge.
type Measurement struct {
	Method    string
	Curve     curve.Curve
	X         float64 // point on the fitted edge at the region centre, px
	Y         float64 //
	NormalDeg float64 // direction of the edge normal, dark to light, degrees in [0, 360)
	SlantDeg  float64 // angle between the edge line and the nearest pixel axis, degrees
	LengthPx  float64 // length of edge measured, px
	Dark      float64 // plateau levels, linear
	Light     float64 //
	NoiseRMS  float64 // rms noise on the plateaus, linear
	SNR       float64 // (Light - Dark) / NoiseRMS
	BowPx     float64 // deviation of the edge from a straight line over the region, px
	PhasePx   float64 // effective spacing of the edge profile's samples, px
	Overshoot float64 // largest excursion of the edge profile beyond its plateaus, fraction of the step
	// SE is the standard error of each Curve value from the plateau noise
	// (refined: propagated through the transform, see stieltjes; iso: the
	// same propagation through its bins and window).
	SE []float64
	// Sharpening holds the physical signs of sharpening found on the edge
	// (sharpen.go); Signs is empty when none was found.
	Sharpening Sharpening
	ESF        Profile
	LSF        Profile
	Flags      []Flag

	// The fitted edge in the region's frame, kept for ChannelOffset.
	fit     lineFit
	flipped bool
	region  Region
}

// ErrNoEdge is returned when a region holds no measurable straight edge.
var ErrNoEdge = errors.New("edge: no straight edge found in the region")

// Measure measures the edge in region r of the linear plane p.
func Measure(p *plane.Plane, r Region, opt Options) (*Measurement, error) {
	if r.HalfLen < 5 || r.HalfWidth < 4 {
		return nil, fmt.Errorf("edge: region too small (%.0f x %.0f px)", 2*r.HalfLen, 2*r.HalfWidth)
	}
	sc := getScratch()
	m, err := measure(p, r, opt, sc)
	putScratch(sc) // not reached on a panic: see getScratch
	return m, err
}

// measure is Measure with the working memory sc.
func measure(p *plane.Plane, r Region, opt Options, sc *scratch) (*Measurement, error) {
	s := gatherInto(p, r, nil, sc)
	fit, ok := fitEdge(s, r.HalfLen, r.HalfWidth)
	if !ok || fit.Step == 0 {
		return nil, ErrNoEdge
	}
	flipped := orient(&fit, &s)
	s.dists(fit) // computed once for the estimator and the checks
	m := &Measurement{Method: opt.Method.String(), fit: fit, flipped: flipped, region: r}
	geometry(m, r, fit, s, flipped)
	freq := opt.grid()
	sides := s.plateauSides(coreWidth(fit))
	nDark, nLight := pairNoise(p, r, &s, sides)
	shape := measureNoiseShape(p, r, flipped, &s, sides)
	nDark *= shape.sdScale()
	nLight *= shape.sdScale()
	var err error
	switch opt.Method {
	case ISO:
		err = measureISO(m, p, r, freq, math.Sqrt(0.5*(nDark*nDark+nLight*nLight)), shape)
	default:
		err = measureRefined(m, fit, s, freq, nDark, nLight, shape)
	}
	if err != nil {
		return nil, err
	}
	assess(m, s, fit, nDark, nLight)
	judgeSharpening(m, s, fit, nDark, nLight, opt)
	if len(m.Sharpening.Signs) > 0 {
		m.Flags = append(m.Flags, FlagSharpened)
	}
	return m, nil
}

// orient makes the fitted step rise with w: where the image gets darker
// across the region, w is mirrored (and the fit with it), so that distances
// are positive on the light side everywhere below. It reports whether it
// mirrored.
func orient(f *lineFit, s *samples) bool {
	if f.Step > 0 {
		return false
	}
	for i := range s.w {
		s.w[i] = -s.w[i]
	}
	f.Rho, f.Alpha, f.Kappa = -f.Rho, -f.Alpha, -f.Kappa
	f.Dark, f.Step = f.Dark+f.Step, -f.Step
	return true
}

// geometry fills the position, direction and length of the fitted edge;
// flipped says whether orient mirrored the region's normal.
func geometry(m *Measurement, r Region, f lineFit, s samples, flipped bool) {
	tx, ty, nx, ny := r.axes()
	if flipped {
		nx, ny = -nx, -ny
	}
	// The edge crosses u = 0 at w = Rho along the (possibly mirrored) normal.
	m.X = r.X + f.Rho*nx
	m.Y = r.Y + f.Rho*ny
	// Direction of the normal after the fitted slope: n' ~ n - Alpha*t'
	// where t' is the edge direction consistent with the mirrored frame.
	ex, ey := tx+f.Alpha*nx, ty+f.Alpha*ny
	l := math.Hypot(ex, ey)
	ex, ey = ex/l, ey/l
	// The normal is perpendicular to the edge and points to the light side.
	px, py := -ey, ex
	if px*nx+py*ny < 0 {
		px, py = -px, -py
	}
	m.NormalDeg = math.Mod(math.Atan2(py, px)*180/math.Pi+360, 360)
	a := math.Mod(m.NormalDeg, 90)
	m.SlantDeg = math.Min(a, 90-a)
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, u := range s.u {
		lo, hi = min(lo, u), max(hi, u)
	}
	m.LengthPx = hi - lo + 1
	m.BowPx = math.Abs(f.Kappa) * r.HalfLen * r.HalfLen
}
