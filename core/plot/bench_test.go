package plot

import (
	"fmt"
	"testing"
)

// BenchmarkRender draws each plot as SVG and as PNG at scale 1 and 2, for
// summaries of 60 and 400 targets.
func BenchmarkRender(b *testing.B) {
	for _, n := range []int{60, 400} {
		s := testSummary(b, 6000, 4000, 6, n, 1, 0)
		figs := []struct {
			name string
			f    *Figure
		}{
			{"field-curves", FieldCurves(s, FieldOptions{Band: true})},
			{"map", Map(s, MapOptions{})},
			{"astigmatism", Astigmatism(s, FieldOptions{Band: true})},
			{"compare", Compare([]Photo{{"a", s}, {"b", s}}, CompareOptions{})},
			{"target", Target(testTarget(), TargetOptions{})},
		}
		for _, fc := range figs {
			b.Run(fmt.Sprintf("%s/%d/svg", fc.name, n), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					fc.f.SVG()
				}
			})
			for _, scale := range []float64{1, 2} {
				b.Run(fmt.Sprintf("%s/%d/png-x%g", fc.name, n, scale), func(b *testing.B) {
					b.ReportAllocs()
					for b.Loop() {
						if _, err := fc.f.PNG(scale); err != nil {
							b.Fatal(err)
						}
					}
				})
			}
		}
	}
}

// BenchmarkBuild builds the plot descriptions (no drawing) from a summary
// of 400 targets.
func BenchmarkBuild(b *testing.B) {
	s := testSummary(b, 6000, 4000, 6, 400, 1, 0)
	b.ReportAllocs()
	for b.Loop() {
		FieldCurves(s, FieldOptions{Band: true})
		Map(s, MapOptions{})
		Astigmatism(s, FieldOptions{Band: true})
	}
}
