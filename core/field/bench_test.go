package field

import (
	"fmt"
	"testing"
)

// BenchmarkSummarise summarises synthetic frames of 50, 200 and 800 targets
// (two records each): field curves with span selection, map, astigmatism
// and balance.
func BenchmarkSummarise(b *testing.B) {
	geo := NewGeometry(6000, 4000, 6)
	freqs := []float64{10, 30}
	for _, n := range []int{50, 200, 800} {
		pts := synthPoints(geo, n, freqs, 4)
		b.Run(fmt.Sprint(n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Summarise(geo, pts, freqs); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
