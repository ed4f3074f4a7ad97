package edge

import (
	"math"
	"testing"

	"sagitta/core/sim/simcam"
)

// Accuracy asserted as strictly as README's "Accuracy" section quotes it: a
// figure quoted there fails here well before it doubles. The truth is the
// closed form of the simulation, never a number typed in:
//
//	MTF(f) = exp(-2 pi^2 s^2 f^2) x |sinc(f cos t) sinc(f sin t)|
//
// (the Gaussian's Fourier transform, J. W. Goodman, Introduction to Fourier
// Optics, 3rd ed., ch. 2; the square pixel's aperture projected on the edge
// normal at angle t, G. D. Boreman, Modulation Transfer Function in Optical
// and Electro-Optical Systems, SPIE Press 2001, ch. 2).

// readmeSweep holds README's table "σ (px) | refined, worst over 3–35° |
// refined MTF50 error | iso, worst over 3–35° | iso MTF50 error".
var readmeSweep = []struct {
	sigma                  float64
	refMax, refMTF50       float64 // worst |error|, MTF50 relative error
	isoMax, isoMTF50       float64
	isoMinMax, isoMinMTF50 float64 // the iso procedure's known bias must show (see below)
}{
	{0.5, 0.0001, 0.0001, 0.0071, 0.0073, 0.0035, 0.0035},
	{1.0, 0.0001, 0.0001, 0.0006, 0.0009, 0, 0},
	{2.0, 0.0001, 0.0005, 0.0065, 0.0094, 0.0030, 0.0045},
}

// TestISOAgainstAnalytic checks the published procedure (iso.go) against the
// closed form at several slants and widths, within twice README's figures.
//
// Its known small bias: the Hamming window over the line spread function
// multiplies the LSF by a smooth taper, so the measured MTF is the truth
// convolved with the window's transform; for a wide LSF (s = 2 px) the
// taper cuts into the tails and the MTF reads high at low frequencies and
// low near MTF50, by a few thousandths (0.0065 worst, MTF50 about 1 % low);
// for a narrow one (s = 0.5 px) the 1/4-px bins and the central difference
// leave a similar residue near Nyquist. The lower bounds (isoMin*) pin that
// bias at s = 0.5 and 2: the procedure as published shows it, so a change
// that silently drops the window or the derivative correction, or bins at
// 2x, moves the figure out of the band. The upper bounds are twice README's.
func TestISOAgainstAnalytic(t *testing.T) {
	angles := []float64{3, 5, 10, 20, 35}
	const size = 200
	for _, row := range readmeSweep {
		sg := row.sigma
		var worst, worst50 float64
		for _, ang := range angles {
			p := halfPlane(t, size, ang, simcam.Gaussian{Sigma1: sg, Sigma2: sg})
			truth := func(f float64) float64 {
				return math.Exp(-2*math.Pi*math.Pi*sg*sg*f*f) * pixelMTF(f, ang)
			}
			want50 := crossing(truth, 1)
			for _, meth := range []Method{Refined, ISO} {
				m, err := Measure(p, centred(size, ang, 70, 32), Options{Method: meth})
				if err != nil {
					t.Fatalf("sigma %g angle %g %v: %v", sg, ang, meth, err)
				}
				e := worstError(m.Curve.Value, m.Curve.Freq, truth)
				e50 := math.Abs(m.Curve.MTF50()/want50 - 1)
				t.Logf("sigma %.1f angle %2.0f %-7s worst %.5f MTF50 %.3f %%", sg, ang, meth, e, 100*e50)
				if meth == Refined {
					if e > 2*row.refMax {
						t.Errorf("sigma %g angle %g: refined worst error %.5f > %.5f (twice README's %.4f)", sg, ang, e, 2*row.refMax, row.refMax)
					}
					if e50 > 2*row.refMTF50 {
						t.Errorf("sigma %g angle %g: refined MTF50 error %.4f %% > %.4f %% (twice README's)", sg, ang, 100*e50, 200*row.refMTF50)
					}
					continue
				}
				worst, worst50 = math.Max(worst, e), math.Max(worst50, e50)
				if e > 2*row.isoMax {
					t.Errorf("sigma %g angle %g: iso worst error %.5f > %.5f (twice README's %.4f)", sg, ang, e, 2*row.isoMax, row.isoMax)
				}
				if e50 > 2*row.isoMTF50 {
					t.Errorf("sigma %g angle %g: iso MTF50 error %.3f %% > %.3f %% (twice README's)", sg, ang, 100*e50, 200*row.isoMTF50)
				}
			}
		}
		if worst < row.isoMinMax || worst50 < row.isoMinMTF50 {
			t.Errorf("sigma %g: iso worst error %.5f, MTF50 error %.3f %%: below the published procedure's known bias (>= %.4f, >= %.2f %%)",
				sg, worst, 100*worst50, row.isoMinMax, 100*row.isoMinMTF50)
		}
	}
}
