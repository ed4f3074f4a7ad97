package analyze

import (
	"context"
	"testing"

	"sagitta/core/chart"
	"sagitta/core/sim/chartsim"
	"sagitta/core/sim/simcam"
)

// TestChartAtSmallSizes guards the searches against photo sizes that fall
// between their reduction steps: Sagitta's chart filling a 1200 x 800 photo
// (squares of 55 px) must still give its edges, and at 1800 x 1200 its five
// stars (whose outer rims are then only about 5 px per cycle).
func TestChartAtSmallSizes(t *testing.T) {
	if testing.Short() {
		t.Skip("renders two chart photos")
	}
	d, err := chart.NewDesign(chart.Code{Aspect: "3:2"})
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		w, h         int
		minEdges     int
		stars        int
		checkedStars bool
	}{
		{1200, 800, 250, 0, false},
		{1800, 1200, 4 * len(d.Squares), 5, true}, // every square edge of the chart
	}
	for _, c := range cases {
		v := chartsim.View{W: c.w, H: c.h, Fill: 0.97}
		cam := simcam.Camera{W: c.w, H: c.h, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.8, Sigma2: 0.8}},
			Encoding: simcam.SRGB8, FullWellE: 20000, Seed: 1}
		data, err := cam.Encode(chartsim.Scene(d, v.Homography(d), chartsim.Print{Paper: 0.7}))
		if err != nil {
			t.Fatal(err)
		}
		img, err := Run(context.Background(), "chart.png", data, Settings{PitchUM: 36000 / float64(c.w)}, nil)
		if err != nil {
			t.Fatalf("%dx%d: %v", c.w, c.h, err)
		}
		edges := 0
		for _, m := range img.Measurements {
			if m.Kind == "edge" {
				edges++
			}
		}
		if edges < c.minEdges {
			t.Errorf("%dx%d: %d edges, want at least %d", c.w, c.h, edges, c.minEdges)
		}
		if c.checkedStars && len(img.Stars) != c.stars {
			t.Errorf("%dx%d: %d stars, want %d", c.w, c.h, len(img.Stars), c.stars)
		}
	}
}
