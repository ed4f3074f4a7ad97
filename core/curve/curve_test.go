package curve

import (
	"math"
	"testing"
)

func gaussian(sigma float64) Curve {
	var c Curve
	for i := 0; i <= 100; i++ {
		f := float64(i) / 100
		c.Freq = append(c.Freq, f)
		c.Value = append(c.Value, math.Exp(-2*math.Pi*math.Pi*sigma*sigma*f*f))
	}
	return c
}

func TestMTF50Gaussian(t *testing.T) {
	// For a Gaussian PSF of std dev s px, MTF50 = sqrt(ln 2 / (2 pi^2)) / s
	// = 0.18739 / s cycles/pixel (Fourier transform of a Gaussian; Goodman,
	// Introduction to Fourier Optics, ch. 2). Linear interpolation between
	// samples 0.01 apart is good to about 1e-4 here.
	for _, s := range []float64{0.5, 1, 2} {
		got := gaussian(s).MTF50()
		want := 0.18739 / s
		if math.Abs(got-want) > 2e-4*want/0.18739+1e-4 {
			t.Errorf("sigma %g: MTF50 %.5f, want %.5f", s, got, want)
		}
	}
}

func TestMTF50PSharpened(t *testing.T) {
	// A curve lifted above 1 by sharpening: MTF50P is where it falls to half
	// its peak, MTF50 where it falls to 0.5 (common practice).
	c := Curve{Freq: []float64{0, 0.1, 0.2, 0.3, 0.4}, Value: []float64{1, 1.2, 0.9, 0.55, 0.3}}
	if got := c.MTF50(); math.Abs(got-0.32) > 1e-9 {
		t.Errorf("MTF50 %v, want 0.32", got)
	}
	// Half the peak is 0.6, crossed between 0.2 (0.9) and 0.3 (0.55):
	// 0.2 + (0.9-0.6)/(0.9-0.55)*0.1 = 0.285714...
	if got := c.MTF50P(); math.Abs(got-(0.2+0.3/0.35*0.1)) > 1e-9 {
		t.Errorf("MTF50P %v", got)
	}
	if got := (Curve{Freq: []float64{0, 0.5}, Value: []float64{1, 0.9}}).MTF50(); !math.IsNaN(got) {
		t.Errorf("MTF50 of a curve that never falls to 0.5: %v, want NaN", got)
	}
}

func TestAtAndUnits(t *testing.T) {
	c := Curve{Freq: []float64{0, 0.25, 0.5}, Value: []float64{1, 0.5, 0.2}}
	cases := []struct {
		name      string
		got, want float64
	}{
		{"interpolated", c.At(0.125), 0.75},
		{"at Nyquist", c.AtNyquist(), 0.2},
		// lp/mm = cy/px / pitch (mm): 4 um pitch, 0.5 cy/px -> 125 lp/mm
		// (common practice: the definition of the units).
		{"lp/mm", LPPerMM(0.5, 4), 125},
		{"cy/px", CyPerPx(125, 4), 0.5},
		// LW/PH = 2 x cy/px x picture height px (common practice).
		{"LW/PH", LWPerPH(0.25, 4000), 2000},
	}
	for _, k := range cases {
		if math.Abs(k.got-k.want) > 1e-12 {
			t.Errorf("%s: %v, want %v", k.name, k.got, k.want)
		}
	}
	if !math.IsNaN(c.At(0.6)) || !math.IsNaN(c.At(-0.1)) {
		t.Error("At outside the sampled range is not NaN")
	}
}
