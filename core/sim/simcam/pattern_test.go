package simcam

import (
	"math"
	"testing"
)

// TestGratingInterior checks interior grating pixels against the analytic
// response of a linear shift-invariant system to a cosine: the cosine is
// multiplied by the system transfer function at its frequency,
// Mean + Amplitude * OTF(f n) * sinc(f cos a) * sinc(f sin a) * cos(...)
// at the pixel centre (Goodman ch. 6; Boreman ch. 2 for the pixel aperture).
func TestGratingInterior(t *testing.T) {
	cases := []struct {
		name          string
		psf           PSF
		freq, dir, bg float64
		tol           float64
	}{
		{"gauss f0.1 dir 30 bg 0.7", Gaussian{0.9, 0.6, 10}, 0.1, 30, 0.7, 1e-3},
		{"gauss f0.37 dir -80 bg 0.2", Gaussian{0.5, 0.5, 0}, 0.37, -80, 0.2, 1e-3},
		{"ideal f0.45 dir 5", Gaussian{}, 0.45, 5, 0.5, 1e-3},
		{"airy f0.3 dir 60 bg=mean", Airy{0.55, 5.6, 4}, 0.3, 60, 0.45, 1e-3},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			const w, h = 120, 100
			g := Grating{Corners: [4][2]float64{{10, 12}, {110, 12}, {110, 90}, {10, 90}},
				FreqCyPx: c.freq, DirectionDeg: c.dir, Mean: 0.45, Amplitude: 0.3, PhaseDeg: 25}
			lens := Fixed{c.psf}
			p := (&Camera{W: w, H: h, Lens: lens}).RenderLinear(Scene{Background: c.bg, Gratings: []Grating{g}})
			sa, ca := math.Sincos(c.dir * math.Pi / 180)
			m := TrueMTF(lens, 0, 0, c.dir, c.freq)
			// the sign of OTF * sinc * sinc (TrueMTF is its magnitude)
			sign := math.Copysign(1, c.psf.OTF(c.freq*ca, c.freq*sa)*sinc(c.freq*ca)*sinc(c.freq*sa))
			margin := 12 // beyond the Gaussian support; the Airy case has bg = Mean
			maxd := 0.0
			for j := 12 + margin; j < 90-margin; j++ {
				for i := 10 + margin; i < 110-margin; i++ {
					x, y := float64(i)+0.5, float64(j)+0.5
					want := 0.45 + 0.3*sign*m*math.Cos(2*math.Pi*c.freq*(x*ca+y*sa)+25*math.Pi/180)
					maxd = math.Max(maxd, math.Abs(float64(p.At(i, j))-want))
				}
			}
			if maxd > c.tol {
				t.Errorf("max |render - analytic| = %.2e", maxd)
			}
			t.Logf("max |render - analytic| = %.2e (MTF %.4f)", maxd, m)
			// far outside: the background
			if v := p.At(2, 2); math.Abs(float64(v)-c.bg) > 2e-3 {
				t.Errorf("outside pixel %v, background %v", v, c.bg)
			}
		})
	}
}

// TestStarModulation fits the Cycles-th harmonic on a ring of a rendered
// sinusoidal star: its amplitude relative to the star's is the system MTF at
// the local frequency Cycles / (2 pi r) (ISO 12233:2014, s-SFR annex), here for an
// isotropic Gaussian whose MTF does not depend on direction, times the pixel
// aperture averaged over the ring's directions (within 1 %: the ring has a
// width of one pixel and the star's lines are curved).
func TestStarModulation(t *testing.T) {
	const w, h = 200, 200
	st := Star{X: 100, Y: 100, Radius: 90, Cycles: 24, Mean: 0.4, Amplitude: 0.3}
	g := Gaussian{0.8, 0.8, 0}
	p := (&Camera{W: w, H: h, Lens: Fixed{g}}).RenderLinear(Scene{Background: 0.4, Stars: []Star{st}})
	for _, r := range []float64{40, 60} {
		f := float64(st.Cycles) / (2 * math.Pi * r)
		// Least-squares fit of a cos(N phi) + b sin(N phi) to the pixels whose
		// centres lie within 0.5 px of the ring (the harmonics are nearly
		// orthogonal over the ~2 pi r pixels, so plain projections suffice).
		var a, b, ca, cb, pix float64
		n := 0
		for j := range h {
			for i := range w {
				dx, dy := float64(i)+0.5-st.X, float64(j)+0.5-st.Y
				if math.Abs(math.Hypot(dx, dy)-r) > 0.5 {
					continue
				}
				phi := math.Atan2(dy, dx)
				v := float64(p.At(i, j)) - st.Mean
				c, s := math.Cos(float64(st.Cycles)*phi), math.Sin(float64(st.Cycles)*phi)
				a += v * c
				b += v * s
				ca += c * c
				cb += s * s
				// the pattern varies along the azimuth: normal at phi + 90 deg
				pix += math.Abs(sinc(-f*math.Sin(phi)) * sinc(f*math.Cos(phi)))
				n++
			}
		}
		amp := math.Hypot(a/ca, b/cb)
		want := g.OTF(f, 0) * pix / float64(n)
		if got := amp / st.Amplitude; math.Abs(got-want) > 0.01 {
			t.Errorf("r = %v (f = %.3f cy/px): modulation %.4f, want %.4f", r, f, got, want)
		} else {
			t.Logf("r = %v (f = %.3f cy/px): modulation %.4f, want %.4f", r, f, got, want)
		}
	}
}
