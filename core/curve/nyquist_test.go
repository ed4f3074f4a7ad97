package curve

import (
	"math"
	"testing"
)

// A sampled image carries no information about the lens above the Nyquist
// frequency, 0.5 cycles/pixel (Shannon's sampling theorem; Goodman,
// Introduction to Fourier Optics, 3rd ed., ch. 2): a spurious maximum there
// (aliased detail, noise) must not capture MTF50P, and a curve that stays
// above a level up to Nyquist has no crossing to report.
func TestSearchEndsAtNyquist(t *testing.T) {
	// Gaussian of sigma 1 px (MTF50 = 0.18739 cy/px, Fourier transform of a
	// Gaussian; Goodman ch. 2) with a spurious bump of 1.4 at 0.8 cy/px.
	c := gaussian(1)
	for i, f := range c.Freq {
		c.Value[i] += 1.4 * math.Exp(-(f-0.8)*(f-0.8)/(2*0.02*0.02))
	}
	if p, f := c.Peak(); f != 0 || p != 1 {
		t.Errorf("peak %.3f at %.2f cy/px, want 1 at 0 (the bump lies beyond Nyquist)", p, f)
	}
	if got := c.MTF50P(); math.Abs(got-0.18739) > 2e-4 {
		t.Errorf("MTF50P %.5f with a bump beyond Nyquist, want 0.18739", got)
	}
	if got := c.MTF50(); math.Abs(got-0.18739) > 2e-4 {
		t.Errorf("MTF50 %.5f, want 0.18739", got)
	}
	// Sigma 0.2 px: MTF at Nyquist exp(-2 pi^2 0.04 0.25) = 0.82, MTF50
	// 0.937 cy/px lies beyond Nyquist: not reported.
	if got := gaussian(0.2).MTF50(); !math.IsNaN(got) {
		t.Errorf("MTF50 %.3f for a curve above 0.5 up to Nyquist, want NaN (not reached)", got)
	}
	// A crossing between the last sample below Nyquist and the first above
	// it is beyond Nyquist as well.
	c = Curve{Freq: []float64{0, 0.3, 0.45, 0.6}, Value: []float64{1, 0.8, 0.7, 0.4}}
	if got := c.MTF50(); !math.IsNaN(got) {
		t.Errorf("MTF50 %.3f interpolated past Nyquist, want NaN", got)
	}
}
