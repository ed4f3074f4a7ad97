package edge

import (
	"bytes"
	"fmt"
	"image/jpeg"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"sagitta/core/plane"
	"sagitta/core/sim/simcam"
)

// usmEdge captures an 8-bit sRGB photo of a slanted edge through psf with
// photon noise (fullWell electrons at full scale; 0 = none) and, when
// amount > 0, the camera's unsharp mask, and measures it.
func usmEdge(t testing.TB, psf simcam.PSF, normal, amount, radius, fullWell float64, seed uint64, opt Options) *Measurement {
	t.Helper()
	const size = 160
	cam := simcam.Camera{W: size, H: size, Lens: simcam.Fixed{PSF: psf}, Encoding: simcam.SRGB8,
		FullWellE: fullWell, Seed: seed}
	if amount > 0 {
		cam.Sharpen = &simcam.UnsharpMask{Amount: amount, RadiusPx: radius}
	}
	img := cam.Capture(simcam.HalfPlaneScene(size, size, normal, 0.08, 0.6))
	m, err := Measure(linearFromSRGB8(t, img), centred(size, normal, 60, 30), opt)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

// TestSharpenedFlagged: unsharp masks of amount 0.3 to 1.5 at radius 0.5 to
// 2 px. The physical bounds (sharpen.go) are the non-negative PSF
// (Goodman, Introduction to Fourier Optics, 3rd ed., ch. 6) and, with the
// f-number known, the diffraction MTF of a circular pupil times the pixel
// aperture (Goodman ch. 6; Boreman, MTF in Optical and Electro-Optical
// Systems, ch. 2).
func TestSharpenedFlagged(t *testing.T) {
	airy := simcam.Airy{WavelengthUM: 0.55, FNumber: 5.6, PitchUM: 4}
	var tab strings.Builder
	worstLift := 0.0
	for _, lens := range []struct {
		name string
		psf  simcam.PSF
		opt  Options
	}{
		{"diffraction-limited f/5.6, f-number known", airy, Options{FNumber: 5.6, PitchUM: 4}},
		{"Gaussian sigma 1 px, f-number unknown", simcam.Gaussian{Sigma1: 1, Sigma2: 1}, Options{}},
		{"Gaussian sigma 0.6 px, f-number unknown", simcam.Gaussian{Sigma1: 0.6, Sigma2: 0.6}, Options{}},
	} {
		amounts, radii := []float64{0.3, 0.7, 1.5}, []float64{0.5, 1, 2}
		if testing.Short() {
			amounts, radii = []float64{0.3, 1.5}, []float64{0.5, 2}
		}
		for _, amount := range amounts {
			for _, radius := range radii {
				base := usmEdge(t, lens.psf, 6, 0, 0, 20000, 1, lens.opt)
				m := usmEdge(t, lens.psf, 6, amount, radius, 20000, 1, lens.opt)
				lift := m.Curve.MTF50()/base.Curve.MTF50() - 1
				fmt.Fprintf(&tab, "%-42s amount %.1f radius %.1f: flagged %-5v signs %v lobe %.4f (%.0f se), est. lift %+.1f%%, true lift %+.1f%%\n",
					lens.name, amount, radius, hasFlag(m, FlagSharpened), m.Sharpening.Signs, m.Sharpening.LobeDepth, m.Sharpening.LobeZ, 100*m.Sharpening.MTF50Lift, 100*lift)
				// With the f-number known, a diffraction-limited lens leaves
				// no room: every mask is flagged. Without it, only the lobes
				// tell, and a small radius leaves them below the noise
				// (README states the limit: radius >= 1 px and amount x
				// radius >= 0.5).
				must := lens.opt.FNumber > 0 || radius >= 1 && amount*radius >= 0.5-1e-9
				if must && !hasFlag(m, FlagSharpened) {
					t.Errorf("%s: USM %.1f at %.1f px not flagged (MTF50 lifted %+.1f%%)", lens.name, amount, radius, 100*lift)
				}
				// The lift estimate (a Gaussian lens model) within 45 % of
				// the true lift where both are known (README: within 35 %).
				if est := m.Sharpening.MTF50Lift; est > 0 && lift > 0.05 && lens.opt.FNumber == 0 {
					if r := est/lift - 1; math.Abs(r) > 0.45 {
						t.Errorf("%s: USM %.1f at %.1f px: lift estimated %+.1f%%, true %+.1f%%", lens.name, amount, radius, 100*est, 100*lift)
					} else {
						worstLift = math.Max(worstLift, math.Abs(r))
					}
				}
			}
		}
	}
	t.Logf("unsharp masks on 8-bit sRGB edges, SNR about 90:\n%sworst relative error of the lift estimate %.0f%%", tab.String(), 100*worstLift)
}

// TestSoftEdgeMildSharpening: a soft lens (sigma 2 px) with a mild unsharp
// mask whose overshoot stays under the old 5 % threshold (about 3.4 % of
// the step) is flagged: its lobes stand far above the noise.
func TestSoftEdgeMildSharpening(t *testing.T) {
	g := simcam.Gaussian{Sigma1: 2, Sigma2: 2}
	for seed := uint64(1); seed <= 5; seed++ {
		m := usmEdge(t, g, 8, 0.6, 2.5, 20000, seed, Options{})
		t.Logf("seed %d: overshoot %.3f, lobe %.4f (%.0f se), signs %v, lift estimate %+.1f%%", seed, m.Overshoot, m.Sharpening.LobeDepth, m.Sharpening.LobeZ, m.Sharpening.Signs, 100*m.Sharpening.MTF50Lift)
		if m.Overshoot > 0.05 {
			t.Fatalf("overshoot %.3f: not the mild case", m.Overshoot)
		}
		if !hasFlag(m, FlagSharpened) {
			t.Errorf("seed %d: soft edge with overshoot %.3f not flagged", seed, m.Overshoot)
		}
	}
}

// noisySRGB8 adds photon noise (Gaussian approximation, variance v / fw in
// linear units) to a copy of p and passes it through 8-bit sRGB coding and
// back (IEC 61966-2-1), as a camera's file would.
func noisySRGB8(p *plane.Plane, fw float64, seed uint64) *plane.Plane {
	q := plane.New(p.W, p.H)
	rng := rand.New(rand.NewPCG(seed, 77))
	for i, v := range p.Pix {
		x := float64(v)
		if fw > 0 {
			x += math.Sqrt(math.Max(x, 0)/fw) * rng.NormFloat64()
		}
		x = math.Min(math.Max(x, 0), 1)
		if x <= 0.0031308 {
			x *= 12.92
		} else {
			x = 1.055*math.Pow(x, 1/2.4) - 0.055
		}
		x = math.Round(x*255) / 255
		if x <= 0.04045 {
			x /= 12.92
		} else {
			x = math.Pow((x+0.055)/1.055, 2.4)
		}
		q.Pix[i] = float32(x)
	}
	return q
}

// TestUnsharpenedNotFlagged: edges that were never sharpened (Gaussian
// lenses of several widths, a diffraction-limited lens with its f-number
// given, angles from 3 to 40 degrees off the axes, noise from none to an
// SNR near 25) are flagged in under 1 % of cases. The bounds they must
// respect are physical (see TestSharpenedFlagged).
func TestUnsharpenedNotFlagged(t *testing.T) {
	const size = 160
	type lens struct {
		name string
		psf  simcam.PSF
		opt  Options
	}
	lenses := []lens{
		{"sigma 0.5", simcam.Gaussian{Sigma1: 0.5, Sigma2: 0.5}, Options{}},
		{"sigma 1", simcam.Gaussian{Sigma1: 1, Sigma2: 1}, Options{}},
		{"sigma 2", simcam.Gaussian{Sigma1: 2, Sigma2: 2}, Options{}},
		{"astigmatic 0.6/1.4", simcam.Gaussian{Sigma1: 0.6, Sigma2: 1.4, AngleDeg: 30}, Options{}},
		{"diffraction f/5.6 (known)", simcam.Airy{WavelengthUM: 0.55, FNumber: 5.6, PitchUM: 4}, Options{FNumber: 5.6, PitchUM: 4}},
	}
	angles := []float64{3, 11, 24, 40, 97, 188, 313}
	wells := []float64{0, 200000, 20000, 2500}
	seeds := 3
	if testing.Short() {
		angles, seeds = []float64{3, 24, 188}, 1
	}
	total, flagged := 0, 0
	for li, l := range lenses {
		for ai, ang := range angles {
			if li == 4 && ai%2 == 1 { // the diffraction render is slow: every other angle
				continue
			}
			cam := simcam.Camera{W: size, H: size, Lens: simcam.Fixed{PSF: l.psf}}
			clean, err := cam.Render(simcam.HalfPlaneScene(size, size, ang, 0.08, 0.6))
			if err != nil {
				t.Fatal(err)
			}
			for _, fw := range wells {
				for seed := range seeds {
					p := noisySRGB8(clean, fw, uint64(1000*li+100*ai+seed))
					m, err := Measure(p, centred(size, ang, 60, 30), l.opt)
					if err != nil {
						t.Fatal(err)
					}
					total++
					if hasFlag(m, FlagSharpened) {
						flagged++
						t.Logf("false alarm: %s angle %g full well %g seed %d: signs %v lobe %.4f (%.1f se) snr %.0f", l.name, ang, fw, seed, m.Sharpening.Signs, m.Sharpening.LobeDepth, m.Sharpening.LobeZ, m.SNR)
					}
				}
			}
		}
	}
	// JPEG compression at qualities 75 to 95 rings at edges (up to 1 % of
	// the step) but does not sharpen them.
	for _, q := range []int{95, 85, 75} {
		for _, sg := range []float64{0.5, 1} {
			for seed := range uint64(seeds) {
				cam := simcam.Camera{W: size, H: size, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: sg, Sigma2: sg}},
					Encoding: simcam.SRGB8, FullWellE: 30000, Seed: seed, JPEGQuality: q}
				b, err := cam.Encode(simcam.HalfPlaneScene(size, size, 7, 0.08, 0.6))
				if err != nil {
					t.Fatal(err)
				}
				img, err := jpeg.Decode(bytes.NewReader(b))
				if err != nil {
					t.Fatal(err)
				}
				m, err := Measure(linearFromSRGB8(t, img), centred(size, 7, 60, 30), Options{})
				if err != nil {
					t.Fatal(err)
				}
				total++
				if hasFlag(m, FlagSharpened) {
					flagged++
					t.Logf("false alarm: JPEG quality %d sigma %g seed %d: signs %v lobe %.4f (%.1f se)", q, sg, seed, m.Sharpening.Signs, m.Sharpening.LobeDepth, m.Sharpening.LobeZ)
				}
			}
		}
	}
	t.Logf("unsharpened edges flagged as sharpened: %d of %d", flagged, total)
	if float64(flagged) >= 0.01*float64(total) {
		t.Errorf("%d of %d unsharpened edges flagged (want under 1 %%)", flagged, total)
	}
}

// TestNoiseFreeLobeFinite: on a noise-free edge whose plateaus are flat
// (a sharp lens, sigma 0.5 px, with an unsharp mask of 1.5 at 1 px) the noise
// is 0, so a lobe's size in standard errors has no finite value; it is
// reported as maxLobeZ (the result must stay a finite number for JSON), and
// the edge is still flagged as sharpened.
func TestNoiseFreeLobeFinite(t *testing.T) {
	m := usmEdge(t, simcam.Gaussian{Sigma1: 0.5, Sigma2: 0.5}, 6, 1.5, 1, 0, 1, Options{})
	if m.NoiseRMS != 0 {
		t.Fatalf("the noise-free edge shows noise %v: the test needs flat plateaus", m.NoiseRMS)
	}
	if z := m.Sharpening.LobeZ; math.IsInf(z, 0) || math.IsNaN(z) || z != maxLobeZ {
		t.Errorf("lobe of a noise-free edge: %v standard errors, want %v", z, maxLobeZ)
	}
	if !hasFlag(m, FlagSharpened) {
		t.Errorf("noise-free edge with an unsharp mask of 1.5 at 1 px not flagged: %+v", m.Sharpening)
	}
}
