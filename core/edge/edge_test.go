package edge

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"sagitta/core/plane"
	"sagitta/core/sim/simcam"
)

// Check values come from closed forms:
//   - Gaussian PSF with standard deviation s px: MTF(f) = exp(-2 pi^2 s^2 f^2)
//     (the Fourier transform of a Gaussian; J. W. Goodman, Introduction to
//     Fourier Optics, 3rd ed., ch. 2).
//   - Square pixel, 100 % fill, edge normal at angle t to the x axis: the
//     pixel's projection onto the normal gives sinc(f cos t) sinc(f sin t);
//     at t = 0 and f = 0.5 that is 2/pi (G. D. Boreman, MTF in Optical and
//     Electro-Optical Systems, ch. 2).
//   - Diffraction by a circular pupil, incoherent light:
//     MTF(v) = (2/pi)[acos(v/vc) - (v/vc) sqrt(1 - (v/vc)^2)], vc = 1/(lambda N)
//     (Goodman, ch. 6).
//   - The system MTF is the product of the stages' MTFs (Goodman ch. 6,
//     Boreman ch. 1).

// halfPlane renders a noise-free single edge through the image centre whose
// normal points at normalDeg (towards the light side), through psf.
func halfPlane(t testing.TB, size int, normalDeg float64, psf simcam.PSF) *plane.Plane {
	t.Helper()
	cam := simcam.Camera{W: size, H: size, Lens: simcam.Fixed{PSF: psf}}
	p, err := cam.Render(simcam.HalfPlaneScene(size, size, normalDeg, 0.1, 0.7))
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// centred is the measurement region around the edge of halfPlane.
func centred(size int, normalDeg, halfLen, halfWidth float64) Region {
	return Region{X: float64(size) / 2, Y: float64(size) / 2, AngleDeg: normalDeg + 90, HalfLen: halfLen, HalfWidth: halfWidth}
}

// pixelMTF is the pixel-aperture MTF for an edge normal at normalDeg.
func pixelMTF(f, normalDeg float64) float64 {
	s, c := math.Sincos(normalDeg * math.Pi / 180)
	return math.Abs(sinc(f*c) * sinc(f*s))
}

// crossing finds where a decreasing function first falls to 0.5, by
// bisection on [0, hi].
func crossing(fn func(float64) float64, hi float64) float64 {
	lo := 0.0
	for i := 0; i < 60; i++ {
		m := 0.5 * (lo + hi)
		if fn(m) > 0.5 {
			lo = m
		} else {
			hi = m
		}
	}
	return 0.5 * (lo + hi)
}

// worstError returns the largest |measured - truth| for f in [0, 0.5].
func worstError(c []float64, freq []float64, truth func(float64) float64) float64 {
	var w float64
	for i, f := range freq {
		if f > 0.5+1e-9 {
			break
		}
		w = math.Max(w, math.Abs(c[i]-truth(f)))
	}
	return w
}

func TestGaussianAngleSweep(t *testing.T) {
	sigmas := []float64{0.5, 1, 2}
	angles := []float64{3, 5, 10, 20, 35}
	if testing.Short() {
		sigmas, angles = []float64{0.5, 2}, []float64{5, 35}
	}
	const size = 200
	var table strings.Builder
	fmt.Fprintf(&table, "sigma  angle   refined: max err  MTF50 err |  iso: max err  MTF50 err\n")
	var sumRef, sumISO float64
	for _, sg := range sigmas {
		for _, ang := range angles {
			normal := ang // edge a few degrees off vertical
			p := halfPlane(t, size, normal, simcam.Gaussian{Sigma1: sg, Sigma2: sg})
			truth := func(f float64) float64 {
				return math.Exp(-2*math.Pi*math.Pi*sg*sg*f*f) * pixelMTF(f, normal)
			}
			want50 := crossing(truth, 1)
			r := centred(size, normal, 70, 32)
			var errs [2][2]float64
			for k, meth := range []Method{Refined, ISO} {
				m, err := Measure(p, r, Options{Method: meth})
				if err != nil {
					t.Fatalf("sigma %g angle %g %v: %v", sg, ang, meth, err)
				}
				errs[k][0] = worstError(m.Curve.Value, m.Curve.Freq, truth)
				errs[k][1] = math.Abs(m.Curve.MTF50()/want50 - 1)
				if k == 0 {
					if errs[k][0] > 0.01 {
						t.Errorf("sigma %g angle %g: refined MTF off by %.4f (> 0.01)", sg, ang, errs[k][0])
					}
					if errs[k][1] > 0.01 {
						t.Errorf("sigma %g angle %g: refined MTF50 %.5f vs %.5f (%.2f %%)", sg, ang, m.Curve.MTF50(), want50, 100*errs[k][1])
					}
					if d := math.Abs(math.Mod(m.NormalDeg-normal+540, 360) - 180); d > 0.05 {
						t.Errorf("sigma %g angle %g: normal %.3f deg", sg, ang, m.NormalDeg)
					}
				}
			}
			sumRef += errs[0][0]
			sumISO += errs[1][0]
			if errs[0][0] > errs[1][0]+1e-3 {
				t.Errorf("sigma %g angle %g: refined (%.4f) worse than iso (%.4f)", sg, ang, errs[0][0], errs[1][0])
			}
			fmt.Fprintf(&table, "%5.1f  %5.0f   %16.4f  %8.2f%% | %13.4f  %8.2f%%\n", sg, ang,
				errs[0][0], 100*errs[0][1], errs[1][0], 100*errs[1][1])
		}
	}
	t.Logf("noise-free Gaussian edges, error against exp(-2 pi^2 s^2 f^2) x pixel sinc, 0..0.5 cy/px:\n%s", table.String())
	if sumRef > sumISO {
		t.Errorf("refined total error %.4f exceeds iso %.4f", sumRef, sumISO)
	}
}

func TestAnyAngle(t *testing.T) {
	// The refined estimator fits the edge and projects on its normal, so
	// edges at any direction measure alike, including falling edges.
	const size, sg = 200, 0.8
	for _, normal := range []float64{47, 100, 137, 200, 263, 318} {
		p := halfPlane(t, size, normal, simcam.Gaussian{Sigma1: sg, Sigma2: sg})
		m, err := Measure(p, centred(size, normal, 60, 30), Options{})
		if err != nil {
			t.Fatalf("normal %g: %v", normal, err)
		}
		truth := func(f float64) float64 { return math.Exp(-2*math.Pi*math.Pi*sg*sg*f*f) * pixelMTF(f, normal) }
		if e := worstError(m.Curve.Value, m.Curve.Freq, truth); e > 0.01 {
			t.Errorf("normal %g: MTF off by %.4f", normal, e)
		}
		if d := math.Abs(math.Mod(m.NormalDeg-normal+540, 360) - 180); d > 0.05 {
			t.Errorf("normal %g: measured normal %.3f", normal, m.NormalDeg)
		}
	}
}

func TestIdealStepNyquist(t *testing.T) {
	// No blur: the only transfer is the pixel aperture; at Nyquist it is
	// sinc(0.5 cos t) sinc(0.5 sin t), 2/pi = 0.6366 at t = 0 (Boreman ch. 2).
	const size = 200
	for _, ang := range []float64{2, 5, 10, 20, 35} {
		p := halfPlane(t, size, ang, simcam.Gaussian{})
		for _, meth := range []Method{Refined, ISO} {
			m, err := Measure(p, centred(size, ang, 70, 24), Options{Method: meth})
			if err != nil {
				t.Fatal(err)
			}
			want := pixelMTF(0.5, ang)
			got := m.Curve.AtNyquist()
			t.Logf("ideal step, angle %4.0f, %-7s: at Nyquist %.4f, pixel sinc %.4f", ang, meth, got, want)
			if meth == Refined && math.Abs(got-want) > 0.02 {
				t.Errorf("angle %g: Nyquist value %.4f, want %.4f +- 0.02", ang, got, want)
			}
		}
	}
	if v := pixelMTF(0.5, 0); math.Abs(v-2/math.Pi) > 1e-12 {
		t.Errorf("sinc(0.5) = %v, want 2/pi", v)
	}
}

func TestDiffractionLimited(t *testing.T) {
	// lambda 0.55 um at f/8: cut-off vc = 1/(lambda N) = 227.3 lp/mm
	// (Goodman ch. 6); with a 1.5 um pitch that is 0.341 cy/px, inside
	// the band, so the whole diffraction MTF is seen.
	const size = 260
	airy := simcam.Airy{WavelengthUM: 0.55, FNumber: 8, PitchUM: 1.5}
	vc := 1 / (0.55e-3 * 8) * 1.5e-3 // cy/px
	if math.Abs(vc/1.5e-3-227.27) > 0.01 {
		t.Fatalf("cut-off %.2f lp/mm", vc/1.5e-3)
	}
	normal := 5.0
	p := halfPlane(t, size, normal, airy)
	m, err := Measure(p, centred(size, normal, 80, 56), Options{})
	if err != nil {
		t.Fatal(err)
	}
	truth := func(f float64) float64 {
		v := f / vc
		if v >= 1 {
			return 0
		}
		return 2 / math.Pi * (math.Acos(v) - v*math.Sqrt(1-v*v)) * pixelMTF(f, normal)
	}
	e := worstError(m.Curve.Value, m.Curve.Freq, truth)
	t.Logf("diffraction f/8, 1.5 um: largest error %.4f; at vc/2 measured %.4f, formula %.4f", e, m.Curve.At(vc/2), truth(vc/2))
	if e > 0.02 {
		t.Errorf("diffraction-limited MTF off by %.4f (> 0.02)", e)
	}
	// Goodman's check value: MTF(vc/2) = 0.391 for the pupil alone.
	if got := truth(vc/2) / pixelMTF(vc/2, normal); math.Abs(got-0.391) > 0.0005 {
		t.Errorf("formula at vc/2 = %.4f, want 0.391", got)
	}
}

func TestNoise(t *testing.T) {
	// Photon and read noise through an 16-bit linear file: the refined
	// estimator's error must not exceed the ISO procedure's. The table is the
	// evidence asked for; seeds are fixed.
	const size, sg, normal = 200, 0.8, 5.0
	truth := func(f float64) float64 { return math.Exp(-2*math.Pi*math.Pi*sg*sg*f*f) * pixelMTF(f, normal) }
	wells := []float64{20000, 5000, 1000}
	seeds := []uint64{1, 2, 3, 4, 5, 6}
	if testing.Short() {
		wells, seeds = []float64{5000}, seeds[:3]
	}
	var table strings.Builder
	fmt.Fprintf(&table, "full well e-  step SNR   rms error refined   rms error iso   bias refined   bias iso\n")
	for _, fw := range wells {
		var se, bias [2]float64
		var n [2]float64
		var snr float64
		for _, seed := range seeds {
			cam := simcam.Camera{W: size, H: size, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: sg, Sigma2: sg}},
				FullWellE: fw, ReadNoiseE: 3, Seed: seed, Encoding: simcam.Linear16}
			img := cam.Capture(simcam.HalfPlaneScene(size, size, normal, 0.1, 0.7))
			p := linearFrom16(t, img)
			for k, meth := range []Method{Refined, ISO} {
				m, err := Measure(p, centred(size, normal, 70, 32), Options{Method: meth})
				if err != nil {
					t.Fatal(err)
				}
				if k == 0 {
					snr += m.SNR / float64(len(seeds))
				}
				for i, f := range m.Curve.Freq {
					if f > 0.5 {
						break
					}
					e := m.Curve.Value[i] - truth(f)
					se[k] += e * e
					bias[k] += e
					n[k]++
				}
			}
		}
		rr, ri := math.Sqrt(se[0]/n[0]), math.Sqrt(se[1]/n[1])
		fmt.Fprintf(&table, "%12.0f  %8.0f   %17.4f   %13.4f   %12.4f   %8.4f\n", fw, snr, rr, ri, bias[0]/n[0], bias[1]/n[1])
		if rr > ri {
			t.Errorf("full well %g: refined rms error %.4f exceeds iso %.4f", fw, rr, ri)
		}
	}
	t.Logf("noisy edges (sigma %.1f px, slant %.0f deg), %d seeds, 0..0.5 cy/px:\n%s", sg, normal, len(seeds), table.String())
}

