package chartsim_test

import (
	"os"
	"testing"

	"sagitta/core/chart"
	"sagitta/core/internal/look"
	"sagitta/core/sim/chartsim"
	"sagitta/core/sim/simcam"
)

// TestLook writes a simulated photo of the chart to
// $SAGITTA_LOOK/chartsim/photo.png for inspection (skipped unless
// SAGITTA_LOOK is set).
func TestLook(t *testing.T) {
	dir := look.Need(t, "chartsim")
	d, _ := chart.NewDesign(chart.Code{Aspect: "3:2"})
	v := chartsim.View{W: 1800, H: 1200, Fill: 0.95, RollDeg: 2.5, YawDeg: 12, FocalPx: 4000}
	cam := simcam.Camera{W: v.W, H: v.H, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.9, Sigma2: 0.9}}, FullWellE: 20000, ReadNoiseE: 3, Seed: 3}
	buf, err := cam.Encode(chartsim.Scene(d, v.Homography(d), chartsim.Print{}))
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(dir+"/photo.png", buf, 0o644); err != nil {
		t.Fatal(err)
	}
}
