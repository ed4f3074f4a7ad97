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
		return o, fmt.Errorf("sine: %d segments: want a multiple of 4 from 4 to 64", o.Segments)
	}
	if o.Cycles < 0 || o.Cycles > 4096 {
		return o, fmt.Errorf("sine: %d cycles is out of range", o.Cycles)
	}
	if o.FreqStep <= 0 {
		o.FreqStep = 0.01
	}
	if o.FreqStep > 0.1 || math.IsNaN(o.AlignDeg) || math.IsInf(o.AlignDeg, 0) {
		return o, fmt.Errorf("sine: invalid star options")
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
	FlagFewCycles       Flag = "few-cycles"           // fewer than 2 cycles per segment (stars) or 4 in the area (gratings)
	FlagShortRange      Flag = "short-range"          // the measurement stops below Nyquist
	FlagNotSine         Flag = "not-sine"             // strong third harmonic: a bar pattern, or a tone curve that is not linear
	FlagNoisy           Flag = "noisy"                // the MTF's standard error exceeds 0.03 at mid frequencies
	FlagWeakReference   Flag = "weak-reference"       // the zero-frequency modulation rests on a long extrapolation
	FlagDisagree        Flag = "disagrees-with-edges" // set by the caller when nearby edges measure otherwise
)

// Thresholds of the star flags.
const (
	maxFreqShift   = 0.02  // centre uncertainty / innermost radius
	maxAliasMod    = 0.10  // moire modulation inside the Nyquist radius, relative to the star's
	clipShare      = 0.005 // share of pattern pixels at a limit
	darkLimit      = 1e-6  // linear value at or below which a pixel sits at the bottom code
	maxThirdHarm   = 0.15  // third/first harmonic amplitude at the outer radius
	maxStdErr      = 0.03  // median standard error of the normalised MTF, 0.05..0.35 cy/px
	maxRefCorr     = 0.15  // largest accepted change of the reference by extrapolation
	refBandCyPx    = 0.05  // width of the band above RefFreq used to extrapolate to 0
	minCellPixels  = 8     // fewest pixels in a ring segment at the innermost ring
	minStarRadius  = 12.0  // px
	minCycles      = 4     // fewest cycles accepted as a star
	minDominance   = 0.35  // share of a circle's AC power in the N-th harmonic
	centreFitMaxF  = 0.12  // cy/px: the centre fit uses rings below this frequency
	centreFitIters = 3
)

