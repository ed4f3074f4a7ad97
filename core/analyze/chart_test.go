package analyze_test

import (
	"context"
	"strings"
	"testing"

	"sagitta/core/analyze"
	"sagitta/core/sim/simcam"
)

// TestNoChart: a photo of tilted squares that is not Sagitta's chart is
// analysed as before chart recognition existed: no chart result, no chart
// warnings, no target tags, no measurements set aside for lying on chart
// marks or patterns.
func TestNoChart(t *testing.T) {
	s := simcam.Scene{Background: 0.8}
	for i := range 4 {
		for j := range 3 {
			s.Polygons = append(s.Polygons, simcam.Square(110+float64(i)*180, 110+float64(j)*180, 90, 5+float64(i+j), 0.2))
		}
	}
	cam := simcam.Camera{W: 760, H: 560, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.8, Sigma2: 0.8}}, Encoding: simcam.Linear16}
	photo, err := cam.Encode(s)
	if err != nil {
		t.Fatal(err)
	}
	img, err := analyze.Run(context.Background(), "squares.png", photo, analyze.Settings{PitchUM: 5, Tone: "linear"}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if img.Chart != nil {
		t.Errorf("a chart was recognised: %+v", img.Chart)
	}
	// Distortion and fall-off need the chart: not measured, with the reason's code.
	if d := img.Distortion; d == nil || d.Measured || d.ReasonCode != "distortion-no-chart" {
		t.Errorf("distortion %+v, want not measured (distortion-no-chart)", d)
	}
	if f := img.Falloff; f == nil || f.Measured || f.ReasonCode != "falloff-no-chart" {
		t.Errorf("fall-off %+v, want not measured (falloff-no-chart)", f)
	}
	if len(img.Measurements) < 40 {
		t.Errorf("%d measurements of 48 edges", len(img.Measurements))
	}
	for _, w := range img.Warnings {
		if strings.HasPrefix(w, "chart: ") {
			t.Errorf("chart warning %q", w)
		}
	}
	for _, m := range img.Measurements {
		if m.TargetID != "" || m.ChartXY != nil || m.ChartField != nil {
			t.Errorf("measurement %d tagged %q", m.ID, m.TargetID)
		}
	}
	for _, r := range img.Rejected {
		if strings.Contains(r.Reason, "chart") || strings.Contains(r.Reason, "sine pattern") {
			t.Errorf("rejected for a chart reason: %s", r.Reason)
		}
	}
}