func TestFlags(t *testing.T) {
	const size = 200
	t.Run("critical angle", func(t *testing.T) {
		// tan(t) = 1/2 repeats the pixel phases every two lines.
		normal := math.Atan(0.5) * 180 / math.Pi
		p := halfPlane(t, size, normal, simcam.Gaussian{Sigma1: 0.7, Sigma2: 0.7})
		m, err := Measure(p, centred(size, normal, 60, 30), Options{})
		if err != nil {
			t.Fatal(err)
		}
		if !hasFlag(m, FlagCritical) {
			t.Errorf("no critical-angle flag at %.2f deg (phase spacing %.3f px)", normal, m.PhasePx)
		}
	})
	t.Run("short", func(t *testing.T) {
		p := halfPlane(t, size, 5, simcam.Gaussian{Sigma1: 0.7, Sigma2: 0.7})
		m, err := Measure(p, centred(size, 5, 12, 20), Options{})
		if err != nil {
			t.Fatal(err)
		}
		if !hasFlag(m, FlagShortEdge) {
			t.Error("no short-edge flag on a 24 px edge")
		}
	})
	t.Run("clipped", func(t *testing.T) {
		cam := simcam.Camera{W: size, H: size, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.7, Sigma2: 0.7}}, Encoding: simcam.SRGB8}
		img := cam.Capture(simcam.HalfPlaneScene(size, size, 5, 0.1, 1.4))
		p := linearFromSRGB8(t, img)
		m, err := Measure(p, centred(size, 5, 60, 30), Options{})
		if err != nil {
			t.Fatal(err)
		}
		if !hasFlag(m, FlagClippedLight) {
			t.Error("no clipped-light flag with the light side at 1.4 x full scale")
		}
	})
	t.Run("sharpened", func(t *testing.T) {
		cam := simcam.Camera{W: size, H: size, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 1, Sigma2: 1}},
			Encoding: simcam.SRGB8, Sharpen: &simcam.UnsharpMask{Amount: 1.5, RadiusPx: 1.5}}
		img := cam.Capture(simcam.HalfPlaneScene(size, size, 5, 0.1, 0.6))
		m, err := Measure(linearFromSRGB8(t, img), centred(size, 5, 60, 30), Options{})
		if err != nil {
			t.Fatal(err)
		}
		if !hasFlag(m, FlagSharpened) {
			t.Errorf("no sharpened flag (overshoot %.3f)", m.Overshoot)
		}
	})
	t.Run("clean", func(t *testing.T) {
		p := halfPlane(t, size, 5, simcam.Gaussian{Sigma1: 0.7, Sigma2: 0.7})
		m, err := Measure(p, centred(size, 5, 60, 30), Options{})
		if err != nil {
			t.Fatal(err)
		}
		if len(m.Flags) != 0 {
			t.Errorf("clean edge flagged %v", m.Flags)
		}
	})
}

