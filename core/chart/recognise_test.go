package chart_test

import (
	"math"
	"testing"

	"sagitta/core/chart"
	"sagitta/core/chart/chartsim"
	"sagitta/core/simcam"
)

func TestRecogniseScratch(t *testing.T) {
	d, _ := chart.NewDesign(chart.Code{Aspect: "3:2"})
	v := chartsim.View{W: 1500, H: 1000, Fill: 0.95, RollDeg: 3, YawDeg: 10, FocalPx: 3000}
	h := v.Homography(d)
	cam := simcam.Camera{W: v.W, H: v.H, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.8, Sigma2: 0.8}}}
	p := cam.RenderLinear(chartsim.Scene(d, h, chartsim.Print{}))
	pose, note := chart.Recognise(p)
	if pose == nil {
		t.Fatalf("not found: %s", note)
	}
	t.Logf("marks %d residual %.3f", len(pose.Marks), pose.ResidualPx)
	var worst float64
	for _, q := range d.Squares {
		for _, c := range q.Corners() {
			x0, y0 := h.Apply(c[0], c[1])
			x1, y1 := pose.H.Apply(c[0], c[1])
			worst = math.Max(worst, math.Hypot(x1-x0, y1-y0))
		}
	}
	t.Logf("worst corner error %.3f px", worst)
}
