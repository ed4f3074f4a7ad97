// Package curve holds a spatial frequency response (an MTF curve) and the
// figures read from it: MTF50, MTF50P, the value at given frequencies and at
// Nyquist, with unit conversions between cycles/pixel, lp/mm and LW/PH.
//
// Frequencies are in cycles per pixel throughout; the Nyquist frequency of a
// sampled image is 0.5 cycles/pixel. MTF is an amplitude ratio, 1 at zero
// frequency (Goodman, Introduction to Fourier Optics, 3rd ed., ch. 6).
package curve

import "math"

// Nyquist is the Nyquist frequency of a sampled image, in cycles/pixel.
const Nyquist = 0.5

// Curve is an MTF sampled at ascending frequencies (cycles/pixel), Freq[0] = 0.
type Curve struct {
	Freq  []float64
	Value []float64
}

// At returns the response at frequency f (cycles/pixel) by linear
// interpolation; outside the sampled range it returns NaN.
func (c Curve) At(f float64) float64 {
	n := len(c.Freq)
	if n == 0 || f < c.Freq[0] || f > c.Freq[n-1] || math.IsNaN(f) {
		return math.NaN()
	}
	i := search(c.Freq, f)
	if i == 0 {
		return c.Value[0]
	}
	f0, f1 := c.Freq[i-1], c.Freq[i]
	if f1 == f0 {
		return c.Value[i]
	}
	t := (f - f0) / (f1 - f0)
	return c.Value[i-1]*(1-t) + c.Value[i]*t
}

// search returns the first index i with Freq[i] >= f.
func search(freq []float64, f float64) int {
	lo, hi := 0, len(freq)
	for lo < hi {
		m := (lo + hi) / 2
		if freq[m] < f {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo
}

// AtNyquist returns the response at 0.5 cycles/pixel.
func (c Curve) AtNyquist() float64 { return c.At(Nyquist) }

// Peak returns the largest response at or below the Nyquist frequency and
// the frequency where it occurs. Above Nyquist a sampled image holds only
// aliases and noise (Shannon's sampling theorem; Goodman, Introduction to
// Fourier Optics, 3rd ed., ch. 2), so a maximum there is no property of the
// lens and must not capture MTF50P.
func (c Curve) Peak() (value, freq float64) {
	value = math.Inf(-1)
	for i, v := range c.Value {
		if c.Freq[i] > Nyquist+1e-12 {
			break
		}
		if v > value {
			value, freq = v, c.Freq[i]
		}
	}
	return value, freq
}

// Crossing returns the lowest frequency above the curve's peak at which the
// response falls to level, by linear interpolation between samples, or NaN
// if it does not fall to it at or below the Nyquist frequency (a crossing
// beyond Nyquist is not reported: the search ends there, see Peak).
func (c Curve) Crossing(level float64) float64 {
	_, pf := c.Peak()
	for i := 1; i < len(c.Value); i++ {
		if c.Freq[i-1] >= Nyquist-1e-12 {
			break
		}
		if c.Freq[i] <= pf {
			continue
		}
		v0, v1 := c.Value[i-1], c.Value[i]
		if v0 >= level && v1 < level {
			t := (v0 - level) / (v0 - v1)
			if f := c.Freq[i-1] + t*(c.Freq[i]-c.Freq[i-1]); f <= Nyquist+1e-12 {
				return f
			}
			return math.NaN()
		}
	}
	return math.NaN()
}

// MTF50SE returns the standard error of MTF50 for standard errors se of
// the values (same length as Value), by first-order propagation: an error
// e in the values near the crossing moves it by e / |dMTF/df|, the slope
// taken over +-0.02 cy/px around it. It returns NaN when MTF50 is not
// found or the curve does not fall there.
func (c Curve) MTF50SE(se []float64) float64 {
	f50 := c.MTF50()
	if math.IsNaN(f50) || len(se) != len(c.Freq) {
		return math.NaN()
	}
	const h = 0.02
	lo := math.Max(f50-h, c.Freq[0])
	slope := (c.At(lo) - c.At(f50+h)) / (f50 + h - lo)
	if !(slope > 0) {
		return math.NaN()
	}
	return Curve{Freq: c.Freq, Value: se}.At(f50) / slope
}

// MTF50 is the frequency (cycles/pixel) where the response first falls to
// 0.5 of its zero-frequency value (common practice).
func (c Curve) MTF50() float64 { return c.Crossing(0.5) }

// MTF50P is the frequency where the response falls to half of its peak; it
// differs from MTF50 when sharpening lifts the curve above 1 (common practice).
func (c Curve) MTF50P() float64 {
	p, _ := c.Peak()
	return c.Crossing(0.5 * p)
}

// LPPerMM converts cycles/pixel to line pairs per millimetre on the sensor,
// for a pixel pitch in micrometres: lp/mm = (cy/px) / (pitch in mm).
func LPPerMM(cyPx, pitchUM float64) float64 { return cyPx / (pitchUM / 1000) }

// CyPerPx converts line pairs per millimetre on the sensor to cycles/pixel.
func CyPerPx(lpMM, pitchUM float64) float64 { return lpMM * pitchUM / 1000 }

// LWPerPH converts cycles/pixel to line widths per picture height:
// LW/PH = 2 x (cy/px) x picture height in pixels (common practice).
func LWPerPH(cyPx float64, heightPx int) float64 { return 2 * cyPx * float64(heightPx) }