func TestNoEdge(t *testing.T) {
	p := plane.New(100, 100)
	for i := range p.Pix {
		p.Pix[i] = 0.5
	}
	if _, err := Measure(p, Region{X: 50, Y: 50, AngleDeg: 90, HalfLen: 30, HalfWidth: 20}, Options{}); err == nil {
		t.Error("flat image measured as an edge")
	}
	if _, err := Measure(p, Region{X: 50, Y: 50, HalfLen: 2, HalfWidth: 2}, Options{}); err == nil {
		t.Error("tiny region accepted")
	}
}

func hasFlag(m *Measurement, f Flag) bool {
	for _, g := range m.Flags {
		if g == f {
			return true
		}
	}
	return false
}

// BenchmarkMeasure times one edge: a clean one, and a noisy one as in a
// photo (noise of 0.01 rms correlated between neighbours along x, so the
// noise estimates do all their work).
func BenchmarkMeasure(b *testing.B) {
	clean := halfPlane(b, 200, 5, simcam.Gaussian{Sigma1: 0.8, Sigma2: 0.8})
	noisy := halfPlane(b, 200, 5, simcam.Gaussian{Sigma1: 0.8, Sigma2: 0.8})
	rng := rand.New(rand.NewPCG(21, 8))
	prev := 0.0
	for i := range noisy.Pix {
		e := 0.01 * rng.NormFloat64()
		noisy.Pix[i] += float32(e + 0.5*prev)
		prev = e
	}
	for _, size := range []struct{ hl, hw float64 }{{30, 16}, {70, 32}, {128, 32}} {
		for _, meth := range []Method{Refined, ISO} {
			for _, pl := range []struct {
				name string
				p    *plane.Plane
			}{{"", clean}, {"/noisy", noisy}} {
				b.Run(fmt.Sprintf("%s/%0.fx%0.f%s", meth, 2*size.hl, 2*size.hw, pl.name), func(b *testing.B) {
					r := centred(200, 5, size.hl, size.hw)
					b.ReportAllocs()
					for i := 0; i < b.N; i++ {
						if _, err := Measure(pl.p, r, Options{Method: meth}); err != nil {
							b.Fatal(err)
						}
					}
				})
			}
		}
	}
}