// Segment is one angular segment of a star.
type Segment struct {
	// AngleDeg is the direction from the star's centre to the segment's
	// middle, degrees in [0, 360).
	AngleDeg float64 `json:"angle_deg"`
	// DirDeg is the direction of measurement: the direction in which the
	// pattern's contrast varies there, AngleDeg + 90, in [0, 180).
	DirDeg float64 `json:"dir_deg"`
	// Curve is the MTF on the output grid (see Star.RefFreq, Star.MaxFreq).
	Curve curve.Curve `json:"curve"`
	// StdErr is the standard error of each Curve value (0 below RefFreq).
	StdErr []float64 `json:"std_err"`
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
	AlignDeg    float64 // direction of segment 0's middle, degrees
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

// ErrNoStar is returned when no star is found at the guessed place.
var ErrNoStar = fmt.Errorf("sine: no sinusoidal star at this place")

// MeasureStar measures the star near g in the linear plane p.
func MeasureStar(p *plane.Plane, g StarGuess, opt StarOptions) (*Star, error) {
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, err
	}
	if !(g.RadiusPx >= minStarRadius) || math.IsInf(g.RadiusPx, 0) || !(g.X >= 0 && g.Y >= 0 && g.X <= float64(p.W) && g.Y <= float64(p.H)) {
		return nil, fmt.Errorf("sine: star guess (%.1f, %.1f) radius %.1f px is outside the image or too small", g.X, g.Y, g.RadiusPx)
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

// ringSums accumulates, for rings 1 px wide about (cx, cy) with centres
// r0, r0+1, ..., r0+count-1, the harmonic-N sums of the pixels whose
// centres lie within 0.5 px of each ring, over the full circle. Only the
// pixels of the annulus are visited; parts outside the image are skipped.
func ringSums(p *plane.Plane, cx, cy float64, n int, r0 float64, count int) []harmonic {
	h := make([]harmonic, count)
	rLo, rHi := math.Max(r0-0.5, 0), r0+float64(count)-0.5
	y0, y1 := max(int(math.Floor(cy-rHi)), 0), min(int(math.Ceil(cy+rHi)), p.H-1)
	for y := y0; y <= y1; y++ {
		dy := float64(y) + 0.5 - cy
		span := math.Sqrt(math.Max(rHi*rHi-dy*dy, 0))
		hole := math.Sqrt(math.Max(rLo*rLo-dy*dy, 0))
		x0, x1 := max(int(math.Floor(cx-span)), 0), min(int(math.Ceil(cx+span)), p.W-1)
		// skip the inner disc: x in (cx - hole, cx + hole)
		h0, h1 := int(math.Ceil(cx-hole-0.5))+1, int(math.Floor(cx+hole-0.5))-1
		for x := x0; x <= x1; x++ {
			if x == h0 && h1 >= h0 {
				x = h1
				continue
			}
			dx := float64(x) + 0.5 - cx
			r := math.Hypot(dx, dy)
			k := int(math.Floor(r - r0 + 0.5))
			if k < 0 || k >= count || r == 0 {
				continue
			}
			c, s := powUnit(dx/r, dy/r, n)
			h[k].add(c, s, float64(p.Pix[y*p.W+x]))
		}
	}
	return h
}

// powUnit returns (cos n phi, sin n phi) for the unit vector
// (cos phi, sin phi) by binary exponentiation of the complex number,
// cheaper than an arctangent and a sine.
func powUnit(c, s float64, n int) (float64, float64) {
	rc, rs := 1.0, 0.0
	for n > 0 {
		if n&1 == 1 {
			rc, rs = rc*c-rs*s, rc*s+rs*c
		}
		c, s = c*c-s*s, 2*c*s
		n >>= 1
	}
	return rc, rs
}

// outerRadius finds where the star's N-th harmonic ends: rEdge, where its
// amplitude falls to half the level just inside, and
// rOut, the largest radius whose ring is clear of that boundary's blur
// (r90 - (rEdge - r90) - 1, r90 the last radius inside at 90 % of the
// plateau, so the boundary's transition is mirrored inward once more). The
// guess may be far too small (detection sees the fine inner part of a
// star): the scan doubles until it finds the boundary or reaches the image
// border, where the last complete ring less 3 px is used.
func outerRadius(p *plane.Plane, cx, cy float64, n int, guess float64) (rEdge, rOut float64, ok bool) {
	// Rings may reach a little beyond the nearest image border (the ring
	// fit uses the pixels present), so that a star close to the border
	// still shows its boundary.
	rInside := math.Min(math.Min(cx, cy), math.Min(float64(p.W)-cx, float64(p.H)-cy))
	rLimit := rInside + 16
	scan := math.Min(2*guess+12, rLimit)
	var amp []float64 // ring k has radius k + 1
	for {
		count := int(scan)
		if count < int(minStarRadius)+4 {
			return 0, 0, false
		}
		if count > len(amp) {
			for _, h := range ringSums(p, cx, cy, n, float64(len(amp)+1), count-len(amp)) {
				a := 0.0
				if f := h.solve(); f.ok {
					a = math.Hypot(f.b, f.c)
				}
				amp = append(amp, a)
			}
		}
		peak, kPeak := 0.0, -1
		for k := int(0.3 * guess); k < count; k++ {
			if amp[k] > peak {
				peak, kPeak = amp[k], k
			}
		}
		if kPeak < 0 || peak == 0 {
			return 0, 0, false
		}
		// The boundary: the first ring beyond the peak whose amplitude is
		// below half the largest of the 8 rings inside it, and after which
		// it stays so for 10 rings (inside a star the amplitude changes
		// slowly with the MTF, even a sharpened one; at its border it
		// drops within the blur).
		kEdge := -1
		for k := kPeak + 1; k < count-10; k++ {
			level := 0.0
			for j := max(k-8, 0); j < k; j++ {
				level = math.Max(level, amp[j])
			}
			drop := true
			for j := k; j <= k+10 && drop; j++ {
				drop = amp[j] < 0.5*level
			}
			if drop {
				kEdge, peak = k, level
				break
			}
		}
		if kEdge < 0 {
			if scan < rLimit {
				scan = math.Min(2*scan, rLimit)
				continue
			}
			// The pattern reaches the image border.
			rEdge = math.Floor(rInside)
			return rEdge, rEdge - 3, rEdge-3 > minStarRadius
		}
		// ring k has radius k + 1; interpolate the half-amplitude crossing
		a0, a1 := amp[kEdge-1], amp[kEdge]
		t := 0.0
		if a0 > a1 {
			t = math.Max(0, math.Min(1, (a0-0.5*peak)/(a0-a1)))
		}
		rEdge = float64(kEdge) + t
		k90 := kEdge - 1
		for k90 > kPeak && amp[k90] < 0.9*peak {
			k90--
		}
		r90 := 1 + float64(k90)
		rOut = math.Floor(r90 - math.Max(rEdge-r90, 1) - 1)
		return rEdge, rOut, rOut > minStarRadius
	}
}

// measureRings fits every ring segment, normalises and fills the curves.
func (s *Star) measureRings(p *plane.Plane, opt StarOptions) error {
	nSeg := opt.Segments
	nf := float64(s.Cycles)
	rNyq := nf / math.Pi // radius where N/(2 pi r) = 0.5 cy/px
	rIn := math.Max(rNyq, minCellPixels*float64(nSeg)/(2*math.Pi))
	rIn = math.Max(rIn, s.CentreUncPx/maxFreqShift)
	rIn = math.Max(rIn, 3)
	if rIn > s.OuterPx-4 {
		return fmt.Errorf("sine: star at (%.0f, %.0f) is too small for its %d cycles", s.X, s.Y, s.Cycles)
	}
	count := int(s.OuterPx-rIn) + 1
	s.InnerPx = rIn
	s.OuterPx = rIn + float64(count-1)
	cells := make([]harmonic, count*nSeg)
	segW := 2 * math.Pi / float64(nSeg)
	align := s.AlignDeg * math.Pi / 180
	rMax := s.OuterPx + 0.5
	x0, x1 := max(int(math.Floor(s.X-rMax)), 0), min(int(math.Ceil(s.X+rMax)), p.W-1)
	y0, y1 := max(int(math.Floor(s.Y-rMax)), 0), min(int(math.Ceil(s.Y+rMax)), p.H-1)
	rAlias := 0.8 * rNyq
	var aliasN, aliasS, aliasSS float64
	var clipN, clipped float64
	for y := y0; y <= y1; y++ {
		dy := float64(y) + 0.5 - s.Y
		for x := x0; x <= x1; x++ {
			dx := float64(x) + 0.5 - s.X
			r := math.Hypot(dx, dy)
			v := float64(p.Pix[y*p.W+x])
			if r <= s.RadiusPx {
				clipN++
				if v >= plane.ClipLevel || v <= darkLimit {
					clipped++
				}
			}
			if r < rAlias {
				aliasN++
				aliasS += v
				aliasSS += v * v
			}
			k := int(math.Floor(r - rIn + 0.5))
			if k < 0 || k >= count {
				continue
			}
			phi := math.Atan2(dy, dx)
			seg := int(math.Floor((phi-align)/segW+0.5)) % nSeg
			if seg < 0 {
				seg += nSeg
			}
			sn, cs := math.Sincos(nf * phi)
			cells[k*nSeg+seg].add(cs, sn, v)
		}
	}

	// Full-circle fits: mean level, noise, modulation per ring.
	ringMod := make([]float64, count)
	ringF := make([]float64, count)
	var meanSum, meanN, res2, resN float64
	for k := range count {
		var h harmonic
		for sg := range nSeg {
			h.merge(&cells[k*nSeg+sg])
		}
		f := h.solve()
		ringF[k] = nf / (2 * math.Pi * (rIn + float64(k)))
		ringMod[k] = math.NaN()
		if f.ok && f.a > 0 {
			ringMod[k] = f.mod
			meanSum += f.a * f.n
			meanN += f.n
			res2 += f.sigma * f.sigma * f.n
			resN += f.n
		}
	}
	if meanN == 0 {
		return ErrNoStar
	}
	s.Mean = meanSum / meanN
	s.NoiseRMS = math.Sqrt(res2 / resN)
	s.RefFreq = ringF[count-1]
	s.OuterMod = ringMod[count-1]
	if !(s.OuterMod > 0) {
		return ErrNoStar
	}
	s.Modulation, s.Flags = s.reference(ringF, ringMod)
	s.MaxFreq = math.Min(ringF[0], curve.Nyquist)
	if ringF[0] > curve.Nyquist-0.005 {
		s.MaxFreq = curve.Nyquist
	}
	// Raw rings, ascending in frequency.
	for k := count - 1; k >= 0; k-- {
		if !math.IsNaN(ringMod[k]) {
			s.RingFreq = append(s.RingFreq, ringF[k])
			s.RingMTF = append(s.RingMTF, ringMod[k]/s.Modulation)
		}
	}
	// Per-segment curves.
	grid := freqGrid(opt.FreqStep, s.MaxFreq)
	fr := make([]float64, 0, count)
	vr := make([]float64, 0, count)
	er := make([]float64, 0, count)
	var seMid []float64
	for sg := range nSeg {
		fr, vr, er = fr[:0], vr[:0], er[:0]
		for k := count - 1; k >= 0; k-- {
			f := cells[k*nSeg+sg].solve()
			if !f.ok || !(f.a > 0) {
				continue
			}
			fr = append(fr, ringF[k])
			vr = append(vr, f.mod/s.Modulation)
			er = append(er, math.Sqrt(0.5*(f.varB+f.varC))/(f.a*s.Modulation))
		}
		ang := math.Mod(s.AlignDeg+float64(sg)*360/float64(nSeg)+720, 360)
		seg := Segment{AngleDeg: ang, DirDeg: math.Mod(ang+90, 180)}
		seg.Curve.Freq = grid
		seg.Curve.Value = make([]float64, len(grid))
		seg.StdErr = make([]float64, len(grid))
		if len(fr) >= 2 {
			s.resample(&seg, fr, vr, er)
		}
		for i, f := range grid {
			if f >= 0.05 && f <= 0.35 {
				seMid = append(seMid, seg.StdErr[i])
			}
		}
		s.Segments = append(s.Segments, seg)
	}
	s.flags(opt, seMid, clipped/math.Max(clipN, 1), aliasN, aliasS, aliasSS)
	return nil
}

// reference fits log M(f) = log M0 - beta f^2 to the rings from RefFreq to
// RefFreq + refBandCyPx and returns M0 (see the package doc). It falls back
// to the outer ring's modulation, with FlagWeakReference, when the fit has
// too few rings or would change the reference by more than maxRefCorr.
func (s *Star) reference(ringF, ringMod []float64) (float64, []Flag) {
	var sx, sy, sxx, sxy, n float64
	top := s.RefFreq + refBandCyPx
	for k := range ringF {
		if ringF[k] > top || !(ringMod[k] > 0) {
			continue
		}
		x, y := ringF[k]*ringF[k], math.Log(ringMod[k])
		sx += x
		sy += y
		sxx += x * x
		sxy += x * y
		n++
	}
	d := n*sxx - sx*sx
	if n < 4 || !(d > 0) {
		return s.OuterMod, []Flag{FlagWeakReference}
	}
	beta := -(n*sxy - sx*sy) / d
	m0 := math.Exp((sy + beta*sx) / n)
	if math.Abs(m0/s.OuterMod-1) > maxRefCorr {
		return s.OuterMod, []Flag{FlagWeakReference}
	}
	return m0, []Flag{}
}

// freqGrid returns 0, step, 2 step, ... up to top, and top itself when it
// falls between grid points, so a curve ends where the measurement does.
func freqGrid(step, top float64) []float64 {
	n := int(math.Floor(top/step+1e-9)) + 1
	g := make([]float64, n, n+1)
	for i := range g {
		g[i] = float64(i) * step
	}
	if top-g[n-1] > 1e-9 {
		g = append(g, top)
	}
	return g
}

// resample fills a segment's curve from its raw ring values (fr ascending):
// local linear regression with a triangular kernel whose half-width is the
// larger of the grid step and 1.5 ring spacings (rings are 1 px apart, so
// their frequency spacing 2 pi f^2 / N grows with f); below RefFreq the
// parabola 1 + (v_ref - 1) (f / RefFreq)^2 joins 1 at f = 0 (not measured).
func (s *Star) resample(seg *Segment, fr, vr, er []float64) {
	grid := seg.Curve.Freq
	step := grid[1] - grid[0]
	vRef := math.NaN()
	for i, f := range grid {
		if f < s.RefFreq {
			continue
		}
		h := math.Max(step, 1.5*2*math.Pi*f*f/float64(s.Cycles))
		v, e := localLinear(fr, vr, er, f, h)
		seg.Curve.Value[i], seg.StdErr[i] = v, e
		if math.IsNaN(vRef) {
			vRef, _ = localLinear(fr, vr, er, s.RefFreq, h)
		}
	}
	if math.IsNaN(vRef) {
		vRef = vr[0]
	}
	for i, f := range grid {
		if f < s.RefFreq {
			t := f / s.RefFreq
			seg.Curve.Value[i] = 1 + (vRef-1)*t*t
		}
	}
}

// localLinear evaluates at f the weighted linear regression of v on x over
// the points within h of f (triangular weights), widening h until at least
// two points take part. It also returns the standard error, from the
// points' own errors e.
func localLinear(x, v, e []float64, f, h float64) (float64, float64) {
	for range 8 {
		var sw, sx, sy, sxx, sxy, se2 float64
		var np int
		for i := range x {
			d := math.Abs(x[i]-f) / h
			if d >= 1 {
				continue
			}
			w := 1 - d
			dx := x[i] - f
			sw += w
			sx += w * dx
			sy += w * v[i]
			sxx += w * dx * dx
			sxy += w * dx * v[i]
			se2 += w * w * e[i] * e[i]
			np++
		}
		if np >= 2 {
			det := sw*sxx - sx*sx
			if det > 1e-18*sw*sw {
				// intercept of the fit in dx, i.e. the value at f
				val := (sxx*sy - sx*sxy) / det
				return val, math.Sqrt(se2) / sw
			}
			if np >= 1 {
				return sy / sw, math.Sqrt(se2) / sw
			}
		}
		h *= 1.5
	}
	return math.NaN(), math.NaN()
}

// flags sets the quality flags from the measured figures.
func (s *Star) flags(opt StarOptions, seMid []float64, clipShareMeasured, aliasN, aliasS, aliasSS float64) {
	add := func(c bool, f Flag) {
		if c {
			for _, g := range s.Flags {
				if g == f {
					return
				}
			}
			s.Flags = append(s.Flags, f)
		}
	}
	// The centre must be known to maxFreqShift of the Nyquist radius N/pi
	// (else measureRings moved the innermost ring out for it) and to a
	// quarter pixel.
	add(s.CentreUncPx > maxFreqShift*float64(s.Cycles)/math.Pi || s.CentreUncPx > 0.25, FlagCentreUncertain)
	if aliasN >= 12 && s.Mean > 0 {
		v := aliasSS/aliasN - (aliasS/aliasN)*(aliasS/aliasN)
		v -= s.NoiseRMS * s.NoiseRMS
		// a sinusoid of amplitude A has variance A^2 / 2
		s.AliasMod = math.Sqrt(2*math.Max(v, 0)) / (aliasS / aliasN) / s.Modulation
	}
	add(s.AliasMod > maxAliasMod, FlagAliased)
	add(clipShareMeasured > clipShare, FlagClipped)
	add(s.Cycles < 2*opt.Segments, FlagFewCycles)
	add(s.MaxFreq < curve.Nyquist, FlagShortRange)
	add(s.ThirdHarmonic > maxThirdHarm, FlagNotSine)
	add(median(seMid) > maxStdErr, FlagNoisy)
}

// median returns the median of v (NaN for none); v is reordered.
func median(v []float64) float64 {
	if len(v) == 0 {
		return math.NaN()
	}
	// insertion sort: short slices
	for i := 1; i < len(v); i++ {
		for j := i; j > 0 && v[j] < v[j-1]; j-- {
			v[j], v[j-1] = v[j-1], v[j]
		}
	}
	return v[len(v)/2]
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
