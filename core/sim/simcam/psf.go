package simcam

import (
	"math"
)

// PSF is a real, centro-symmetric point spread function, described by its
// optical transfer function (OTF), which is then real.
type PSF interface {
	// OTF returns the transfer function at spatial frequency (fx, fy) in
	// cycles/pixel; OTF(0, 0) = 1.
	OTF(fx, fy float64) float64
	// Support returns the radius in px beyond which the PSF's energy is
	// negligible (see each type for the precise bound).
	Support() float64
}

// gaussSupportSigmas is the support radius of a Gaussian PSF in units of its
// largest standard deviation: the energy of a 2D Gaussian outside radius r is
// exp(-r^2 / (2 sigma^2)) (isotropic case, Rayleigh distribution), which is
// 7.9e-7 at r = 5.3 sigma; the tail beyond a line at that distance is
// Phi(-5.3) = 5.8e-8.
const gaussSupportSigmas = 5.3

// Gaussian is an elliptical Gaussian PSF with standard deviations Sigma1 and
// Sigma2 (px) along axis 1, at AngleDeg from +x towards +y, and axis 2,
// perpendicular to it. Its OTF is
//
//	OTF(f) = exp(-2 pi^2 (Sigma1^2 f1^2 + Sigma2^2 f2^2)),
//
// f1, f2 the components of f along the two axes (Fourier transform pair;
// Goodman ch. 2). Both sigmas zero is the ideal lens (OTF = 1).
type Gaussian struct{ Sigma1, Sigma2, AngleDeg float64 }

// OTF implements PSF.
func (g Gaussian) OTF(fx, fy float64) float64 {
	s, c := math.Sincos(g.AngleDeg * math.Pi / 180)
	f1 := fx*c + fy*s
	f2 := -fx*s + fy*c
	return math.Exp(-2 * math.Pi * math.Pi * (g.Sigma1*g.Sigma1*f1*f1 + g.Sigma2*g.Sigma2*f2*f2))
}

// Support implements PSF: 5.3 times the larger sigma, outside which less than
// 1e-6 of the energy lies.
func (g Gaussian) Support() float64 {
	return gaussSupportSigmas * math.Max(math.Abs(g.Sigma1), math.Abs(g.Sigma2))
}

// cov returns the covariance matrix {xx, xy, yy} in px^2.
func (g Gaussian) cov() cov {
	s, c := math.Sincos(g.AngleDeg * math.Pi / 180)
	a, b := g.Sigma1*g.Sigma1, g.Sigma2*g.Sigma2
	return cov{a*c*c + b*s*s, (a - b) * c * s, a*s*s + b*c*c}
}

// cov is a 2x2 symmetric covariance matrix {xx, xy, yy}, px^2.
type cov [3]float64

// along returns n' C n for the unit vector n = (nx, ny).
func (c cov) along(nx, ny float64) float64 {
	return c[0]*nx*nx + 2*c[1]*nx*ny + c[2]*ny*ny
}

// axes returns the standard deviations along the principal axes and the
// unit vector of the first axis.
func (c cov) axes() (s1, s2, ux, uy float64) {
	tr := c[0] + c[2]
	d := math.Hypot((c[0]-c[2])/2, c[1])
	l1, l2 := tr/2+d, tr/2-d
	th := 0.5 * math.Atan2(2*c[1], c[0]-c[2])
	uy, ux = math.Sincos(th)
	return math.Sqrt(math.Max(l1, 0)), math.Sqrt(math.Max(l2, 0)), ux, uy
}

// Airy is the PSF of a diffraction-limited lens with a circular pupil in
// incoherent light of wavelength WavelengthUM (um) at f-number FNumber, on a
// sensor of pixel pitch PitchUM (um). Its PSF is [2 J1(x)/x]^2 with
// x = pi r / (lambda N), and its OTF (Goodman ch. 6) is
//
//	OTF(v) = (2/pi) [acos(v/vc) - (v/vc) sqrt(1 - (v/vc)^2)] for v < vc, else 0,
//
// with the cut-off vc = 1/(lambda N) (lp/mm when lambda N is in mm), converted
// to cycles/pixel with the pitch: vc = PitchUM / (WavelengthUM * FNumber).
type Airy struct{ WavelengthUM, FNumber, PitchUM float64 }

// AiryTailTol is the edge-spread tail at Airy.Support: the fraction of the
// PSF's energy beyond a straight line at that distance.
const AiryTailTol = 1e-3

// CutoffCyPx returns the cut-off frequency vc in cycles/pixel.
func (a Airy) CutoffCyPx() float64 { return a.PitchUM / (a.WavelengthUM * a.FNumber) }

