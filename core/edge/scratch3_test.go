package edge

import "testing"

func BenchmarkScratch(b *testing.B) {
	p := renderHalf(128, 128, 5, 0.7)
	r := Region{X: 64.3, Y: 64.1, AngleDeg: 95, HalfLen: 50, HalfWidth: 30}
	for _, meth := range []Method{Refined, ISO} {
		b.Run(meth.String(), func(b *testing.B) {
			b.ReportAllocs()
			for i := 0; i < b.N; i++ {
				if _, err := Measure(p, r, Options{Method: meth}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
