package edge

import (
	"fmt"
	"math"
	"testing"

	"sagitta/core/plane"
)

// renderHalf: edge line through (cx,cy), normal angle th (deg), gaussian sigma; dark 0.1 light 0.8
func renderHalf(w, h int, th, sigma float64) *plane.Plane {
	p := plane.New(w, h)
	nx, ny := math.Cos(th*math.Pi/180), math.Sin(th*math.Pi/180)
	cx, cy := float64(w)/2+0.3, float64(h)/2+0.1
	const ng = 12
	for y := 0; y < h; y++ {
		for x := 0; x < w; x++ {
			var s float64
			for i := 0; i < ng; i++ {
				for j := 0; j < ng; j++ {
					px := float64(x) + (float64(i)+0.5)/ng
					py := float64(y) + (float64(j)+0.5)/ng
					d := (px-cx)*nx + (py-cy)*ny
					if sigma == 0 {
						if d > 0 {
							s++
						}
					} else {
						s += 0.5 * math.Erfc(-d/sigma/math.Sqrt2)
					}
				}
			}
			p.Set(x, y, float32(0.1+0.7*s/ng/ng))
		}
	}
	return p
}

func TestScratch(t *testing.T) {
	for _, sig := range []float64{0.5, 1, 2} {
		for _, ang := range []float64{3, 5, 10, 20, 35} {
			th := ang // normal angle from x axis -> edge nearly vertical
			p := renderHalf(128, 128, th, sig)
			r := Region{X: 64.3, Y: 64.1, AngleDeg: th + 90, HalfLen: 50, HalfWidth: 30}
			for _, meth := range []Method{Refined, ISO} {
				m, err := Measure(p, r, Options{Method: meth})
				if err != nil {
					t.Fatal(err)
				}
				c, s := math.Cos(th*math.Pi/180), math.Sin(th*math.Pi/180)
				var worst float64
				for i, f := range m.Curve.Freq {
					if f > 0.5 {
						break
					}
					want := math.Exp(-2*math.Pi*math.Pi*sig*sig*f*f) * sinc(f*c) * sinc(f*s)
					worst = math.Max(worst, math.Abs(m.Curve.Value[i]-want))
				}
				fmt.Printf("sig %.1f ang %2.0f %-7s worst %.4f mtf50 %.4f phase %.3f flags %v normal %.2f\n", sig, ang, meth, worst, m.Curve.MTF50(), m.PhasePx, m.Flags, m.NormalDeg)
			}
		}
	}
}
