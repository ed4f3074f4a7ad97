package sine

import (
	"math"

	"sagitta/core/curve"
	"sagitta/core/plane"
)

// Ring machinery of the star measurement: harmonic sums on rings about the
// centre, the star's outer boundary, the per-segment fits, the
// normalisation and the resampling onto the output grid (see the package
// doc, steps 3 to 6).

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
		// keep every measured ring whole inside the image
		rOut = math.Min(rOut, math.Floor(rInside)-1)
		return rEdge, rOut, rOut > minStarRadius
	}
}

// measureRings measures the star's MTF from its rings, one function per
// step of the sine-star SFR (s-SFR) of ISO 12233:2014 (and later
// editions) as this package does it (package doc, steps 4 to 6): the
// measured annulus (ringRange), the pixels binned into ring segments
// (binRings), the full-circle fit of each ring (fitRings), the
// normalisation by the modulation at zero frequency (normalise) and each
// segment's curve resampled onto the output grid (segmentCurves); then the
// quality flags.
func (s *Star) measureRings(p *plane.Plane, opt StarOptions) error {
	nSeg := opt.Segments
	rIn, count, err := s.ringRange(nSeg)
	if err != nil {
		return err
	}
	cells, tally := s.binRings(p, rIn, count, nSeg)
	ringF, ringMod, err := s.fitRings(cells, rIn, count, nSeg)
	if err != nil {
		return err
	}
	if err := s.normalise(ringF, ringMod); err != nil {
		return err
	}
	seMid, err := s.segmentCurves(cells, ringF, nSeg, opt.FreqStep)
	if err != nil {
		return err
	}
	s.flags(opt, seMid, tally.clipped/math.Max(tally.clipN, 1), tally.aliasN, tally.aliasS, tally.aliasSS)
	return nil
}

// ringRange sets the measured annulus: from the inner radius rIn (the
// Nyquist radius N/pi, where N/(2 pi r) = 0.5 cy/px, or farther out where
// the cells would hold too few pixels or the centre's uncertainty would
// shift the frequencies too much) out to the outer radius, in count rings
// 1 px apart (ISO 12233:2014, s-SFR: the rings of the star measured).
// It sets InnerPx and OuterPx; ErrStarTooSmall when fewer than 4 px remain.
func (s *Star) ringRange(nSeg int) (rIn float64, count int, err error) {
	rNyq := float64(s.Cycles) / math.Pi
	rIn = math.Max(rNyq, minCellPixels*float64(nSeg)/(2*math.Pi))
	rIn = math.Max(rIn, s.CentreUncPx/maxFreqShift)
	rIn = math.Max(rIn, 3)
	if rIn > s.OuterPx-4 {
		return 0, 0, ErrStarTooSmall
	}
	count = int(s.OuterPx-rIn) + 1
	s.InnerPx = rIn
	s.OuterPx = rIn + float64(count-1)
	return rIn, count, nil
}

// ringTally counts, over the pixels binRings visits, those of the star's
// disc at the file's limits (clipN, clipped) and the sums of the values
// inside 0.8 of the Nyquist radius (aliasN, aliasS, aliasSS), for the
// flags.
type ringTally struct {
	clipN, clipped          float64
	aliasN, aliasS, aliasSS float64
}

