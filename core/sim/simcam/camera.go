package simcam

import (
	"fmt"
	"math"

	"sagitta/core/plane"
)

// Encoding is how Capture turns linear values into code values.
type Encoding int

const (
	SRGB8    Encoding = iota // 8-bit sRGB (IEC 61966-2-1 transfer function)
	SRGB16                   // 16-bit sRGB
	Linear8                  // 8-bit, code = round(255 v)
	Linear16                 // 16-bit, code = round(65535 v)
)

// String returns the encoding's name.
func (e Encoding) String() string {
	switch e {
	case SRGB8:
		return "sRGB8"
	case SRGB16:
		return "sRGB16"
	case Linear8:
		return "linear8"
	case Linear16:
		return "linear16"
	}
	return fmt.Sprintf("Encoding(%d)", int(e))
}

// sixteen reports whether the encoding has 16-bit codes.
func (e Encoding) sixteen() bool { return e == SRGB16 || e == Linear16 }

// UnsharpMask is in-camera sharpening applied to the encoded (gamma) values:
// out = v + Amount * (v - gaussblur(v, RadiusPx)), RadiusPx the Gaussian's
// standard deviation in px, clipped to the code range.
type UnsharpMask struct {
	Amount, RadiusPx float64
}

// Camera is a simulated camera: a W x H sensor of square pixels with 100 %
// fill factor behind Lens, with optional noise, sharpening and encoding.
type Camera struct {
	W, H        int
	Lens        Lens         // nil is the ideal lens
	FullWellE   float64      // electrons at linear level 1 (0 = no noise)
	ReadNoiseE  float64      // read noise, electrons rms
	Seed        uint64       // noise seed (math/rand/v2 PCG): same seed -> same photo
	Encoding    Encoding     // SRGB8, SRGB16, Linear8, Linear16
	Colour      bool         // write RGB with equal channels (else grey)
	JPEGQuality int          // 0 = lossless PNG from Encode; 1..100 = JPEG
	Sharpen     *UnsharpMask // optional in-camera sharpening of encoded values
	// Curve, if set, is a camera's own tone curve applied to every encoded
	// value in [0, 1] after the transfer function and before sharpening
	// (an S-curve, say); it should map [0, 1] onto [0, 1] monotonically.
	Curve    func(v float64) float64
	ExifAPP1 []byte // optional "Exif\0\0"+TIFF payload, APP1 after SOI in JPEG output
	// ChannelMag, when not all 0, gives a Colour camera lateral chromatic
	// aberration: red, green and blue are rendered through magnifications
	// 1 + ChannelMag[c] about ChannelCentre (px; zero: the frame's centre),
	// so {0.0008, 0, -0.0008} puts red 0.08 % farther out and blue 0.08 %
	// nearer the centre than green (colour.go). Each channel gets its own
	// noise.
	ChannelMag    [3]float64
	ChannelCentre [2]float64
	// Distortion and Falloff, if set, bend the image radially and darken
	// it away from the optical centre (lensgeom.go).
	Distortion *Distortion
	Falloff    *Falloff
}

// MaxPixels is the largest frame (W * H) a Camera renders.
const MaxPixels = 1 << 27

// Validate reports whether the camera's settings are usable; the error is an
// *InvalidError or *UnsupportedError.
func (c *Camera) Validate() error {
	if c.W <= 0 || c.H <= 0 || c.W > MaxPixels/c.H {
		return invalidf("frame size %dx%d out of range (1 .. %d pixels)", c.W, c.H, MaxPixels)
	}
	if err := validLens(c.Lens); err != nil {
		return err
	}
	if err := c.validGeometry(); err != nil {
		return err
	}
	if !finite(c.FullWellE) || c.FullWellE < 0 || !finite(c.ReadNoiseE) || c.ReadNoiseE < 0 {
		return invalidf("noise parameters must be finite and >= 0")
	}
	if c.ReadNoiseE > 0 && c.FullWellE == 0 {
		return invalidf("read noise needs FullWellE > 0 to scale electrons to levels")
	}
	if c.Encoding < SRGB8 || c.Encoding > Linear16 {
		return invalidf("unknown encoding %v", c.Encoding)
	}
	if c.JPEGQuality < 0 || c.JPEGQuality > 100 {
		return invalidf("JPEG quality %d out of range 0..100", c.JPEGQuality)
	}
	if c.JPEGQuality > 0 && c.Encoding.sixteen() {
		return UnsupportedError("JPEG output of a 16-bit encoding")
	}
	if s := c.Sharpen; s != nil {
		if !finite(s.Amount) || s.Amount < 0 || !finite(s.RadiusPx) || s.RadiusPx <= 0 || s.RadiusPx > 100 {
			return invalidf("unsharp mask amount must be >= 0 and radius in (0, 100] px")
		}
	}
	for _, m := range c.ChannelMag {
		if !finite(m) || math.Abs(m) > 0.05 {
			return invalidf("channel magnification %v outside [-0.05, 0.05]", m)
		}
	}
	if n := len(c.ExifAPP1); n > 0 {
		if n < 14 || string(c.ExifAPP1[:6]) != "Exif\x00\x00" {
			return invalidf("APP1 payload must start with \"Exif\\0\\0\" and a TIFF header")
		}
		if n > 65533 {
			return invalidf("APP1 payload of %d bytes exceeds a JPEG segment (65533)", n)
		}
	}
	return nil
}

