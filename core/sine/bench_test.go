package sine

import (
	"fmt"
	"testing"

	"sagitta/core/plane"
	"sagitta/core/sim/simcam"
)

// benchFrame renders a w x h frame with a 3 x 2 grid of stars (48 cycles,
// radius a tenth of the height) through a Gaussian lens.
func benchFrame(b *testing.B, w, h int) *plane.Plane {
	b.Helper()
	sc := simcam.Scene{Background: 0.7}
	r := float64(h) / 10
	for i := range 3 {
		for j := range 2 {
			sc.Stars = append(sc.Stars, simcam.Star{X: float64(w) * (0.2 + 0.3*float64(i)), Y: float64(h) * (0.3 + 0.4*float64(j)),
				Radius: r, Cycles: 48, Mean: 0.42, Amplitude: 0.3})
		}
	}
	cam := simcam.Camera{W: w, H: h, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.9, Sigma2: 0.9}}}
	return cam.RenderLinear(sc)
}

// BenchmarkStars finds and measures every star of a frame.
func BenchmarkStars(b *testing.B) {
	for _, sz := range []struct {
		name string
		w, h int
	}{{"6MP", 3000, 2000}, {"24MP", 6000, 4000}} {
		b.Run(sz.name, func(b *testing.B) {
			p := benchFrame(b, sz.w, sz.h)
			b.ReportAllocs()
			b.ResetTimer()
			for b.Loop() {
				n := 0
				for _, c := range Find(p, FindOptions{}) {
					if c.Kind != KindStar {
						continue
					}
					if _, err := MeasureStar(p, StarGuess{c.X, c.Y, c.RadiusPx}, StarOptions{}); err == nil {
						n++
					}
				}
				if n != 6 {
					b.Fatal(fmt.Sprintf("measured %d stars, want 6", n))
				}
			}
		})
	}
}