// CutoffLpMM returns the cut-off frequency vc = 1/(lambda N) in lp/mm.
func (a Airy) CutoffLpMM() float64 { return 1000 / (a.WavelengthUM * a.FNumber) }

// OTF implements PSF.
func (a Airy) OTF(fx, fy float64) float64 {
	v := math.Hypot(fx, fy) / a.CutoffCyPx()
	if v >= 1 {
		return 0
	}
	return 2 / math.Pi * (math.Acos(v) - v*math.Sqrt(1-v*v))
}

// Support implements PSF. The Airy pattern's energy beyond a line at distance
// r decays only as 2 lambda N / (pi^3 r) (its line spread function falls as
// 2 lambda N / (pi^3 r^2), from the OTF's slope -4/(pi vc) at zero), so a 1e-6
// bound would need some 10^5 px. Support returns the distance at which that
// tail is AiryTailTol: 2 lambda N / (pi^3 AiryTailTol) px, about 71 px at
// 0.55 um, f/8 and a 4 um pitch.
func (a Airy) Support() float64 {
	return 2 / (math.Pi * math.Pi * math.Pi * AiryTailTol * a.CutoffCyPx())
}

// Cascade is the convolution of its members: its OTF is the product of
// theirs (Goodman ch. 6). An empty Cascade is the ideal lens.
type Cascade []PSF

// OTF implements PSF.
func (c Cascade) OTF(fx, fy float64) float64 {
	v := 1.0
	for _, p := range c {
		v *= p.OTF(fx, fy)
	}
	return v
}

// Support implements PSF: the root sum of squares of the members' supports
// (exact for Gaussians, whose variances add).
func (c Cascade) Support() float64 {
	s := 0.0
	for _, p := range c {
		r := p.Support()
		s += r * r
	}
	return math.Sqrt(s)
}

// gaussCov reports whether p is Gaussian (a Gaussian, or a Cascade of
// Gaussians, whose covariances add) and returns its covariance.
func gaussCov(p PSF) (cov, bool) {
	switch q := p.(type) {
	case Gaussian:
		return q.cov(), true
	case *Gaussian:
		return q.cov(), true
	case Cascade:
		var c cov
		for _, m := range q {
			mc, ok := gaussCov(m)
			if !ok {
				return cov{}, false
			}
			c[0] += mc[0]
			c[1] += mc[1]
			c[2] += mc[2]
		}
		return c, true
	}
	return cov{}, false
}

// maxUnknownFreq is the frequency (cycles/pixel) beyond which the OTF of a
// PSF type this package does not know is assumed to vanish.
const maxUnknownFreq = 64

// bandLimit returns a frequency (cycles/pixel) beyond which p's OTF is zero
// (Airy: its cut-off), +Inf for Gaussians, maxUnknownFreq for unknown types.
func bandLimit(p PSF) float64 {
	switch q := p.(type) {
	case Gaussian, *Gaussian:
		return math.Inf(1)
	case Airy:
		return q.CutoffCyPx()
	case *Airy:
		return q.CutoffCyPx()
	case Cascade:
		b := math.Inf(1)
		for _, m := range q {
			b = math.Min(b, bandLimit(m))
		}
		return b
	}
	return maxUnknownFreq
}

// kinkSlope returns a with OTF(f n) = 1 - a |f| + O(f^2) near f = 0 along the
// unit vector n: 4/(pi vc) for an Airy pattern (from the expansion of the
// OTF above), 0 for Gaussians, summed over a Cascade (product rule). Unknown
// types get a finite-difference estimate.
func kinkSlope(p PSF, nx, ny float64) float64 {
	switch q := p.(type) {
	case Gaussian, *Gaussian:
		return 0
	case Airy:
		return 4 / (math.Pi * q.CutoffCyPx())
	case *Airy:
		return 4 / (math.Pi * q.CutoffCyPx())
	case Cascade:
		a := 0.0
		for _, m := range q {
			a += kinkSlope(m, nx, ny)
		}
		return a
	}
	const h = 1e-4
	// OTF(h) = 1 - a h + b h^2: eliminate b with two steps.
	d1 := 1 - p.OTF(h*nx, h*ny)
	d2 := 1 - p.OTF(2*h*nx, 2*h*ny)
	return (4*d1 - d2) / (2 * h)
}

// sinc returns sin(pi x) / (pi x), 1 at 0.
func sinc(x float64) float64 {
	if math.Abs(x) < 1e-8 {
		return 1
	}
	return math.Sin(math.Pi*x) / (math.Pi * x)
}
