package sine

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/dsp/fourier"
	"sagitta/core/curve"
	"sagitta/core/plane"
)

// StarGuess is the approximate place of a star: its centre and outer
// radius, px (from Find, or from a chart layout).
type StarGuess struct {
	X, Y, RadiusPx float64
}

// StarOptions tunes MeasureStar. The zero value uses the defaults.
type StarOptions struct {
	// Segments is the number of angular segments, a multiple of 4 from 4 to
	// 64 (default 8), so that segments centred on AlignDeg and AlignDeg +
	// 90 exist.
	Segments int
	// AlignDeg is the direction from the star's centre to the middle of
	// segment 0, degrees from +x towards +y. Pass the direction of the field
	// radius through the star so that segments lie exactly along and across
	// it (sagittal and tangential).
	AlignDeg float64
	// Cycles is the star's number of cycles N if known; 0 finds it.
	Cycles int
	// FreqStep is the spacing of the output curves, cycles/pixel (default 0.01).
	FreqStep float64
}

func (o StarOptions) withDefaults() (StarOptions, error) {
	if o.Segments == 0 {
		o.Segments = 8
	}
	if o.Segments < 4 || o.Segments > 64 || o.Segments%4 != 0 {
		return o, ArgumentError(fmt.Sprintf("%d segments: want a multiple of 4 from 4 to 64", o.Segments))
	}
	if o.Cycles < 0 || o.Cycles > 4096 {
		return o, ArgumentError(fmt.Sprintf("%d cycles is out of range", o.Cycles))
	}
	if o.FreqStep <= 0 {
		o.FreqStep = 0.01
	}
	if o.FreqStep > 0.1 || math.IsNaN(o.AlignDeg) || math.IsInf(o.AlignDeg, 0) {
		return o, ArgumentError("frequency step or alignment out of range")
	}
	return o, nil
}

// Flag is a quality warning attached to a star or a grating.
type Flag string

// Quality flags. Thresholds are the constants below; a flag asks the user
// to look, it does not discard the measurement.
const (
	FlagCentreUncertain Flag = "centre-uncertain"     // the centre's uncertainty exceeds 2 % of the Nyquist radius N/pi, or 0.25 px
	FlagAliased         Flag = "aliased"              // moire beyond Nyquist near the centre: the system passes detail it cannot sample
	FlagClipped         Flag = "clipped"              // pattern pixels at the file's limits
	FlagFewCycles       Flag = "few-cycles"           // stars: fewer than 2 cycles per segment, or modulation lost in noise below 0.25 cy/px; gratings: fewer than 4 cycles in the area
	FlagShortRange      Flag = "short-range"          // the measurement stops below Nyquist
	FlagNotSine         Flag = "not-sine"             // strong third harmonic: a bar pattern, or a tone curve that is not linear
	FlagNoisy           Flag = "noisy"                // the MTF's standard error exceeds 0.03 at mid frequencies
	FlagWeakReference   Flag = "weak-reference"       // the zero-frequency modulation rests on a long extrapolation (> 25 %), or none was possible
	FlagSharpened       Flag = "sharpened"            // the modulation rises with frequency at the largest ring: normalised there, reads low
	FlagDisagree        Flag = "disagrees-with-edges" // set by the caller when nearby edges measure otherwise
)

// Thresholds of the star flags.
const (
	maxFreqShift    = 0.02  // centre uncertainty / innermost radius
	maxAliasMod     = 0.10  // moire modulation inside the Nyquist radius, relative to the star's
	clipShare       = 0.005 // share of pattern pixels at a limit
	darkLimit       = 1e-6  // linear value at or below which a pixel sits at the bottom code
	maxThirdHarm    = 0.15  // third/first harmonic amplitude at the outer radius
	maxStdErr       = 0.03  // median standard error of the normalised MTF, 0.05..0.35 cy/px
	flagRefCorr     = 0.25  // an extrapolation that changes the reference by more is flagged
	maxRefRatio     = 2.0   // one that changes it by more than this factor is not used
	refBandCyPx     = 0.1   // width of the band above RefFreq used to extrapolate to 0
	minCellPixels   = 8     // fewest pixels in a ring segment at the innermost ring
	resolvedSE      = 3     // modulation below this many standard errors is not resolved
	minResolvedFreq = 0.25  // cy/px: a star resolved only below this has too few cycles resolved
	minStarRadius   = 12.0  // px
	minCycles       = 4     // fewest cycles accepted as a star
	minDominance    = 0.35  // share of a circle's AC power in the N-th harmonic
	centreFitMaxF   = 0.12  // cy/px: the centre fit uses rings below this frequency
	centreFitIters  = 3
)

