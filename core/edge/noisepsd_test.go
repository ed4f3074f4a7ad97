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

// correlated returns a copy of p plus Gaussian noise of rms sd filtered by
// the separable 3-tap kernel k (applied along x and along y), as
// demosaicing ([1/4, 1/2, 1/4]) or sharpening ([-a, 1+2a, -a]) would shape
// it.
func correlated(p *plane.Plane, sd float64, k [3]float64, seed uint64) *plane.Plane {
	rng := rand.New(rand.NewPCG(seed, 31))
	n := make([]float64, len(p.Pix))
	for i := range n {
		n[i] = sd * rng.NormFloat64()
	}
	tmp := make([]float64, len(n))
	at := func(v []float64, x, y int) float64 {
		x = min(max(x, 0), p.W-1)
		y = min(max(y, 0), p.H-1)
		return v[y*p.W+x]
	}
	for y := range p.H {
		for x := range p.W {
			tmp[y*p.W+x] = k[0]*at(n, x-1, y) + k[1]*at(n, x, y) + k[2]*at(n, x+1, y)
		}
	}
	q := plane.New(p.W, p.H)
	for y := range p.H {
		for x := range p.W {
			i := y*p.W + x
			q.Pix[i] = p.Pix[i] + float32(k[0]*at(tmp, x, y-1)+k[1]*at(tmp, x, y)+k[2]*at(tmp, x, y+1))
		}
	}
	return q
}

// TestCorrelatedNoise: noise shaped by a demosaic-like smoothing and by a
// sharpening kernel. The noise power the refined estimator subtracts is
// checked through the standard error it states (the square root of half
// that power): the spread of the MTF over many seeds is the truth. The
// mean MTF near Nyquist is checked against the noise-free curve,
// exp(-2 pi^2 s^2 f^2) x pixel sinc (Goodman, Introduction to Fourier
// Optics, 3rd ed., ch. 2; Boreman, MTF in Optical and Electro-Optical
// Systems, ch. 2). The noise spectrum of a filtered white noise is |K(f)|^2
// (Bendat and Piersol, Random Data, 4th ed., ch. 6): [1/4, 1/2, 1/4] passes
// cos^4(pi f) of the power along each axis, nothing at Nyquist.
func TestCorrelatedNoise(t *testing.T) {
	const size, sg, normal = 160, 0.8, 6.0
	seeds := 200
	if testing.Short() {
		seeds = 60
	}
	truth := func(f float64) float64 { return math.Exp(-2*math.Pi*math.Pi*sg*sg*f*f) * pixelMTF(f, normal) }
	cam := simcam.Camera{W: size, H: size, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: sg, Sigma2: sg}}}
	clean, err := cam.Render(simcam.HalfPlaneScene(size, size, normal, 0.1, 0.6))
	if err != nil {
		t.Fatal(err)
	}
	freqs := []float64{0.1, 0.25, 0.4, 0.45}
	var tab strings.Builder
	for _, c := range []struct {
		name string
		k    [3]float64
		sd   float64
	}{
		{"white", [3]float64{0, 1, 0}, 0.01},
		{"demosaic-like [1 2 1]/4", [3]float64{0.25, 0.5, 0.25}, 0.02},
		{"sharpened [-0.5 2 -0.5]", [3]float64{-0.5, 2, -0.5}, 0.004},
	} {
		n := len(freqs)
		sum, sum2, se := make([]float64, n), make([]float64, n), make([]float64, n)
		for s := range seeds {
			p := correlated(clean, c.sd, c.k, uint64(s+1))
			m, err := Measure(p, centred(size, normal, 60, 30), Options{})
			if err != nil {
				t.Fatal(err)
			}
			for k, f := range freqs {
				v := m.Curve.At(f)
				sum[k] += v
				sum2[k] += v * v
				se[k] += (m.SE[int(math.Round(f/0.01))])
			}
		}
		fmt.Fprintf(&tab, "%-26s:", c.name)
		for k, f := range freqs {
			N := float64(seeds)
			mean := sum[k] / N
			sd := math.Sqrt((sum2[k] - N*mean*mean) / (N - 1))
			stated := se[k] / N
			power := (stated / sd) * (stated / sd)
			bias := mean - truth(f)
			fmt.Fprintf(&tab, "  %.2f: bias %+.4f (se of mean %.4f), noise power stated/true %.2f", f, bias, sd/math.Sqrt(N), power)
			// The stated standard error errs on the safe side: README
			// says its noise power is 0.47 to 7.7 times the true (0.47 is
			// the white-noise case at 0.1 cy/px, where the fit, not the
			// noise model, adds spread; 7.7 demosaiced noise near
			// Nyquist), where the MTF stands clear of the noise. Asserted
			// at 0.35 and 12 (the short run has fewer seeds).
			if mean > 3*sd && (power < 0.35 || power > 12) {
				t.Errorf("%s at %.2f cy/px: stated noise power %.2f of the true", c.name, f, power)
			}
			// Mean MTF unbiased: README says within 0.003 (200 seeds);
			// asserted at 0.006, and in the short run (fewer seeds) at
			// four standard errors of the mean if that is more.
			lim := 0.006
			if testing.Short() {
				lim = math.Max(lim, 4*sd/math.Sqrt(N))
			}
			if math.Abs(bias) > lim {
				t.Errorf("%s at %.2f cy/px: mean MTF off by %+.4f", c.name, f, bias)
			}
		}
		tab.WriteString("\n")
	}
	t.Logf("correlated noise, %d seeds, sigma %g px:\n%s", seeds, sg, tab.String())
}