// validLens checks the parameters of the lens types this package defines.
func validLens(l Lens) error {
	switch f := l.(type) {
	case nil:
		return nil
	case Fixed:
		return validPSF(f.PSF)
	case *Fixed:
		return validPSF(f.PSF)
	case FieldLens:
		return validField(&f)
	case *FieldLens:
		return validField(f)
	}
	return nil
}

func validField(f *FieldLens) error {
	if !finite(f.PitchUM) || f.PitchUM <= 0 {
		return invalidf("field lens pitch %v um must be > 0", f.PitchUM)
	}
	if !finite(f.ExtraSigmaPx) || f.ExtraSigmaPx < 0 {
		return invalidf("field lens extra blur %v px must be finite and >= 0", f.ExtraSigmaPx)
	}
	for _, v := range append(append([]float64{f.CentreX, f.CentreY, f.TiltPerMM, f.TiltDeg}, f.SigmaT...), f.SigmaS...) {
		if !finite(v) {
			return invalidf("field lens has a non-finite parameter")
		}
	}
	if f.Diffraction != nil {
		return validPSF(*f.Diffraction)
	}
	return nil
}

func validPSF(p PSF) error {
	switch q := p.(type) {
	case nil:
		return nil
	case Gaussian:
		if !finite(q.Sigma1) || !finite(q.Sigma2) || q.Sigma1 < 0 || q.Sigma2 < 0 || !finite(q.AngleDeg) {
			return invalidf("Gaussian sigmas must be finite and >= 0")
		}
	case Airy:
		if !(q.WavelengthUM > 0) || !(q.FNumber > 0) || !(q.PitchUM > 0) || !finite(q.CutoffCyPx()) {
			return invalidf("Airy wavelength, f-number and pitch must be > 0")
		}
		if q.Support() > 1e4 {
			return UnsupportedError("Airy pattern wider than 1e4 px")
		}
	case Cascade:
		for _, m := range q {
			if err := validPSF(m); err != nil {
				return err
			}
		}
	}
	return nil
}

func (c *Camera) lens() Lens {
	if c.Lens == nil {
		return Fixed{Gaussian{}}
	}
	return c.Lens
}

// Render returns the noise-free linear image of scene s (see RenderLinear),
// or an error if the camera or scene is invalid.
func (c *Camera) Render(s Scene) (*plane.Plane, error) {
	if err := c.Validate(); err != nil {
		return nil, err
	}
	if err := s.Validate(); err != nil {
		return nil, err
	}
	if c.Distortion != nil {
		s = c.Distortion.distort(s, c.W, c.H)
	}
	o := newOptics(c.lens(), c.W, c.H)
	p := plane.New(c.W, c.H)
	newRenderer(c.W, c.H, s, o).renderPolygons(p)
	for _, st := range s.Stars {
		addPattern(p, c.lens(), s.Background, starPattern(st))
	}
	for _, g := range s.Gratings {
		addPattern(p, c.lens(), s.Background, gratingPattern(g))
	}
	if c.Falloff != nil {
		c.Falloff.shade(p)
	}
	return p, nil
}

// RenderLinear returns the noise-free linear image of scene s: each pixel is
// (scene conv PSF conv pixel box) at its centre (see the package doc for the
// method and its accuracy). It panics if the camera or scene is invalid
// (scenes are built by programs, so that is a programmer error); use Render
// to get an error instead.
func (c *Camera) RenderLinear(s Scene) *plane.Plane {
	p, err := c.Render(s)
	if err != nil {
		panic(err)
	}
	return p
}