// Segment is one angular segment of a star.
type Segment struct {
	// AngleDeg is the direction from the star's centre to the segment's
	// middle, degrees in [0, 360).
	AngleDeg float64
	// DirDeg is the direction of measurement: the direction in which the
	// pattern's contrast varies there, AngleDeg + 90, in [0, 180).
	DirDeg float64
	// Curve is the MTF on the output grid (see Star.RefFreq, Star.MaxFreq).
	Curve curve.Curve
	// StdErr is the standard error of each Curve value (0 below RefFreq).
	StdErr []float64
}

// Star is a measured sinusoidal Siemens star.
type Star struct {
	X, Y        float64 // centre, px
	CentreUncPx float64 // 1-sigma uncertainty of the centre, px
	Cycles      int     // N, cycles around the star
	RadiusPx    float64 // outer radius of the pattern (where its modulation halves), px
	InnerPx     float64 // smallest ring measured, px
	OuterPx     float64 // largest ring measured, px
	Mean        float64 // mean linear level over the measured rings
	Modulation  float64 // the star's modulation at zero frequency, M0 (extrapolated)
	OuterMod    float64 // the modulation at the largest ring (plain ISO-style reference)
	RefFreq     float64 // frequency of the largest ring, N / (2 pi OuterPx), cy/px
	MaxFreq     float64 // highest frequency measured, cy/px (at most 0.5)
	// ResolvedFreq is the frequency up to which the modulation stays above
	// 3 standard errors (MaxFreq when it never sinks into the noise).
	ResolvedFreq float64
	AlignDeg     float64 // direction of segment 0's middle, degrees
	// Dominance is the share of the AC power on a circle that lies in the
	// N-th harmonic (1 for a clean sinusoidal star).
	Dominance float64
	// ThirdHarmonic is the amplitude of harmonic 3N relative to N at the
	// outer radius (0 for a sine star, 1/3 for a bar star).
	ThirdHarmonic float64
	// AliasMod is the modulation of the moire inside the Nyquist radius,
	// relative to the star's (0 when the centre is smooth grey).
	AliasMod float64
	// NoiseRMS is the rms residual of the ring fits, linear units.
	NoiseRMS float64
	Segments []Segment
	// Rings are the raw full-circle values: frequency of each ring,
	// cy/px, ascending, and the modulation there divided by Modulation.
	RingFreq, RingMTF []float64
	Flags             []Flag
}

// MeasureStar measures the star near g in the linear plane p.
func MeasureStar(p *plane.Plane, g StarGuess, opt StarOptions) (*Star, error) {
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, err
	}
	if !(g.RadiusPx >= minStarRadius) || math.IsInf(g.RadiusPx, 0) || !(g.X >= 0 && g.Y >= 0 && g.X <= float64(p.W) && g.Y <= float64(p.H)) {
		return nil, ArgumentError(fmt.Sprintf("star guess (%.1f, %.1f) radius %.1f px is outside the image or too small", g.X, g.Y, g.RadiusPx))
	}
	R := g.RadiusPx
	// 1. Centre from the middle of the pattern (no N needed yet).
	c := fitCentre(p, g.X, g.Y, centreOpts{
		x0: int(g.X - R), y0: int(g.Y - R), x1: int(g.X + R), y1: int(g.Y + R),
		rMin: 0.3 * R, rMax: 0.8 * R, iters: centreFitIters,
	})
	if !c.ok || math.Hypot(c.x-g.X, c.y-g.Y) > 0.5*R {
		return nil, ErrNoStar
	}
	// 2. N from the angular spectrum on two circles.
	n, dom, third := opt.Cycles, 0.0, 0.0
	n1, d1, _ := circleHarmonic(p, c.x, c.y, 0.55*R, 0)
	n2, d2, t2 := circleHarmonic(p, c.x, c.y, 0.75*R, n1)
	if n == 0 {
		if n1 != n2 || n1 < minCycles {
			return nil, ErrNoStar
		}
		n = n1
	}
	dom, third = math.Min(d1, d2), t2
	if opt.Cycles == 0 && dom < minDominance {
		return nil, ErrNoStar
	}
	// 3. Outer radius from the harmonic's amplitude profile.
	rEdge, rOut, ok := outerRadius(p, c.x, c.y, n, R)
	if !ok {
		return nil, ErrNoStar
	}
	// 4. Centre again, over the rings below centreFitMaxF.
	lo := math.Max(0.3*rOut, float64(n)/(2*math.Pi*centreFitMaxF))
	hi := 0.9 * rOut
	if lo > 0.6*hi {
		lo = 0.5 * hi
	}
	c2 := fitCentre(p, c.x, c.y, centreOpts{
		x0: int(c.x - hi - 2), y0: int(c.y - hi - 2), x1: int(c.x + hi + 2), y1: int(c.y + hi + 2),
		rMin: lo, rMax: hi, iters: centreFitIters,
	})
	if c2.ok && math.Hypot(c2.x-c.x, c2.y-c.y) < 0.1*R {
		c = c2
	}
	s := &Star{X: c.x, Y: c.y, CentreUncPx: c.uncPx, Cycles: n, RadiusPx: rEdge, OuterPx: rOut,
		AlignDeg: opt.AlignDeg, Dominance: dom, ThirdHarmonic: third, Flags: []Flag{}}
	if err := s.measureRings(p, opt); err != nil {
		return nil, err
	}
	return s, nil
}

