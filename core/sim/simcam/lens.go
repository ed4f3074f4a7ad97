package simcam

import "math"

// Lens gives the PSF at each image position. Rendering assumes the PSF is
// locally shift-invariant: a pixel is rendered with the PSF at its centre.
type Lens interface {
	// PSFAt returns the PSF at image position (x, y) in px.
	PSFAt(x, y float64) PSF
}

// Fixed is a lens whose PSF is the same everywhere.
type Fixed struct{ PSF }

// PSFAt implements Lens.
func (f Fixed) PSFAt(x, y float64) PSF { return f.PSF }

// FieldLens is a lens whose PSF is an elliptical Gaussian that widens with
// image height differently along and across the radius, optionally cascaded
// with a diffraction pattern, so that sagittal and tangential MTF differ.
//
// Orientation (optics convention; W. J. Smith, Modern Optical Engineering,
// 4th ed., ch. 3, chapter from memory): the tangential
// (meridional) direction at an image point runs along the radius from the
// optical centre, the sagittal direction across it. SigmaT is the PSF's
// width along the radius, so it blurs contrast that varies along the radius:
// it governs the tangential MTF, measured on a tangential edge, one whose
// edge line lies across the radius (its normal is radial). SigmaS is the
// width across the radius and governs the sagittal MTF (edge line along the
// radius, normal perpendicular to it). At the optical centre itself the radius
// is taken along +x.
//
// Widths are polynomials in the image height h (mm, from the optical centre):
// SigmaT(h) = SigmaT[0] + SigmaT[1] h + SigmaT[2] h^2 + ... px, likewise
// SigmaS; negative results count as 0. Decentring: CentreX, CentreY may
// differ from the image centre (W/2, H/2), which moves the sharpness pattern,
// and a tilt scales both widths by max(0, 1 + TiltPerMM * t), where t (mm) is
// the position's component along the direction TiltDeg measured from the
// optical centre, so one side of the frame is softer than the other at equal
// height.
type FieldLens struct {
	CentreX, CentreY float64   // optical centre, px
	PitchUM          float64   // pixel pitch, um (converts px to mm)
	SigmaT           []float64 // tangential width polynomial in h (mm) -> px
	SigmaS           []float64 // sagittal width polynomial in h (mm) -> px
	TiltPerMM        float64   // relative width change per mm along TiltDeg
	TiltDeg          float64   // direction of increasing softness, degrees
	Diffraction      *Airy     // optional diffraction, cascaded with the Gaussian
	// ExtraSigmaPx is an isotropic Gaussian of this standard deviation
	// (px) cascaded everywhere, a blur that does not come from the lens
	// (a printed chart's ink spread and dot size, say: core/sim/chartsim).
	// Gaussians cascade by adding their covariances (Goodman ch. 2), so
	// it adds ExtraSigmaPx^2 to both widths' squares.
	ExtraSigmaPx float64
}

// HeightMM returns the image height of (x, y) px: its distance from the
// optical centre in mm.
func (l FieldLens) HeightMM(x, y float64) float64 {
	return math.Hypot(x-l.CentreX, y-l.CentreY) * l.PitchUM / 1000
}

// RadialDeg returns the direction of the radius from the optical centre to
// (x, y), in degrees from +x towards +y (0 at the centre itself). A
// tangential edge at (x, y) has its normal at this angle; a sagittal edge has
// its normal at RadialDeg + 90.
func (l FieldLens) RadialDeg(x, y float64) float64 {
	dx, dy := x-l.CentreX, y-l.CentreY
	if dx == 0 && dy == 0 {
		return 0
	}
	return math.Atan2(dy, dx) * 180 / math.Pi
}

// Sigmas returns the tangential and sagittal Gaussian widths (px) at (x, y).
func (l FieldLens) Sigmas(x, y float64) (sigmaT, sigmaS float64) {
	h := l.HeightMM(x, y)
	scale := 1.0
	if l.TiltPerMM != 0 {
		s, c := math.Sincos(l.TiltDeg * math.Pi / 180)
		t := ((x-l.CentreX)*c + (y-l.CentreY)*s) * l.PitchUM / 1000
		scale = math.Max(0, 1+l.TiltPerMM*t)
	}
	return scale * math.Max(0, poly(l.SigmaT, h)), scale * math.Max(0, poly(l.SigmaS, h))
}

// gaussian returns the Gaussian part of the PSF at (x, y).
func (l FieldLens) gaussian(x, y float64) Gaussian {
	st, ss := l.Sigmas(x, y)
	if e := l.ExtraSigmaPx; e > 0 {
		st, ss = math.Sqrt(st*st+e*e), math.Sqrt(ss*ss+e*e)
	}
	return Gaussian{Sigma1: st, Sigma2: ss, AngleDeg: l.RadialDeg(x, y)}
}

// PSFAt implements Lens: Gaussian{SigmaT, SigmaS, RadialDeg}, cascaded with
// Diffraction when it is set.
func (l FieldLens) PSFAt(x, y float64) PSF {
	g := l.gaussian(x, y)
	if l.Diffraction != nil {
		return Cascade{g, *l.Diffraction}
	}
	return g
}

// covAt returns the covariance of the Gaussian part at (x, y) without
// building an interface value (the renderer's per-pixel fast path).
func (l *FieldLens) covAt(x, y float64) cov {
	st, ss := l.Sigmas(x, y)
	dx, dy := x-l.CentreX, y-l.CentreY
	r := math.Hypot(dx, dy)
	ux, uy := 1.0, 0.0
	if r > 0 {
		ux, uy = dx/r, dy/r
	}
	e2 := l.ExtraSigmaPx * l.ExtraSigmaPx
	a, b := st*st+e2, ss*ss+e2
	return cov{a*ux*ux + b*uy*uy, (a - b) * ux * uy, a*uy*uy + b*ux*ux}
}

func poly(c []float64, x float64) float64 {
	v := 0.0
	for i := len(c) - 1; i >= 0; i-- {
		v = v*x + c[i]
	}
	return v
}

// TrueMTF returns the analytic system MTF that rendering an edge at (x, y) px
// with unit normal at normalDeg produces, at frequency f cycles/pixel along
// the normal: the lens OTF times the pixel aperture's transfer function,
//
//	MTF = |OTF(f n)| * |sinc(f cos t) sinc(f sin t)|,  n = (cos t, sin t),
//
// (Goodman ch. 6 for the cascade; Boreman ch. 2 for the pixel aperture: the
// unit square projected onto n is box(|cos t|) conv box(|sin t|)).
func TrueMTF(l Lens, x, y, normalDeg, f float64) float64 {
	s, c := math.Sincos(normalDeg * math.Pi / 180)
	p := l.PSFAt(x, y)
	return math.Abs(p.OTF(f*c, f*s)) * math.Abs(sinc(f*c)*sinc(f*s))
}