// binRings bins the pixels (never interpolated) into rings 1 px wide, the
// k-th at radius rIn + k, and nSeg angular segments starting at AlignDeg,
// accumulating in each cell the sums of the fit a + b cos(N phi) +
// c sin(N phi) (ISO 12233:2014, s-SFR: the modulation read along circles
// of the star; package doc, step 4). cells[k*nSeg+seg] is ring k, segment
// seg.
func (s *Star) binRings(p *plane.Plane, rIn float64, count, nSeg int) ([]harmonic, ringTally) {
	nf := float64(s.Cycles)
	rNyq := nf / math.Pi
	cells := make([]harmonic, count*nSeg)
	segW := 2 * math.Pi / float64(nSeg)
	align := s.AlignDeg * math.Pi / 180
	rMax := s.OuterPx + 0.5
	x0, x1 := max(int(math.Floor(s.X-rMax)), 0), min(int(math.Ceil(s.X+rMax)), p.W-1)
	y0, y1 := max(int(math.Floor(s.Y-rMax)), 0), min(int(math.Ceil(s.Y+rMax)), p.H-1)
	rAlias := 0.8 * rNyq
	var t ringTally
	for y := y0; y <= y1; y++ {
		dy := float64(y) + 0.5 - s.Y
		for x := x0; x <= x1; x++ {
			dx := float64(x) + 0.5 - s.X
			r := math.Hypot(dx, dy)
			v := float64(p.Pix[y*p.W+x])
			if r <= s.RadiusPx {
				t.clipN++
				if v >= plane.ClipLevel || v <= darkLimit {
					t.clipped++
				}
			}
			if r < rAlias {
				t.aliasN++
				t.aliasS += v
				t.aliasSS += v * v
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
	return cells, t
}

// fitRings fits each ring over the full circle (its segments' sums
// merged): its frequency N / (2 pi r) and modulation (NaN where the fit
// fails), and the star's mean level and noise from all rings (ISO
// 12233:2014, s-SFR; package doc, step 4). ErrNoStar when no ring fits.
func (s *Star) fitRings(cells []harmonic, rIn float64, count, nSeg int) (ringF, ringMod []float64, err error) {
	nf := float64(s.Cycles)
	ringMod = make([]float64, count)
	ringF = make([]float64, count)
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
		return nil, nil, ErrNoStar
	}
	s.Mean = meanSum / meanN
	s.NoiseRMS = math.Sqrt(res2 / resN)
	return ringF, ringMod, nil
}

// normalise sets the star's modulation at zero frequency (reference: the
// normalisation of ISO 12233:2014's s-SFR by the low-frequency modulation,
// extrapolated to f = 0; package doc, step 5), the outer ring's
// frequency and modulation, the highest frequency measured, and the raw
// rings divided by the reference, ascending in frequency. ErrNoStar when
// the outer ring has no modulation.
func (s *Star) normalise(ringF, ringMod []float64) error {
	count := len(ringF)
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
	for k := count - 1; k >= 0; k-- {
		if !math.IsNaN(ringMod[k]) {
			s.RingFreq = append(s.RingFreq, ringF[k])
			s.RingMTF = append(s.RingMTF, ringMod[k]/s.Modulation)
		}
	}
	return nil
}

// segmentCurves fits each segment's cells ring by ring, divides the
// modulations by the reference and resamples them onto the output grid
// (freqGrid, resample; package doc, step 6: the s-SFR of ISO 12233:2014
// per direction). It returns the standard errors between 0.05 and 0.35
// cy/px, for the noise flag; ErrNoStar when a segment has fewer than two
// rings or a value is not finite.
func (s *Star) segmentCurves(cells []harmonic, ringF []float64, nSeg int, step float64) (seMid []float64, err error) {
	count := len(ringF)
	grid := freqGrid(step, s.MaxFreq)
	fr := make([]float64, 0, count)
	vr := make([]float64, 0, count)
	er := make([]float64, 0, count)
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
		if len(fr) < 2 {
			return nil, ErrNoStar // a segment without data: nothing to report for it
		}
		s.resample(&seg, fr, vr, er)
		for i, f := range grid {
			if f >= 0.05 && f <= 0.35 {
				seMid = append(seMid, seg.StdErr[i])
			}
		}
		s.Segments = append(s.Segments, seg)
	}
	for _, sg := range s.Segments {
		for i := range sg.Curve.Value {
			if !finite(sg.Curve.Value[i]) || !finite(sg.StdErr[i]) {
				return nil, ErrNoStar // a fit that came apart; never hand on NaN
			}
		}
	}
	return seMid, nil
}

// reference returns the star's modulation at zero frequency, M0: the value
// at f = 0 of
//
//	log M(f) = c0 + c1 f + c2 f^2
//
// fitted by least squares to the rings from RefFreq to RefFreq +
// refBandCyPx. Near zero frequency the MTF of a PSF with finite second
// moments is 1 - a f^2 (Gaussian blur, the pixel aperture), and that of a
// diffraction-limited lens falls linearly, 1 - 4 f / (pi vc) (from the OTF
// of a circular pupil, Goodman ch. 6), so both terms are kept. It falls back
// to the outer ring's modulation, with FlagWeakReference, when the fit has
// fewer than 6 rings or gives a ratio M0 / OuterMod outside [1/maxRefRatio,
// maxRefRatio], and flags (but uses) a correction beyond flagRefCorr. When
// the fitted modulation rises with frequency at RefFreq it falls back too,
// with FlagSharpened.
func (s *Star) reference(ringF, ringMod []float64) (float64, []Flag) {
	var ne normalEq3
	n := 0
	for k := range ringF {
		if ringF[k] > s.RefFreq+refBandCyPx || !(ringMod[k] > 0) {
			continue
		}
		f := ringF[k]
		ne.add([3]float64{1, f, f * f}, math.Log(ringMod[k]))
		n++
	}
	b, ok := ne.solve()
	if n < 6 || !ok {
		return s.OuterMod, []Flag{FlagWeakReference}
	}
	// A modulation that rises with frequency at the largest ring is
	// in-camera sharpening (no lens does that): then the trend below the
	// largest ring is unknown, and the star is normalised there, as the
	// s-SFR method does, and says so.
	if b[1]+2*b[2]*s.RefFreq > 0 {
		return s.OuterMod, []Flag{FlagSharpened}
	}
	m0 := math.Exp(b[0])
	r := m0 / s.OuterMod
	if !(r >= 1/maxRefRatio && r <= maxRefRatio) {
		return s.OuterMod, []Flag{FlagWeakReference}
	}
	if math.Abs(r-1) > flagRefCorr {
		return m0, []Flag{FlagWeakReference}
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
	s.ResolvedFreq = s.resolved()
	add(s.Cycles < 2*opt.Segments || s.ResolvedFreq < minResolvedFreq, FlagFewCycles)
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

// resolved returns the frequency up to which the star's modulation (the
// mean over segments) stays above resolvedSE standard errors of that mean:
// beyond it the curves are noise. It is MaxFreq when they never sink.
func (s *Star) resolved() float64 {
	grid := s.Segments[0].Curve.Freq
	n := float64(len(s.Segments))
	for i, f := range grid {
		if f < s.RefFreq {
			continue
		}
		var m, e2 float64
		for _, sg := range s.Segments {
			m += sg.Curve.Value[i] / n
			e2 += sg.StdErr[i] * sg.StdErr[i] / (n * n)
		}
		if m < resolvedSE*math.Sqrt(e2) {
			return f
		}
	}
	return s.MaxFreq
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
