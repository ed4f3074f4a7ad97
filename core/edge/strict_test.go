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

// TestCriticalAnglesStrict: README's table "angle (critical or steep)" for
// s = 0.7 px, each figure asserted within twice its value (refined: README
// quotes 0.0000-0.0001, asserted at 0.0002).
func TestCriticalAnglesStrict(t *testing.T) {
	const size, sg = 200, 0.7
	for _, c := range []struct{ angle, ref, iso float64 }{
		{14.036, 0.0001, 0.0012}, {18.435, 0.0001, 0.0061}, {26.565, 0.0001, 0.0068},
		{40, 0.0001, 0.0008}, {45, 0.0001, 0.0436},
	} {
		p := halfPlane(t, size, c.angle, simcam.Gaussian{Sigma1: sg, Sigma2: sg})
		truth := func(f float64) float64 { return math.Exp(-2*math.Pi*math.Pi*sg*sg*f*f) * pixelMTF(f, c.angle) }
		for _, meth := range []Method{Refined, ISO} {
			m, err := Measure(p, centred(size, c.angle, 60, 30), Options{Method: meth})
			if err != nil {
				t.Fatal(err)
			}
			e := worstError(m.Curve.Value, m.Curve.Freq, truth)
			lim := 2 * c.ref
			if meth == ISO {
				lim = 2 * c.iso
			}
			t.Logf("angle %6.3f %-7s worst %.5f (limit %.4f)", c.angle, meth, e, lim)
			if e > lim {
				t.Errorf("angle %g %v: worst error %.5f > %.4f (twice README's)", c.angle, meth, e, lim)
			}
		}
	}
}

// TestIdealStepAndDiffractionStrict: README quotes the ideal step's value at
// Nyquist at 5 degrees as 0.6370 for 0.6370 expected (the pixel sinc,
// Boreman ch. 2), and a largest error of 0.0069 for the diffraction-limited
// lens (0.55 um, f/8, 1.5 um pitch) against the circular pupil's OTF
// (Goodman ch. 6) times the pixel sinc. Asserted within 0.0002 (README's
// four decimals, twice the last digit) and 0.0138.
func TestIdealStepAndDiffractionStrict(t *testing.T) {
	const size = 200
	p := halfPlane(t, size, 5, simcam.Gaussian{})
	m, err := Measure(p, centred(size, 5, 70, 24), Options{})
	if err != nil {
		t.Fatal(err)
	}
	want := pixelMTF(0.5, 5)
	if got := m.Curve.AtNyquist(); math.Abs(got-want) > 0.0002 {
		t.Errorf("ideal step at Nyquist %.5f, want %.5f +- 0.0002", got, want)
	}
	airy := simcam.Airy{WavelengthUM: 0.55, FNumber: 8, PitchUM: 1.5}
	vc := 1.5e-3 / (0.55e-3 * 8) // cut-off, cy/px
	p = halfPlane(t, 260, 5, airy)
	m, err = Measure(p, centred(260, 5, 80, 56), Options{})
	if err != nil {
		t.Fatal(err)
	}
	truth := func(f float64) float64 {
		v := f / vc
		if v >= 1 {
			return 0
		}
		return 2 / math.Pi * (math.Acos(v) - v*math.Sqrt(1-v*v)) * pixelMTF(f, 5)
	}
	if e := worstError(m.Curve.Value, m.Curve.Freq, truth); e > 2*0.0069 {
		t.Errorf("diffraction-limited: largest error %.4f > 0.0138 (twice README's 0.0069)", e)
	}
}

