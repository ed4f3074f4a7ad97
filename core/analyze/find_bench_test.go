package analyze

import (
	"context"
	"os"
	"path/filepath"
	"testing"

	"sagitta/core/chart"
	"sagitta/core/decode"
	"sagitta/core/edgefind"
	"sagitta/core/sine"
)

// BenchmarkFind times the find stage on the 24 MP photo of `make bench`
// ($TMPDIR/sagitta-bench/chart-24MP-3000e.jpg, see benchChartPhoto):
// whole, and its searches alone on the decoded photo. Under GOOS=js
// GOARCH=wasm it runs in node, single-threaded as in the page. Run with
// -benchtime 1x -count 3; times are printed, never asserted.
func BenchmarkFind(b *testing.B) {
	data, err := os.ReadFile(filepath.Join(os.TempDir(), "sagitta-bench", "chart-24MP-3000e.jpg"))
	if err != nil {
		b.Skipf("no bench photo (run make bench first): %v", err)
	}
	ph := Photo{Name: "chart.jpg", Data: data}
	b.Run("whole", func(b *testing.B) {
		b.ReportAllocs()
		c0 := cpuTime()
		for b.Loop() {
			if _, err := Find(context.Background(), ph, Settings{}, nil); err != nil {
				b.Fatal(err)
			}
		}
		if c1 := cpuTime(); c0 >= 0 && c1 >= 0 { // user + system time, all threads
			b.ReportMetric((c1-c0).Seconds()/float64(b.N), "cpu-s/op")
		}
	})
	dec, err := decode.Decode(data, decode.Options{})
	if err != nil {
		b.Fatal(err)
	}
	b.Run("chart", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			chart.Recognise(dec.Lum)
		}
	})
	b.Run("edges", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			edgefind.Edges(dec.Lum, edgefind.Options{})
		}
	})
	b.Run("sine", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			sine.Find(dec.Lum, sine.FindOptions{})
		}
	})
}
