package simcam

import (
	"fmt"
	"math/rand/v2"
	"testing"
)

// benchScene returns a w x h chart of about n tilted squares on a grid
// (fixed seed), as a slanted-edge test chart would have.
func benchScene(w, h, n int) Scene {
	rng := rand.New(rand.NewPCG(5, 6))
	s := Scene{Background: 0.8}
	cols := 1
	for cols*cols*h/w < n {
		cols++
	}
	rows := max(1, n/cols)
	cw, ch := float64(w)/float64(cols), float64(h)/float64(rows)
	side := 0.55 * min(cw, ch)
	for j := range rows {
		for i := range cols {
			s.Polygons = append(s.Polygons, Square((float64(i)+0.5)*cw, (float64(j)+0.5)*ch, side, 3+rng.Float64()*6, 0.1))
		}
	}
	return s
}

// BenchmarkRender renders charts of ~200 tilted squares (24 MP) through a
// field-varying Gaussian lens.
func BenchmarkRender(b *testing.B) {
	for _, sz := range [][3]int{{600, 400, 20}, {2000, 1500, 80}, {6000, 4000, 200}} {
		w, h, n := sz[0], sz[1], sz[2]
		s := benchScene(w, h, n)
		for _, lc := range []struct {
			name string
			lens Lens
		}{
			{"fixed", Fixed{Gaussian{0.8, 0.6, 20}}},
			{"field", FieldLens{CentreX: float64(w) / 2, CentreY: float64(h) / 2, PitchUM: 4, SigmaT: []float64{0.5, 0, 0.01}, SigmaS: []float64{0.5, 0.02}}},
		} {
			b.Run(fmt.Sprintf("%dx%d/%s", w, h, lc.name), func(b *testing.B) {
				cam := Camera{W: w, H: h, Lens: lc.lens}
				b.ReportAllocs()
				for b.Loop() {
					cam.RenderLinear(s)
				}
			})
		}
	}
}
