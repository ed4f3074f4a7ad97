package edge

import (
	"math"
	"sagitta/core/optics"

	"sagitta/core/curve"
)

// Sharpening is judged by physics, not by a fixed overshoot threshold.
//
// An optical system's point spread function is an irradiance, never
// negative, so the line spread function (its projection) is never negative
// and the edge spread function rises monotonically from one plateau to the
// other (Goodman, Introduction to Fourier Optics, 3rd ed., ch. 6: the
// incoherent PSF is |h|^2 >= 0; the pixel aperture is a non-negative box,
// Boreman, MTF in Optical and Electro-Optical Systems, ch. 2). Three things
// can then only come from processing (sharpening) or from noise, and each
// is tested against the noise:
//
//  1. Negative lobes: the profile, averaged over 1 px wide windows within
//     the edge's core, dips below the dark plateau or rises above the light
//     one by more than lobeZ standard errors of that average (and by more
//     than lobeFloor of the step, against quantisation, JPEG ringing and
//     paper texture; heavy compression, below quality 75, can ring more).
//     Averages of a monotone profile over any window stay between the
//     plateaus' means, so a true, unsharpened edge cannot do this.
//  2. A rise: the MTF exceeds its zero-frequency value 1 at some frequency
//     up to Nyquist by more than riseZ standard errors plus riseFloor. A
//     non-negative LSF has |X(f)| <= X(0).
//  3. Above the diffraction limit: with the f-number and pixel pitch known,
//     no lens transfers more than a perfect one: the diffraction MTF of a
//     circular pupil (Goodman ch. 6) at wavelength boundWavelengthUM times
//     the pixel aperture's sinc(f cos t) sinc(f sin t) (Boreman ch. 2). A
//     curve above 1 + boundRel times that product by more than riseZ
//     standard errors plus boundFloor at any frequency up to Nyquist has
//     been sharpened.
//
// A mild sharpening of a soft lens with a small radius leaves lobes too
// small to see in the noise and may stay unflagged: it cannot be told from
// a slightly sharper lens.
//
// Where the lobes are seen, the lift of MTF50 is estimated from a model of
// a Gaussian blur sharpened by an unsharp mask fitted to the profile
// (lobeLift).
type Sharpening struct {
	// Signs lists what was found: "negative-lobes", "rise",
	// "above-diffraction-limit". Empty when the edge shows none.
	Signs []string
	// LobeZ is the deepest lobe in standard errors of the noise (0 when
	// none dips beyond the plateaus); maxLobeZ when the plateau has no noise.
	LobeZ float64
	// LobeDepth is the deepest lobe as a fraction of the step.
	LobeDepth float64
	// MTF50Lift is the estimated fraction by which sharpening lifts MTF50
	// (0 when not estimated).
	MTF50Lift float64
}

// Thresholds of the sharpening check.
const (
	lobeZ             = 5     // lobe depth in standard errors (Gaussian tail 3e-7 per window)
	lobeFloor         = 0.012 // smallest lobe counted, fraction of the step: above the ringing of JPEG compression at quality 75 and better (up to 1.0 % on simulated edges) and of 8-bit quantisation
	maxLobeZ          = 1000  // the lobe's size in standard errors reported when the plateau has no noise (JSON has no infinity)
	riseZ             = 4     // rise above 1 or above the limit, standard errors
	riseFloor         = 0.01  // smallest rise counted
	boundFloor        = 0.01  // smallest excess over the diffraction limit counted
	boundRel          = 0.05  // relative allowance over the limit: the window cuts the far tails of a real line spread function, which raises the measured curve by the share cut (about 3 % for a diffraction-limited f/5.6 edge at SNR 100)
	boundWavelengthUM = 0.555 // wavelength of the diffraction limit, um: the peak of the eye's luminance sensitivity (CIE photopic V(lambda)), which weights the luminance plane measured
)

// Sign names.
const (
	SignLobes       = "negative-lobes"
	SignRise        = "rise"
	SignDiffraction = "above-diffraction-limit"
)