// noisyEdges measures seeds edges (s = 0.8 px, 5 degree slant) with photon
// and read noise, full well fw electrons, and returns per method the rms
// error over 0..0.5 cy/px and the mean error (bias) over 0.4..0.5 cy/px
// against the closed form, and the mean step SNR.
func noisyEdges(t *testing.T, fw float64, seeds int) (rms, biasHigh [2]float64, snr float64) {
	const size, sg, normal = 200, 0.8, 5.0
	truth := func(f float64) float64 { return math.Exp(-2*math.Pi*math.Pi*sg*sg*f*f) * pixelMTF(f, normal) }
	var se, nse, bh, nbh [2]float64
	for seed := 1; seed <= seeds; seed++ {
		cam := simcam.Camera{W: size, H: size, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: sg, Sigma2: sg}},
			FullWellE: fw, ReadNoiseE: 3, Seed: uint64(seed), Encoding: simcam.Linear16}
		p := linearFrom16(t, cam.Capture(simcam.HalfPlaneScene(size, size, normal, 0.1, 0.7)))
		for k, meth := range []Method{Refined, ISO} {
			m, err := Measure(p, centred(size, normal, 70, 32), Options{Method: meth})
			if err != nil {
				t.Fatal(err)
			}
			if k == 0 {
				snr += m.SNR / float64(seeds)
			}
			for i, f := range m.Curve.Freq {
				if f > 0.5+1e-9 {
					break
				}
				e := m.Curve.Value[i] - truth(f)
				se[k] += e * e
				nse[k]++
				if f >= 0.4-1e-9 {
					bh[k] += e
					nbh[k]++
				}
			}
		}
	}
	for k := range rms {
		rms[k], biasHigh[k] = math.Sqrt(se[k]/nse[k]), bh[k]/nbh[k]
	}
	return rms, biasHigh, snr
}

// TestNoiseStrict: README's table of noisy edges (s = 0.8 px, 5 degrees, 6
// seeds): rms error over 0..0.5 cy/px at edge SNR 134, 67 and 30, asserted
// within twice its figures (the -short run takes SNR 67 only).
func TestNoiseStrict(t *testing.T) {
	rows := []struct{ fw, ref, iso float64 }{{20000, 0.0028, 0.0043}, {5000, 0.0051, 0.0089}, {1000, 0.0139, 0.0205}}
	if testing.Short() {
		rows = rows[1:2]
	}
	for _, r := range rows {
		rms, bias, snr := noisyEdges(t, r.fw, 6)
		t.Logf("full well %5.0f (SNR %.0f): rms refined %.4f iso %.4f; bias 0.4-0.5 cy/px refined %+.4f iso %+.4f", r.fw, snr, rms[0], rms[1], bias[0], bias[1])
		if rms[0] > 2*r.ref || rms[1] > 2*r.iso {
			t.Errorf("full well %g: rms error refined %.4f (limit %.4f), iso %.4f (limit %.4f): twice README's", r.fw, rms[0], 2*r.ref, rms[1], 2*r.iso)
		}
	}
}

// TestNoiseSubtraction pins the refined estimator's noise-power subtraction:
// the magnitude of a noisy spectrum is biased upward where the signal is
// small, by about the noise power over the signal (common practice; e.g.
// the Rician bias of a magnitude). At edge SNR about 30 the refined MTF's
// mean error over 0.4-0.5 cy/px, 6 seeds, must stay within +-0.004 of the
// closed form (measured -0.0013); without the subtraction it reads +0.0075
// (measured by removing it).
func TestNoiseSubtraction(t *testing.T) {
	_, bias, snr := noisyEdges(t, 1000, 6)
	t.Logf("SNR %.0f: mean error 0.4-0.5 cy/px refined %+.4f, iso %+.4f", snr, bias[0], bias[1])
	if math.Abs(bias[0]) > 0.004 {
		t.Errorf("refined mean error near Nyquist %+.4f at SNR %.0f: the noise bias is not removed (limit +-0.004)", bias[0], snr)
	}
}

// TestISOFewPhaseCycles: short edges 2 degrees off the axis hold under two
// phase cycles of the slant (tan 2 deg x 40-80 lines), where the published
// procedure's rule of a whole number of phase cycles (ISO 12233:2017,
// e-SFR annex: every quarter-pixel bin then receives the same number of
// lines) matters most. The iso curve must stay within README's s = 0.5 px
// figure, 0.0071 (measured 0.0043-0.0052; taking every line instead reaches
// 0.0095).
func TestISOFewPhaseCycles(t *testing.T) {
	const size, sg, ang = 200, 0.5, 2.0
	p := halfPlane(t, size, ang, simcam.Gaussian{Sigma1: sg, Sigma2: sg})
	truth := func(f float64) float64 { return math.Exp(-2*math.Pi*math.Pi*sg*sg*f*f) * pixelMTF(f, ang) }
	for _, hl := range []float64{20, 25, 30, 40} {
		m, err := Measure(p, centred(size, ang, hl, 24), Options{Method: ISO})
		if err != nil {
			t.Fatal(err)
		}
		if e := worstError(m.Curve.Value, m.Curve.Freq, truth); e > 0.0071 {
			t.Errorf("edge %g px long at %g deg: iso worst error %.5f > 0.0071", 2*hl, ang, e)
		}
	}
}