func TestSteepAndCriticalAngles(t *testing.T) {
	// Angles whose tangent is a ratio of small integers repeat the pixel
	// phases after a few lines, leaving quarter-pixel bins empty (common
	// practice: avoid them); steep angles approach 45 degrees. The refined
	// estimator must stay within 0.01 there and beat the ISO procedure.
	const size, sg = 200, 0.7
	var table strings.Builder
	fmt.Fprintf(&table, "angle    tan     refined max err   iso max err\n")
	for _, ang := range []float64{14.036, 18.435, 26.565, 40, 44, 45} {
		p := halfPlane(t, size, ang, simcam.Gaussian{Sigma1: sg, Sigma2: sg})
		truth := func(f float64) float64 { return math.Exp(-2*math.Pi*math.Pi*sg*sg*f*f) * pixelMTF(f, ang) }
		var e [2]float64
		for k, meth := range []Method{Refined, ISO} {
			m, err := Measure(p, centred(size, ang, 60, 30), Options{Method: meth})
			if err != nil {
				t.Fatal(err)
			}
			e[k] = worstError(m.Curve.Value, m.Curve.Freq, truth)
		}
		fmt.Fprintf(&table, "%6.3f  %5.3f   %15.4f   %11.4f\n", ang, math.Tan(ang*math.Pi/180), e[0], e[1])
		if e[0] > 0.01 {
			t.Errorf("angle %g: refined error %.4f", ang, e[0])
		}
		if e[0] > e[1]+1e-3 {
			t.Errorf("angle %g: refined %.4f worse than iso %.4f", ang, e[0], e[1])
		}
	}
	t.Logf("steep and critical angles (sigma %.1f px):\n%s", sg, table.String())
}

func TestTrimmedSigma(t *testing.T) {
	// Differences of pairs of normal samples with sigma 0.02 have sigma
	// 0.02 sqrt(2); the trimmed estimate must give back 0.02 (truncated
	// normal moments, Johnson, Kotz and Balakrishnan ch. 13), and stay
	// above zero on quantised data where most pairs are equal.
	rng := rand.New(rand.NewPCG(7, 11))
	d := make([]float64, 20000)
	for i := range d {
		d[i] = math.Abs(0.02 * (rng.NormFloat64() - rng.NormFloat64()))
	}
	if got := trimmedSigma(d, nil); math.Abs(got/0.02-1) > 0.03 {
		t.Errorf("sigma %.5f, want 0.02 within 3 %%", got)
	}
	q := make([]float64, 1000)
	for i := range q {
		if i%5 == 0 {
			q[i] = 1.0 / 255
		}
	}
	if trimmedSigma(q, nil) == 0 {
		t.Error("quantised differences gave zero noise")
	}
}