// judgeSharpening fills m.Sharpening. The profile is rebuilt from the
// samples (after removing the shading, as the refined estimator does) so
// that both estimators are judged alike.
func judgeSharpening(m *Measurement, s samples, f lineFit, sdDark, sdLight float64, opt Options) {
	sh := Sharpening{Signs: []string{}}
	defer func() { m.Sharpening = sh }()
	n := len(s.v)
	if n == 0 {
		return
	}
	d := s.dists(f)
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range d {
		lo, hi = min(lo, x), max(hi, x)
	}
	reach := math.Min(-lo, hi)
	if reach < 3 {
		return
	}
	core := math.Min(coreWidth(f), reach-1)
	v, dark, light := s.flattened(d, core)
	step := light - dark
	if !(step > 0) {
		return
	}

	// 1. Lobes: 1 px windows stepped by a quarter pixel inside the core.
	const q = 0.25
	nb := int(math.Ceil(2 * core / q))
	sum := make([]float64, nb)
	cnt := make([]float64, nb)
	var nDark, nLight float64
	for i, x := range d {
		switch {
		case x < -core:
			nDark++
		case x > core:
			nLight++
		default:
			k := int(math.Floor((x + core) / q))
			if k >= 0 && k < nb {
				sum[k] += v[i]
				cnt[k]++
			}
		}
	}
	for k := 0; k+4 <= nb; k++ {
		var sv, sc float64
		for j := k; j < k+4; j++ {
			sv += sum[j]
			sc += cnt[j]
		}
		if sc < 4 {
			continue
		}
		mean := sv / sc
		centre := -core + (float64(k)+2)*q
		var exc, sd, np float64
		switch {
		case centre < -0.5:
			exc, sd, np = dark-mean, sdDark, nDark
		case centre > 0.5:
			exc, sd, np = mean-light, sdLight, nLight
		default:
			continue
		}
		if exc <= 0 {
			continue
		}
		se := sd * math.Sqrt(1/sc+1/math.Max(np, 1))
		z := float64(maxLobeZ) // no noise on the plateau: beyond any threshold
		if se > 0 {
			z = exc / se
		}
		if exc > lobeFloor*step && z > lobeZ {
			if exc/step > sh.LobeDepth {
				sh.LobeDepth, sh.LobeZ = exc/step, z
			}
		}
	}
	if sh.LobeDepth > 0 {
		sh.Signs = append(sh.Signs, SignLobes)
		sh.MTF50Lift = lobeLift(d, v, dark, step, core)
	}

	// 2. Rise above 1, and 3. above the diffraction limit, up to Nyquist.
	for j, fr := range m.Curve.Freq {
		if fr <= 0 || fr > curve.Nyquist+1e-9 {
			continue
		}
		se := 0.0
		if j < len(m.SE) {
			se = m.SE[j]
		}
		if m.Curve.Value[j]-1 > riseZ*se+riseFloor {
			sh.Signs = append(sh.Signs, SignRise)
			break
		}
	}
	if AboveDiffraction(m.Curve, m.SE, m.NormalDeg, opt.FNumber, opt.PitchUM) {
		sh.Signs = append(sh.Signs, SignDiffraction)
	}
}

// AboveDiffraction reports whether curve c (standard errors se, edge
// normal at normalDeg) exceeds the diffraction limit at f-number fNumber
// on pixels of pitchUM by more than the noise allows at some frequency up
// to Nyquist (point 3 above). It is false when either is unknown (<= 0).
func AboveDiffraction(c curve.Curve, se []float64, normalDeg, fNumber, pitchUM float64) bool {
	if !(fNumber > 0) || !(pitchUM > 0) {
		return false
	}
	vc := pitchUM / (boundWavelengthUM * fNumber)
	for j, fr := range c.Freq {
		if fr <= 0 || fr > curve.Nyquist+1e-9 {
			continue
		}
		e := 0.0
		if j < len(se) {
			e = se[j]
		}
		if c.Value[j]-(1+boundRel)*optics.DiffractionMTF(fr, vc)*pixelAperture(fr, normalDeg) > riseZ*e+boundFloor {
			return true
		}
	}
	return false
}