// circleHarmonic samples a circle of radius r about (cx, cy) every half
// pixel (bilinear) and returns the strongest angular harmonic k >= 3 (or
// want, when want > 0), its share of the AC power, and the amplitude of
// harmonic 3k relative to k.
func circleHarmonic(p *plane.Plane, cx, cy, r float64, want int) (k int, share, third float64) {
	m := 64
	for float64(m) < 4*math.Pi*r {
		m *= 2
	}
	seq := make([]float64, m)
	for i := range seq {
		s, c := math.Sincos(2 * math.Pi * float64(i) / float64(m))
		seq[i] = p.Bilinear(cx+r*c, cy+r*s)
	}
	coef := fourier.NewFFT(m).Coefficients(nil, seq)
	var total, best float64
	for i := 1; i < len(coef); i++ {
		pw := real(coef[i])*real(coef[i]) + imag(coef[i])*imag(coef[i])
		total += pw
		if want == 0 && i >= 3 && i < m/4 && pw > best {
			best, k = pw, i
		}
	}
	if want > 0 {
		k = want
	}
	if k <= 0 || k >= len(coef) || total == 0 {
		return 0, 0, 0
	}
	abs := func(i int) float64 { return math.Hypot(real(coef[i]), imag(coef[i])) }
	share = abs(k) * abs(k) / total
	if 3*k < len(coef) && abs(k) > 0 {
		third = abs(3*k) / abs(k)
	}
	return k, share, third
}

// Along returns the star's MTF in the direction of measurement dirDeg (the
// direction in which contrast varies, degrees), with the standard error of
// each value.
//
// Each segment averages the MTF over its angular width Delta = 360/S degrees
// (S segments), which pulls a direction's value towards its neighbours'
// when the MTF depends on direction (astigmatism). The MTF of a real PSF
// depends on direction only through even angular harmonics cos(2 j theta),
// sin(2 j theta) (it is the same at theta and theta + 180), and a wedge
// average multiplies harmonic 2j by sin(j Delta) / (j Delta). Along averages
// each pair of opposite segments into S/2 axis values, takes their discrete
// Fourier series (harmonics j = 0 .. S/4), divides harmonic j by that
// factor, and evaluates the series at dirDeg. This is exact for an MTF
// whose direction dependence has no harmonic above 2 (S/4) and is a
// trigonometric interpolation between segments otherwise.
func (s *Star) Along(dirDeg float64) (curve.Curve, []float64) {
	nSeg := len(s.Segments)
	if nSeg < 4 {
		return curve.Curve{}, nil
	}
	nd := nSeg / 2
	delta := 2 * math.Pi / float64(nSeg)
	// coefficient of each axis value in the result
	coef := make([]float64, nd)
	th := (dirDeg - s.Segments[0].DirDeg) * math.Pi / 180 // angle from axis 0
	for e := range nd {
		var v float64
		for j := 0; j <= nd/2; j++ {
			// contribution of axis e to harmonic j, evaluated at th:
			// (c_j / nd) cos(2 j (th - th_e)), th_e = e delta
			c := 2.0
			if j == 0 || 2*j == nd {
				c = 1
			}
			term := c / float64(nd) * math.Cos(2*float64(j)*th-2*math.Pi*float64(j*e)/float64(nd))
			if j > 0 {
				term /= math.Sin(float64(j)*delta) / (float64(j) * delta)
			}
			v += term
		}
		coef[e] = v
	}
	grid := s.Segments[0].Curve.Freq
	out := curve.Curve{Freq: append([]float64(nil), grid...), Value: make([]float64, len(grid))}
	se := make([]float64, len(grid))
	for i := range grid {
		var v, e2 float64
		for e := range nd {
			a, b := s.Segments[e], s.Segments[e+nd]
			v += coef[e] * 0.5 * (a.Curve.Value[i] + b.Curve.Value[i])
			e2 += coef[e] * coef[e] * 0.25 * (a.StdErr[i]*a.StdErr[i] + b.StdErr[i]*b.StdErr[i])
		}
		out.Value[i], se[i] = v, math.Sqrt(e2)
	}
	if grid[0] == 0 {
		out.Value[0] = 1 // every segment is 1 there; drop the rounding of the sum
	}
	return out, se
}

// axisDist returns the angle between two undirected directions, degrees in
// [0, 90].
func axisDist(a, b float64) float64 {
	d := math.Mod(math.Abs(a-b), 180)
	return math.Min(d, 180-d)
}
