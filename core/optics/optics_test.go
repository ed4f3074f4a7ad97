package optics

import (
	"math"
	"testing"
)

// Goodman, Introduction to Fourier Optics, 3rd ed., ch. 6: the cut-off of a
// diffraction-limited system is 1/(lambda N); at f/8 in 0.55 um light that
// is 1000/(0.55*8) = 227.3 lp/mm, and the MTF of a circular pupil at half
// the cut-off is (2/pi)(acos 0.5 - 0.5 sqrt 0.75) = 0.391.
func TestDiffractionGoodman(t *testing.T) {
	if vc := CutoffLPMM(8, 0.55); math.Abs(vc-227.3) > 0.05 {
		t.Errorf("cut-off at f/8 = %.2f lp/mm, want 227.3", vc)
	}
	vc := CutoffLPMM(8, 0.55)
	for _, c := range []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"half cut-off", DiffractionMTF(vc/2, vc), 0.391, 0.0005},
		{"zero", DiffractionMTF(0, vc), 1, 1e-12},
		{"at cut-off", DiffractionMTF(vc, vc), 0, 0},
		{"beyond", DiffractionMTF(2*vc, vc), 0, 0},
	} {
		if math.Abs(c.got-c.want) > c.tol {
			t.Errorf("%s: %.5f, want %.5f", c.name, c.got, c.want)
		}
	}
}

// Boreman, MTF in Optical and Electro-Optical Systems, ch. 2: a square
// pixel's footprint MTF is |sinc|, 2/pi = 0.6366 at Nyquist (0.5
// cycles/pixel) and 0 at 1 cycle/pixel.
func TestPixelBoreman(t *testing.T) {
	if v := PixelMTF(0.5); math.Abs(v-2/math.Pi) > 1e-12 {
		t.Errorf("pixel MTF at Nyquist %.5f, want 0.63662", v)
	}
	if v := PixelMTF(1); v > 1e-12 {
		t.Errorf("pixel MTF at 1 cy/px %.2g, want 0", v)
	}
	if PixelMTF(0) != 1 {
		t.Errorf("pixel MTF at 0 is not 1")
	}
}

// The perfect lens is the product: with a 4.4 um pitch at f/8 the half
// cut-off, 113.6 lp/mm, is 0.5 cycles/pixel, so the value there is
// 0.391 * 2/pi = 0.249 (Goodman ch. 6 times Boreman ch. 2).
func TestPerfectLens(t *testing.T) {
	got, err := PerfectLens(8, 4.4, 0.55, []float64{0, 0.5, 1})
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{1, 0.391 * 2 / math.Pi, 0}
	for i := range want {
		if math.Abs(got[i]-want[i]) > 0.0005 {
			t.Errorf("at %d: %.5f, want %.5f", i, got[i], want[i])
		}
	}
	for _, bad := range [][3]float64{{0, 4, 0.55}, {8, -1, 0.55}, {8, 4, 0}, {math.NaN(), 4, 0.55}} {
		if _, err := PerfectLens(bad[0], bad[1], bad[2], []float64{0.1}); err == nil {
			t.Errorf("PerfectLens(%v) gave no error", bad)
		}
	}
}

func TestExceeds(t *testing.T) {
	ref := []float64{1, 0.5, 0.2}
	if Exceeds([]float64{1, 0.54, 0.2}, ref) {
		t.Error("0.04 above counted as sharpened")
	}
	if !Exceeds([]float64{1, 0.5, 0.26}, ref) {
		t.Error("0.06 above not counted as sharpened")
	}
}

// TestPerfectLensMTF50: the diffraction MTF alone falls to one half at
// 0.4040 of the cut-off (Goodman ch. 6's formula, solved numerically:
// (2/pi)(acos 0.404 - 0.404 sqrt(1 - 0.404^2)) = 0.49997; the root is 0.40397), so with a pixel
// so small that its aperture passes everything, f/8 at 0.55 um gives
// 0.404 x 227.27 lp/mm; with a real pitch the product crosses 0.5 where
// PerfectLens says 0.5.
func TestPerfectLensMTF50(t *testing.T) {
	f50, err := PerfectLensMTF50(8, 0.001, 0.55)
	if err != nil {
		t.Fatal(err)
	}
	if lpmm := f50 / (0.001 / 1000); math.Abs(lpmm-0.40397*227.2727) > 0.05 {
		t.Errorf("MTF50 of diffraction alone at f/8: %.2f lp/mm, want %.2f", lpmm, 0.40397*227.2727)
	}
	f50, _ = PerfectLensMTF50(8, 4, 0.55)
	if v, _ := PerfectLens(8, 4, 0.55, []float64{f50}); math.Abs(v[0]-0.5) > 1e-9 {
		t.Errorf("PerfectLens at its MTF50: %.6f", v[0])
	}
	if _, err := PerfectLensMTF50(0, 4, 0.55); err == nil {
		t.Error("f/0 accepted")
	}
}
