package simcam

import (
	"math"
	"testing"
)

// TestAiryOTF checks the diffraction-limited OTF against Goodman,
// Introduction to Fourier Optics, 3rd ed., ch. 6 (the circular pupil's
// OTF, evaluated by hand): lambda = 0.55 um, f/8 -> vc = 227.3 lp/mm, MTF(vc/2) = 0.391.
func TestAiryOTF(t *testing.T) {
	a := Airy{WavelengthUM: 0.55, FNumber: 8, PitchUM: 4}
	if got := a.CutoffLpMM(); math.Abs(got-227.3) > 0.05 {
		t.Errorf("cut-off %v lp/mm, want 227.3", got)
	}
	// cycles/pixel = lp/mm * pitch in mm (common practice: unit definition)
	if got, want := a.CutoffCyPx(), 227.27*0.004; math.Abs(got-want) > 1e-3 {
		t.Errorf("cut-off %v cy/px, want %v", got, want)
	}
	half := a.CutoffCyPx() / 2
	cases := []struct {
		name      string
		fx, fy    float64
		want, tol float64
	}{
		{"zero", 0, 0, 1, 1e-15},
		{"half cut-off along x", half, 0, 0.391, 5e-4},
		{"half cut-off diagonal", half / math.Sqrt2, half / math.Sqrt2, 0.391, 5e-4},
		{"beyond cut-off", a.CutoffCyPx() * 1.01, 0, 0, 0},
	}
	for _, c := range cases {
		if got := a.OTF(c.fx, c.fy); math.Abs(got-c.want) > c.tol {
			t.Errorf("%s: OTF %v, want %v", c.name, got, c.want)
		}
	}
}

// TestGaussianOTF checks MTF50 = sqrt(ln 2 / (2 pi^2)) / sigma = 0.18739 /
// sigma cycles/pixel (Fourier transform pair of the Gaussian; Goodman,
// Introduction to Fourier Optics, 3rd ed., ch. 2), along each principal axis of an elliptical Gaussian.
func TestGaussianOTF(t *testing.T) {
	g := Gaussian{Sigma1: 1.6, Sigma2: 0.8, AngleDeg: 30}
	s, c := math.Sincos(30 * math.Pi / 180)
	cases := []struct {
		name         string
		fx, fy, want float64
	}{
		{"axis 1 MTF50", 0.18739 / 1.6 * c, 0.18739 / 1.6 * s, 0.5},
		{"axis 2 MTF50", -0.18739 / 0.8 * s, 0.18739 / 0.8 * c, 0.5},
	}
	for _, k := range cases {
		if got := g.OTF(k.fx, k.fy); math.Abs(got-k.want) > 1e-4 {
			t.Errorf("%s: %v want %v", k.name, got, k.want)
		}
	}
	// Cascade: OTF is the product (Goodman ch. 6); Gaussians add variances.
	cas := Cascade{Gaussian{0.6, 0.6, 0}, Gaussian{0.8, 0.8, 0}}
	one := Gaussian{1, 1, 0}
	if d := math.Abs(cas.OTF(0.2, 0.1) - one.OTF(0.2, 0.1)); d > 1e-15 {
		t.Errorf("cascade of 0.6 and 0.8 differs from sigma 1 by %v", d)
	}
}

// TestTrueMTF checks the system MTF: ideal lens at Nyquist is the pixel
// aperture |sinc(0.5)| = 2/pi = 0.6366 (Boreman, MTF in Optical and Electro-Optical Systems, ch. 2),
// and a Gaussian lens multiplies it (cascade, Goodman ch. 6).
func TestTrueMTF(t *testing.T) {
	cases := []struct {
		name            string
		lens            Lens
		normal, f, want float64
	}{
		{"ideal nyquist", Fixed{Gaussian{}}, 0, 0.5, 2 / math.Pi},
		{"ideal 45 deg", Fixed{Gaussian{}}, 45, 0.5, math.Pow(sinc(0.5/math.Sqrt2), 2)},
		{"gaussian nyquist", Fixed{Gaussian{1, 1, 0}}, 0, 0.5, 2 / math.Pi * math.Exp(-2*math.Pi*math.Pi*0.25)},
	}
	for _, c := range cases {
		if got := TrueMTF(c.lens, 10, 10, c.normal, c.f); math.Abs(got-c.want) > 1e-4 {
			t.Errorf("%s: %v want %v", c.name, got, c.want)
		}
	}
}

// TestFieldLensOrientation checks the sagittal/tangential convention
// (W. J. Smith, Modern Optical Engineering, 4th ed., ch. 3; chapter from
// memory): SigmaT is the width along the radius (tangential MTF,
// edge normal radial), SigmaS across it. The Gaussian OTF along a direction
// is exp(-2 pi^2 s^2 f^2) with s the width along it (Goodman ch. 2).
func TestFieldLensOrientation(t *testing.T) {
	l := FieldLens{CentreX: 100, CentreY: 50, PitchUM: 5, SigmaT: []float64{0.4, 0, 0.5}, SigmaS: []float64{0.4, 0.1}}
	const f = 0.2
	for _, p := range [][2]float64{{400, 50}, {100, 350}, {-150, -150}, {330, 210}} {
		h := l.HeightMM(p[0], p[1])
		st := 0.4 + 0.5*h*h
		ss := 0.4 + 0.1*h
		rad := l.RadialDeg(p[0], p[1]) * math.Pi / 180
		want := func(s float64) float64 { return math.Exp(-2 * math.Pi * math.Pi * s * s * f * f) }
		ps := l.PSFAt(p[0], p[1])
		if got := ps.OTF(f*math.Cos(rad), f*math.Sin(rad)); math.Abs(got-want(st)) > 1e-12 {
			t.Errorf("%v: radial OTF %v want %v (sigmaT %v)", p, got, want(st), st)
		}
		if got := ps.OTF(-f*math.Sin(rad), f*math.Cos(rad)); math.Abs(got-want(ss)) > 1e-12 {
			t.Errorf("%v: tangential-direction OTF %v want %v (sigmaS %v)", p, got, want(ss), ss)
		}
		// A tangential edge has its normal along the radius.
		tan := TrueMTF(l, p[0], p[1], l.RadialDeg(p[0], p[1]), f)
		if d := tan / math.Abs(sinc(f*math.Cos(rad))*sinc(f*math.Sin(rad))); math.Abs(d-want(st)) > 1e-12 {
			t.Errorf("%v: tangential TrueMTF / pixel %v want %v", p, d, want(st))
		}
		// The fast covariance path agrees with the PSF.
		c := l.covAt(p[0], p[1])
		nx, ny := math.Cos(rad), math.Sin(rad)
		if d := math.Sqrt(c.along(nx, ny)) - st; math.Abs(d) > 1e-12 {
			t.Errorf("%v: covAt radial sigma off by %v", p, d)
		}
	}
	// Tilt: equal height, opposite sides, different width.
	l.TiltPerMM = 0.1
	a, _ := l.Sigmas(300, 50)
	b, _ := l.Sigmas(-100, 50)
	if !(a > b) {
		t.Errorf("tilt along +x: sigmaT right %v should exceed left %v", a, b)
	}
}
