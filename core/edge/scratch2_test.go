package edge

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

func TestScratch2(t *testing.T) {
	for _, ang := range []float64{0.5, 1, 2, 26.565, 30, 40, 44, 45, 18.435, 14.036} {
		sig := 0.7
		th := ang
		p := renderHalf(128, 128, th, sig)
		r := Region{X: 64.3, Y: 64.1, AngleDeg: th + 90, HalfLen: 50, HalfWidth: 30}
		for _, meth := range []Method{Refined, ISO} {
			m, err := Measure(p, r, Options{Method: meth})
			if err != nil {
				fmt.Printf("ang %.3f %v err %v\n", ang, meth, err)
				continue
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
			fmt.Printf("ang %6.3f %-7s worst %.4f phase %.3f flags %v\n", ang, meth, worst, m.PhasePx, m.Flags)
		}
	}
	// noise
	for _, noise := range []float64{0.002, 0.005, 0.01, 0.02} {
		sig := 0.7
		th := 5.0
		base := renderHalf(128, 128, th, sig)
		r := Region{X: 64.3, Y: 64.1, AngleDeg: th + 90, HalfLen: 50, HalfWidth: 30}
		for _, meth := range []Method{Refined, ISO} {
			var se, bias float64
			var cnt int
			for seed := uint64(1); seed <= 10; seed++ {
				rng := rand.New(rand.NewPCG(seed, 7))
				p := *base
				p.Pix = append([]float32(nil), base.Pix...)
				for i := range p.Pix {
					p.Pix[i] += float32(rng.NormFloat64() * noise)
				}
				m, err := Measure(&p, r, Options{Method: meth})
				if err != nil {
					t.Fatal(err)
				}
				c, s := math.Cos(th*math.Pi/180), math.Sin(th*math.Pi/180)
				for i, f := range m.Curve.Freq {
					if f > 0.5 {
						break
					}
					want := math.Exp(-2*math.Pi*math.Pi*sig*sig*f*f) * sinc(f*c) * sinc(f*s)
					e := m.Curve.Value[i] - want
					se += e * e
					bias += e
					cnt++
				}
			}
			fmt.Printf("noise %.3f %-7s rms %.4f bias %.4f\n", noise, meth, math.Sqrt(se/float64(cnt)), bias/float64(cnt))
		}
	}
}
