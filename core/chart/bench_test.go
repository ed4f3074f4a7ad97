package chart_test

import (
	"fmt"
	"testing"

	"sagitta/core/chart"
	"sagitta/core/sim/chartsim"
	"sagitta/core/sim/simcam"
)

// BenchmarkRender draws the A4 chart at 600 dpi in each format.
func BenchmarkRender(b *testing.B) {
	l, err := chart.NewLayout(chart.Options{Paper: "A4", DPI: 600})
	if err != nil {
		b.Fatal(err)
	}
	for _, f := range []string{"pdf", "svg", "png"} {
		b.Run("A4-600dpi/"+f, func(b *testing.B) {
			b.ReportAllocs()
			var n int
			for b.Loop() {
				out, err := l.Render(f)
				if err != nil {
					b.Fatal(err)
				}
				n = len(out)
			}
			b.ReportMetric(float64(n)/1e6, "MB/file")
		})
	}
}

// BenchmarkRecognise finds the chart in simulated photos of 6 and 24 MP
// (the chart filling the frame, a sharp Gaussian lens, photon noise).
func BenchmarkRecognise(b *testing.B) {
	d, _ := chart.NewDesign(chart.Code{Aspect: "3:2"})
	for _, sz := range [][2]int{{3000, 2000}, {6000, 4000}} {
		v := chartsim.View{W: sz[0], H: sz[1], Fill: 0.97, RollDeg: 1, YawDeg: 4, FocalPx: 2 * float64(sz[0])}
		cam := simcam.Camera{W: v.W, H: v.H, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.8, Sigma2: 0.8}}, FullWellE: 20000, Seed: 1}
		p, err := cam.Render(chartsim.Scene(d, v.Homography(d), chartsim.Print{}))
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("%dx%d", v.W, v.H), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if pose, note := chart.Recognise(p); pose == nil {
					b.Fatal(note.Text)
				}
			}
		})
	}
}
