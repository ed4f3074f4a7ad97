package plot_test

import (
	"context"
	"math"
	"os"
	"path/filepath"
	"testing"

	"sagitta/core/analyze"
	"sagitta/core/chart"
	"sagitta/core/plot"
	"sagitta/core/sim/chartsim"
	"sagitta/core/sim/simcam"
)

// TestToneCurvePlot draws the tone curve of a simulated chart photo through
// a camera S-curve. Each grey step's measured value must be what the
// camera chain gives its reflectance: the sRGB encoding and decoding of
// IEC 61966-2-1 around the known S-curve, relative to the paper's (0.8,
// chartsim's default). With PLOT_LOOK set the SVG and PNG are written there
// for looking at.
func TestToneCurvePlot(t *testing.T) {
	d, err := chart.NewDesign(chart.Code{Aspect: "3:2"})
	if err != nil {
		t.Fatal(err)
	}
	w, h := 900, 600
	hom := chartsim.View{W: w, H: h, Fill: 0.97}.Homography(d)
	a := 0.6
	cam := simcam.Camera{W: w, H: h, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.8, Sigma2: 0.8}}, Encoding: simcam.SRGB16,
		Curve: func(v float64) float64 { return v - a*math.Sin(2*math.Pi*v)/(2*math.Pi) }}
	photo, err := cam.Encode(chartsim.Scene(d, hom, chartsim.Print{}))
	if err != nil {
		t.Fatal(err)
	}
	img, err := analyze.Run(context.Background(), "s-curve.png", photo, analyze.Settings{PitchUM: 40}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if img.ToneFit == nil {
		t.Fatalf("no tone fit: %q", img.Warnings)
	}
	// IEC 61966-2-1:1999, section 5.2 (and its inverse).
	enc := func(l float64) float64 {
		if l <= 0.0031308 {
			return 12.92 * l
		}
		return 1.055*math.Pow(l, 1/2.4) - 0.055
	}
	dec := func(v float64) float64 {
		if v <= 0.04045 {
			return v / 12.92
		}
		return math.Pow((v+0.055)/1.055, 2.4)
	}
	chain := func(r float64) float64 { return dec(cam.Curve(enc(0.8 * r))) }
	for _, st := range img.ToneFit.Steps {
		want := chain(st.Reflectance) / chain(1)
		if math.Abs(st.Measured-want) > 0.005 {
			t.Errorf("grey step %.3f: measured %.4f, the camera chain gives %.4f", st.Reflectance, st.Measured, want)
		}
	}
	f := plot.ToneCurve(img.ToneFit, img.File)
	if len(f.Data.Rows) != len(img.ToneFit.Curve)+len(img.ToneFit.Steps) {
		t.Errorf("table has %d rows", len(f.Data.Rows))
	}
	if dir := os.Getenv("PLOT_LOOK"); dir != "" {
		png, err := f.PNG(1)
		if err != nil {
			t.Fatal(err)
		}
		_ = os.WriteFile(filepath.Join(dir, "tone.svg"), f.SVG(), 0o644)
		_ = os.WriteFile(filepath.Join(dir, "tone.png"), png, 0o644)
	}
}
