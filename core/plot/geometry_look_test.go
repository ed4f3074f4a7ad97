package plot_test

import (
	"context"
	"os"
	"path/filepath"
	"testing"

	"sagitta/core/analyze"
	"sagitta/core/internal/look"
	"sagitta/core/plot"
	"sagitta/core/sim/demo"
)

// TestLookGeometry writes the distortion and fall-off plots of the demo
// photo (its invented lens has mild barrel distortion and vignetting) at a
// quarter of its size, and their comparison with the same photo measured
// with another pixel pitch, into $SAGITTA_LOOK/plot.
func TestLookGeometry(t *testing.T) {
	dir := look.Need(t, "plot")
	data, err := demo.PortraitSmall(4).Photo()
	if err != nil {
		t.Fatal(err)
	}
	img, err := analyze.Run(context.Background(), "demo.jpg", data, analyze.Settings{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	moved, err := analyze.Resummarise(img, analyze.Settings{PitchUM: 20})
	if err != nil {
		t.Fatal(err)
	}
	both := []plot.GeometryPhoto{{Label: "demo", Distortion: img.Distortion, Falloff: img.Falloff}, {Label: "pitch 20 um", Distortion: moved.Distortion, Falloff: moved.Falloff}}
	figs := map[string]*plot.Figure{
		"distortion":         plot.Distortion(img.Distortion, "demo"),
		"falloff":            plot.Falloff(img, "demo"),
		"distortion-compare": plot.CompareDistortion(both),
		"falloff-compare":    plot.CompareFalloff(both),
	}
	for name, f := range figs {
		b, err := f.PNG(1)
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, name+".png"), b, 0o644); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, name+".svg"), f.SVG(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	t.Log(img.Distortion.Text, img.Distortion.Cautions)
	t.Logf("fall-off corner %.3f EV, cautions %q", img.Falloff.CornerEV, img.Falloff.CautionCodes)
}