// pixelAperture is the MTF of a square pixel of 100 % fill along an edge
// normal at normalDeg: |sinc(f cos t) sinc(f sin t)| (Boreman, MTF in
// Optical and Electro-Optical Systems, ch. 2).
func pixelAperture(f, normalDeg float64) float64 {
	s, c := math.Sincos(normalDeg * math.Pi / 180)
	return optics.PixelMTF(f*c) * optics.PixelMTF(f*s)
}

// lobeLift estimates how much sharpening lifts MTF50 from the shape of the
// profile within core px of the edge: it fits the profile of a Gaussian
// blur of width sigma sharpened by an unsharp mask of amount a and radius
// r, c0 + c1 [(1 + a) Phi(x / sigma) - a Phi(x / sqrt(sigma^2 + r^2))]
// (the mask adds a times the difference between the profile and its
// Gaussian blur of radius r; blurs of a Gaussian profile add in quadrature),
// by least squares over a grid of sigma and r (c0, c1 and a are linear),
// and returns the ratio of the MTF50 of the sharpened model,
// exp(-2 pi^2 sigma^2 f^2) (1 + a (1 - exp(-2 pi^2 r^2 f^2))), to that of
// the unsharpened one, 0.18739 / sigma, minus 1 (Fourier transform of a
// Gaussian; Goodman, Introduction to Fourier Optics, 3rd ed., ch. 2). The
// lens and pixel are taken as one Gaussian, so the figure is an estimate
// (within about a third of the true lift on simulated edges; see
// sharpen_test.go). It returns 0 when no sharpened model fits better than
// an unsharpened one.
func lobeLift(d, v []float64, dark, step, core float64) float64 {
	esf, _ := coarse(d, v, -core, core)
	x, y := esf.X, make([]float64, len(esf.V))
	for i, e := range esf.V {
		y[i] = (e - dark) / step
	}
	phi := func(z float64) float64 { return 0.5 * math.Erfc(-z/math.Sqrt2) }
	best, bestSig, bestR, bestA := math.Inf(1), 0.0, 0.0, 0.0
	b1 := make([]float64, len(x))
	b2 := make([]float64, len(x))
	for sg := 0.2; sg <= 4; sg *= 1.06 {
		for i, xi := range x {
			b1[i] = phi(xi / sg)
		}
		for r := 0.2; r <= 5; r *= 1.08 {
			s2 := math.Sqrt(sg*sg + r*r)
			for i, xi := range x {
				b2[i] = b1[i] - phi(xi/s2)
			}
			var ps planeStats
			for i := range x {
				ps.add(b1[i], b2[i], y[i])
			}
			c, ok := ps.coef()
			if !ok || !(c[1] > 0) {
				continue
			}
			var ss float64
			for i := range x {
				e := y[i] - c[0] - c[1]*b1[i] - c[2]*b2[i]
				ss += e * e
			}
			if ss < best {
				best, bestSig, bestR, bestA = ss, sg, r, c[2]/c[1]
			}
		}
	}
	if !(bestA > 0) {
		return 0
	}
	k := 2 * math.Pi * math.Pi
	sharp := func(f float64) float64 {
		return math.Exp(-k*bestSig*bestSig*f*f) * (1 + bestA*(1-math.Exp(-k*bestR*bestR*f*f)))
	}
	lo, hi := 0.0, 4/bestSig
	if sharp(hi) > 0.5 {
		return 0
	}
	for range 60 {
		mid := 0.5 * (lo + hi)
		if sharp(mid) > 0.5 {
			lo = mid
		} else {
			hi = mid
		}
	}
	return 0.5*(lo+hi)/(0.18739/bestSig) - 1
}
