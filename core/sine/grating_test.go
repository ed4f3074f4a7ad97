package sine

import (
	"errors"
	"math"
	"strings"
	"testing"

	"sagitta/core/plane"
	"sagitta/core/sim/simcam"
)

// alignedRect returns the corners of a w x h rectangle centred at (cx, cy)
// whose side of length w runs along dirDeg.
func alignedRect(cx, cy, w, h, dirDeg float64) [4][2]float64 {
	s, c := math.Sincos(dirDeg * math.Pi / 180)
	var q [4][2]float64
	for i, p := range [4][2]float64{{-w / 2, -h / 2}, {w / 2, -h / 2}, {w / 2, h / 2}, {-w / 2, h / 2}} {
		q[i] = [2]float64{cx + p[0]*c - p[1]*s, cy + p[0]*s + p[1]*c}
	}
	return q
}

// TestGratingMTF renders sine gratings of known frequency and contrast
// through known PSFs and checks the measured modulation transfer against
// simcam.TrueMTF (the OTF times the pixel aperture; Goodman ch. 6, Boreman
// ch. 2), within twice README's figures, two ways: against the printed
// modulation Amplitude/Mean (README 0.002, asserted 0.004), and against a
// reference grating of 0.02 cy/px (README 0.014, asserted 0.028)
// on the same sheet (common practice: the print's own modulation). The search area is 24 px larger
// than the grating on every side, so the pattern's own extent is found.
func TestGratingMTF(t *testing.T) {
	gauss := simcam.Gaussian{Sigma1: 0.8, Sigma2: 0.8}
	cases := []struct {
		name      string
		psf       simcam.PSF
		freq, dir float64
		short     bool
	}{
		{"gauss f0.05 dir 8", gauss, 0.05, 8, false},
		{"gauss f0.15 dir -35", gauss, 0.15, -35, false},
		{"gauss f0.30 dir 60", gauss, 0.30, 60, true},
		{"gauss f0.42 dir 95", gauss, 0.42, 95, false},
		{"aniso f0.2 along the wide axis", simcam.Gaussian{Sigma1: 1.2, Sigma2: 0.6, AngleDeg: 20}, 0.2, 20, false},
		{"aniso f0.2 along the narrow axis", simcam.Gaussian{Sigma1: 1.2, Sigma2: 0.6, AngleDeg: 20}, 0.2, 110, false},
		{"airy f0.3 dir 30", simcam.Airy{WavelengthUM: 0.55, FNumber: 5.6, PitchUM: 4}, 0.3, 30, false},
	}
	const tolPrint, tolRef = 2 * 0.002, 2 * 0.014
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if testing.Short() && !c.short {
				t.Skip("heavy case")
			}
			const mean, amp = 0.45, 0.3
			g := simcam.Grating{Corners: alignedRect(150, 110, 180, 110, c.dir), FreqCyPx: c.freq, DirectionDeg: c.dir,
				Mean: mean, Amplitude: amp, PhaseDeg: 40}
			ref := simcam.Grating{Corners: alignedRect(150, 300, 220, 90, 0), FreqCyPx: 0.02, DirectionDeg: 0,
				Mean: mean, Amplitude: amp}
			lens := simcam.Fixed{PSF: c.psf}
			p := render(t, 300, 380, lens, simcam.Scene{Background: 0.7, Gratings: []simcam.Grating{g, ref}})
			gr, err := MeasureGrating(p, GratingGuess{Corners: alignedRect(150, 110, 228, 158, c.dir)}, GratingOptions{})
			if err != nil {
				t.Fatal(err)
			}
			rg, err := MeasureGrating(p, GratingGuess{Corners: alignedRect(150, 300, 268, 138, 0)}, GratingOptions{})
			if err != nil {
				t.Fatal(err)
			}
			want := simcam.TrueMTF(lens, 150, 110, c.dir, c.freq)
			byPrint := gr.Modulation / (amp / mean)
			byRef := gr.Modulation / rg.Modulation
			t.Logf("f %.5f (want %.2f), dir %.3f: vs print %.4f, vs reference %.4f, true %.4f; %d px, %.1f cycles",
				gr.FreqCyPx, c.freq, gr.DirectionDeg, byPrint, byRef, want, gr.AreaPx, gr.Cycles)
			if math.Abs(byPrint-want) > tolPrint || math.Abs(byRef-want) > tolRef {
				t.Errorf("modulation ratio %.4f (print) %.4f (reference), true MTF %.4f", byPrint, byRef, want)
			}
			if math.Abs(gr.FreqCyPx/c.freq-1) > 3e-3 || axisDist(gr.DirectionDeg, c.dir) > 0.1 {
				t.Errorf("frequency %.5f direction %.3f, want %.4f and %.1f", gr.FreqCyPx, gr.DirectionDeg, c.freq, c.dir)
			}
			if !insideAll(g.Corners, gr.Corners) {
				t.Errorf("fitted area %v leaves the grating %v", gr.Corners, g.Corners)
			}
		})
	}
}

