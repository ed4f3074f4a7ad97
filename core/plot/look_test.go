package plot_test

import (
	"context"
	"math"
	"os"
	"path/filepath"
	"testing"

	"sagitta/core/analyze"
	"sagitta/core/internal/look"
	"sagitta/core/plot"
	"sagitta/core/sim/simcam"
)

// TestLook renders every plot of a realistic simulated shoot to PNG and SVG
// in $SAGITTA_LOOK/plot, for people to look at; without SAGITTA_LOOK the
// test is skipped. The shoot: a 36 x 24 mm frame (3000 x 2000 px at
// 12 um) of radially turned squares through a field-varying lens, once
// centred and once with the right side softer, at f/5.6.
func TestLook(t *testing.T) {
	dir := look.Need(t, "plot")
	const w, h, pitch = 3000, 2000, 12.0
	var imgs []*analyze.Image
	for _, tilt := range []float64{0, 0.02} {
		lens := simcam.FieldLens{CentreX: w / 2, CentreY: h / 2, PitchUM: pitch,
			SigmaT: []float64{0.45, 0, 0.0022}, SigmaS: []float64{0.45, 0.012}, TiltPerMM: tilt}
		cam := simcam.Camera{W: w, H: h, Lens: lens, FullWellE: 8000, ReadNoiseE: 3, Seed: 5, Encoding: simcam.SRGB16}
		sc := simcam.Scene{Background: 0.75}
		for j := 0; j < 12; j++ {
			for i := 0; i < 18; i++ {
				x, y := (float64(i)+0.5)*w/18, (float64(j)+0.5)*h/12
				rad := math.Atan2(y-h/2, x-w/2) * 180 / math.Pi
				sc.Polygons = append(sc.Polygons, simcam.Square(x, y, 90, rad+5, 0.12))
			}
		}
		buf, err := cam.Encode(sc)
		if err != nil {
			t.Fatal(err)
		}
		img, err := analyze.Run(context.Background(), "simulated.png", buf, analyze.Settings{PitchUM: pitch}, nil)
		if err != nil {
			t.Fatal(err)
		}
		img.Exif.FNumber = 5.6
		imgs = append(imgs, img)
	}
	img := imgs[1]
	s := img.Summary.Field()
	far := img.Measurements[len(img.Measurements)-1]
	figs := map[string]*plot.Figure{
		"field-curves": plot.FieldCurves(s, plot.FieldOptions{Label: "tilted", Band: true}),
		"map":          plot.Map(s, plot.MapOptions{Label: "tilted"}),
		"astigmatism":  plot.Astigmatism(s, plot.FieldOptions{Label: "tilted", Band: true}),
		"compare":      plot.Compare([]plot.Photo{{Label: "centred", Summary: imgs[0].Summary.Field()}, {Label: "tilted", Summary: s}}, plot.CompareOptions{}),
		"target":       plot.Target(plot.TargetFromMeasurement(far, img), plot.TargetOptions{}),
		"target-lpmm":  plot.Target(plot.TargetFromMeasurement(img.Measurements[0], img), plot.TargetOptions{LPMM: true}),
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
	t.Log(s.Balance.Text)
	for _, a := range s.Astigmatism {
		t.Log(a.Text)
	}
}
