// Package srgb is the one sRGB transfer function of the project, in both
// directions (IEC 61966-2-1:1999, section 5.2). It imports nothing of the
// project, so the decoder, the simulated camera, the preview, the plots and
// the printed chart all use it without depending on each other.
package srgb

import "math"

// ToLinear is the sRGB decoding function of IEC 61966-2-1:1999, section
// 5.2: L = V/12.92 for V <= 0.04045, else ((V+0.055)/1.055)^2.4, with V and
// L in [0, 1]. V >= 1 gives exactly 1.
func ToLinear(v float64) float64 {
	switch {
	case v <= 0:
		return 0
	case v >= 1:
		return 1
	case v <= 0.04045:
		return v / 12.92
	}
	return math.Pow((v+0.055)/1.055, 2.4)
}

// FromLinear is the sRGB encoding function of IEC 61966-2-1:1999, section
// 5.2, the inverse of ToLinear: V = 12.92 L for L <= 0.0031308, else
// 1.055 L^(1/2.4) - 0.055. It does not clamp: L above 1 gives V above 1
// (the simulated camera sharpens before it clips); callers that write code
// values clamp.
func FromLinear(l float64) float64 {
	if l <= 0.0031308 {
		return 12.92 * l
	}
	return 1.055*math.Pow(l, 1/2.4) - 0.055
}