// insideAll reports whether every corner of b lies inside a.
func insideAll(a, b [4][2]float64) bool {
	for _, q := range b {
		if !inside(a, q[0], q[1]) {
			return false
		}
	}
	return true
}

// TestGratingGiven: a grating whose outline and frequency come from a
// layout (Exact, FixedFreq) is measured from them as given.
func TestGratingGiven(t *testing.T) {
	lens := simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.9, Sigma2: 0.9}}
	const f, dir = 0.18, -20.0
	g := simcam.Grating{Corners: alignedRect(100, 100, 150, 120, 45), FreqCyPx: f, DirectionDeg: dir, Mean: 0.4, Amplitude: 0.25}
	p := render(t, 200, 200, lens, simcam.Scene{Background: 0.6, Gratings: []simcam.Grating{g}})
	gr, err := MeasureGrating(p, GratingGuess{Corners: g.Corners, FreqCyPx: f, DirectionDeg: dir, Exact: true}, GratingOptions{FixedFreq: true})
	if err != nil {
		t.Fatal(err)
	}
	want := simcam.TrueMTF(lens, 100, 100, dir, f) // Goodman ch. 6, Boreman ch. 2
	if got := gr.Modulation / (0.25 / 0.4); math.Abs(got-want) > 0.03 || math.Abs(gr.FreqCyPx-f) > 1e-12 {
		t.Errorf("modulation ratio %.4f at %.4f cy/px, want %.4f at %.2f", got, gr.FreqCyPx, want, f)
	}
}

// TestMeasureGratingErrors: unusable areas give errors naming the package.
func TestMeasureGratingErrors(t *testing.T) {
	flat := plane.New(120, 120)
	for i := range flat.Pix {
		flat.Pix[i] = 0.5
	}
	cases := []struct {
		name      string
		g         GratingGuess
		o         GratingOptions
		noGrating bool
	}{
		{"tiny area", GratingGuess{Corners: alignedRect(60, 60, 4, 4, 0)}, GratingOptions{}, false},
		{"outside", GratingGuess{Corners: alignedRect(-500, 60, 40, 40, 0)}, GratingOptions{}, false},
		{"NaN corner", GratingGuess{Corners: [4][2]float64{{math.NaN(), 0}, {50, 0}, {50, 50}, {0, 50}}}, GratingOptions{}, false},
		{"fixed without frequency", GratingGuess{Corners: alignedRect(60, 60, 80, 80, 0)}, GratingOptions{FixedFreq: true}, false},
		{"flat", GratingGuess{Corners: alignedRect(60, 60, 100, 100, 0)}, GratingOptions{}, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			g, err := MeasureGrating(flat, c.g, c.o)
			if err == nil {
				t.Fatalf("no error; grating %+v", g)
			}
			if !strings.HasPrefix(err.Error(), "sine: ") {
				t.Errorf("error %q lacks the package prefix", err)
			}
			if c.noGrating != errors.Is(err, ErrNoGrating) {
				t.Errorf("error %q: ErrNoGrating %v, want %v", err, errors.Is(err, ErrNoGrating), c.noGrating)
			}
		})
	}
}
