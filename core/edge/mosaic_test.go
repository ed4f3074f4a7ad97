package edge

import (
	"math"
	"testing"

	"sagitta/core/sim/simcam"
)

// rggb selects the planes of an RGGB mosaic: red at even x and y, blue at
// odd x and y, green where x + y is odd (the quincunx).
func rggb(colour int) Sites {
	switch colour {
	case 0:
		return Sites{Keep: func(x, y int) bool { return x%2 == 0 && y%2 == 0 }, Period: 2}
	case 2:
		return Sites{Keep: func(x, y int) bool { return x%2 == 1 && y%2 == 1 }, Period: 2}
	}
	return Sites{Keep: func(x, y int) bool { return (x+y)%2 == 1 }, Period: 2}
}

// TestMosaicPlanes measures noise-free simulated edges on the green
// quincunx and on the red and blue planes of an RGGB mosaic and compares
// them, up to each plane's Nyquist frequency, with the analytic system MTF
// of the simulation: the Gaussian lens exp(-2 pi^2 sigma^2 f^2) times the
// photosite's aperture sinc(f cos t) sinc(f sin t) (Goodman, Introduction to
// Fourier Optics, 3rd ed., ch. 2 and 6; Boreman, MTF in Optical and
// Electro-Optical Systems, ch. 2), f in cycles per photo pixel. README
// quotes the worst errors: 0.0002 on the green quincunx, 0.0004 on red and
// blue (asserted at twice those).
func TestMosaicPlanes(t *testing.T) {
	const size = 160
	worst := [3]float64{}
	for _, sg := range []float64{0.6, 1.0, 1.6} {
		for _, normal := range []float64{4, 8, 13, 22, 35, 96} {
			p := halfPlane(t, size, normal, simcam.Gaussian{Sigma1: sg, Sigma2: sg})
			for colour := range 3 {
				m, err := MeasureSites(p, rggb(colour), centred(size, normal, 50, 20), Options{})
				if err != nil {
					t.Fatalf("sigma %v normal %v colour %d: %v", sg, normal, colour, err)
				}
				nyq := PlaneNyquist(colour == 1, normal)
				var w float64
				for i, f := range m.Curve.Freq {
					if f > nyq+1e-9 {
						break
					}
					truth := math.Exp(-2*math.Pi*math.Pi*sg*sg*f*f) * pixelMTF(f, normal)
					w = math.Max(w, math.Abs(m.Curve.Value[i]-truth))
				}
				worst[colour] = math.Max(worst[colour], w)
				if testing.Verbose() {
					t.Logf("sigma %.1f normal %4.0f colour %d: worst %.4f up to %.3f cy/px, flags %v", sg, normal, colour, w, nyq, m.Flags)
				}
			}
		}
	}
	t.Logf("worst error: red %.4f, green %.4f, blue %.4f", worst[0], worst[1], worst[2])
	if worst[1] > 0.0004 {
		t.Errorf("green quincunx: worst error %.4f > 0.0004", worst[1])
	}
	if worst[0] > 0.0008 || worst[2] > 0.0008 {
		t.Errorf("red/blue: worst error %.4f / %.4f > 0.0008", worst[0], worst[2])
	}
}

// TestPlaneNyquist checks the lattice limits on the axes and the diagonal:
// the quincunx reaches 0.5 cy/px along an axis and 0.5/sqrt 2 along the
// diagonal; a pitch-2 plane 0.25 along an axis and 0.25 sqrt 2 diagonally.
func TestPlaneNyquist(t *testing.T) {
	cases := []struct {
		quincunx bool
		deg      float64
		want     float64
	}{
		{true, 0, 0.5}, {true, 90, 0.5}, {true, 45, 0.5 / math.Sqrt2},
		{false, 0, 0.25}, {false, 180, 0.25}, {false, 45, 0.25 * math.Sqrt2},
	}
	for _, c := range cases {
		if got := PlaneNyquist(c.quincunx, c.deg); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("quincunx %v at %v deg: %v, want %v", c.quincunx, c.deg, got, c.want)
		}
	}
}
