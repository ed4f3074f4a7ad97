// Package optics gives the reference curve drawn beside a measured MTF: the
// response of a perfect lens on the photo's sensor. It is the one
// definition used by the plots (core/plot) and the page (through wasm).
package optics

import (
	"fmt"
	"math"
)

// WavelengthUM is the light the reference assumes, micrometres: 0.55 um,
// green, near the peak of the eye's and most sensors' sensitivity (common
// practice).
const WavelengthUM = 0.55

// SharpenedMargin is how far (in MTF) a measured curve may rise above the
// perfect lens before the page says the file looks sharpened: a measured
// system MTF above the best possible one cannot come from the lens, only
// from processing (or a wrong f-number); 0.05 leaves room for the
// measurement's own noise.
const SharpenedMargin = 0.05

// DiffractionMTF is the MTF of an aberration-free lens with a circular
// pupil in incoherent light (J. W. Goodman, Introduction to Fourier Optics,
// 3rd ed., 2005, ch. 6, the OTF of a diffraction-limited system):
//
//	MTF(v) = (2/pi) [acos(v/vc) - (v/vc) sqrt(1 - (v/vc)^2)] for v < vc, else 0,
//
// with cut-off vc = 1/(lambda N). v and vc share any unit. It returns NaN
// for a cut-off that is not positive.
func DiffractionMTF(v, vc float64) float64 {
	if !(vc > 0) {
		return math.NaN()
	}
	x := math.Abs(v) / vc
	if x >= 1 {
		return 0
	}
	return 2 / math.Pi * (math.Acos(x) - x*math.Sqrt(1-x*x))
}

// CutoffLPMM returns the diffraction cut-off vc = 1/(lambda N) in lp/mm
// (line pairs per millimetre on the sensor) for f-number n and wavelength
// lambda in um (f/8 at 0.55 um: 227.3 lp/mm).
func CutoffLPMM(n, wavelengthUM float64) float64 { return 1000 / (wavelengthUM * n) }

// PixelMTF is the transfer function of a square pixel of 100 % fill factor
// across an edge along a pixel axis, |sin(pi f) / (pi f)| with f in
// cycles/pixel (G. D. Boreman, Modulation Transfer Function in Optical and
// Electro-Optical Systems, SPIE Press, 2001, ch. 2, the detector footprint).
func PixelMTF(f float64) float64 {
	if f == 0 {
		return 1
	}
	return math.Abs(math.Sin(math.Pi*f) / (math.Pi * f))
}

// PerfectLens returns the MTF of a perfect lens at f-number fNumber on a
// sensor of pixel pitch pitchUM (um), in light of wavelengthUM (um), at
// the frequencies freqsCyPx (cycles/pixel): diffraction times the pixel
// aperture. A measured curve is the system's MTF (lens, pixel, processing),
// so its reference includes the pixel: a perfect lens and a perfect sensor
// give this curve, and a measured curve above it was sharpened.
func PerfectLens(fNumber, pitchUM, wavelengthUM float64, freqsCyPx []float64) ([]float64, error) {
	if !(fNumber > 0) || math.IsInf(fNumber, 0) {
		return nil, fmt.Errorf("optics: f-number %g is not positive", fNumber)
	}
	if !(pitchUM > 0) || math.IsInf(pitchUM, 0) {
		return nil, fmt.Errorf("optics: pixel pitch %g um is not positive", pitchUM)
	}
	if !(wavelengthUM > 0) || math.IsInf(wavelengthUM, 0) {
		return nil, fmt.Errorf("optics: wavelength %g um is not positive", wavelengthUM)
	}
	vc := CutoffLPMM(fNumber, wavelengthUM) * pitchUM / 1000 // cycles/pixel
	out := make([]float64, len(freqsCyPx))
	for i, f := range freqsCyPx {
		out[i] = DiffractionMTF(f, vc) * PixelMTF(f)
	}
	return out, nil
}

// PerfectLensMTF50 returns the frequency (cycles/pixel) where PerfectLens
// falls to 0.5, by bisection: diffraction and the pixel aperture both fall
// over [0, min(cut-off, 1 cy/px)], so their product crosses 0.5 once.
func PerfectLensMTF50(fNumber, pitchUM, wavelengthUM float64) (float64, error) {
	if _, err := PerfectLens(fNumber, pitchUM, wavelengthUM, nil); err != nil {
		return math.NaN(), err
	}
	vc := CutoffLPMM(fNumber, wavelengthUM) * pitchUM / 1000
	lo, hi := 0.0, math.Min(vc, 1)
	for i := 0; i < 60; i++ {
		mid := (lo + hi) / 2
		if DiffractionMTF(mid, vc)*PixelMTF(mid) > 0.5 {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2, nil
}

// Exceeds reports whether a measured curve rises above its reference
// (same frequencies) by more than SharpenedMargin anywhere both are known.
func Exceeds(measured, reference []float64) bool {
	for i := range measured {
		if i < len(reference) && measured[i] > reference[i]+SharpenedMargin {
			return true
		}
	}
	return false
}
