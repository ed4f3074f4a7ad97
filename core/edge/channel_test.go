package edge

import (
	"math"
	"testing"

	"sagitta/core/plane"
	"sagitta/core/sim/simcam"
)

// shiftedHalfPlane renders HalfPlaneScene with its edge moved by shiftPx
// along its normal (towards the light side), through a Gaussian lens, and
// scales its levels by gain (a colour channel seeing the chart's contrast
// at another strength).
func shiftedHalfPlane(t *testing.T, size int, normalDeg, shiftPx, sigma, gain float64) *plane.Plane {
	t.Helper()
	sc := simcam.HalfPlaneScene(size, size, normalDeg, 0.1*gain, 0.7*gain)
	s, c := math.Sincos(normalDeg * math.Pi / 180)
	for i := range sc.Polygons[0].Pts {
		sc.Polygons[0].Pts[i][0] += shiftPx * c
		sc.Polygons[0].Pts[i][1] += shiftPx * s
	}
	cam := simcam.Camera{W: size, H: size, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: sigma, Sigma2: sigma}}}
	p, err := cam.Render(sc)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// TestChannelOffset: a channel whose edge is the luminance edge moved by a
// known distance along the normal (plain geometry: a translated half-plane)
// gives that distance back, whatever its blur and its levels, and a
// channel equal to the luminance gives 0.
func TestChannelOffset(t *testing.T) {
	const size = 96
	for _, tc := range []struct {
		name                       string
		normal, shift, sigma, gain float64
		sigmaChannel               float64
	}{
		{"same", 5, 0, 0.8, 1, 0.8},
		{"out 0.3 px", 5, 0.3, 0.8, 1, 0.8},
		{"in 0.7 px, darker, softer", 37, -0.7, 0.8, 0.55, 1.2},
		{"out 1.9 px, steep", 83, 1.9, 1.0, 0.7, 1.0},
		{"mirrored normal", 185, 0.45, 0.8, 1.2, 0.9},
	} {
		t.Run(tc.name, func(t *testing.T) {
			lum := shiftedHalfPlane(t, size, tc.normal, 0, tc.sigma, 1)
			m, err := Measure(lum, Region{X: size / 2, Y: size / 2, AngleDeg: tc.normal + 90, HalfLen: 36, HalfWidth: 20}, Options{})
			if err != nil {
				t.Fatal(err)
			}
			// The record's normal points to the light side, as the scene's.
			sign := math.Cos((m.NormalDeg - tc.normal) * math.Pi / 180)
			ch := shiftedHalfPlane(t, size, tc.normal, tc.shift, tc.sigmaChannel, tc.gain)
			// A crop of the channel, as decode.Image.LinearRGB gives one.
			const ox, oy = 10, 7
			crop := plane.New(size-2*ox, size-2*oy)
			for y := range crop.H {
				copy(crop.Pix[y*crop.W:(y+1)*crop.W], ch.Pix[(y+oy)*size+ox:])
			}
			off, se, err := m.ChannelOffset(crop, ox, oy, nil)
			if err != nil {
				t.Fatal(err)
			}
			if got := off * sign; math.Abs(got-tc.shift) > 0.002 {
				t.Errorf("offset %.4f px (se %.4f), want %.4f", got, se, tc.shift)
			}
		})
	}
}
