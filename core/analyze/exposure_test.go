package analyze

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"sagitta/core/sim/simcam"
)

// squaresAt renders dark squares on paper of linear level paper (1 = full
// scale; above 1 the camera clips), 8-bit sRGB with photon noise.
func squaresAt(t *testing.T, paper float64) []byte {
	t.Helper()
	const w, h = 900, 600
	sc := simcam.Scene{Background: paper}
	for i := range 6 {
		x := 150 + 300*float64(i%3)
		y := 150 + 300*float64(i/3)
		sc.Polygons = append(sc.Polygons, simcam.Square(x, y, 120, 5+float64(i), paper/8))
	}
	cam := simcam.Camera{W: w, H: h, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.9, Sigma2: 0.9}},
		Encoding: simcam.SRGB8, FullWellE: 20000, Seed: 4}
	b, err := cam.Encode(sc)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// TestExposureAdvice: the paper should sit near 80 % of full scale in the
// file's values, linear 0.604 through the sRGB transfer function
// (IEC 61966-2-1; the 80 % is common practice). Paper at full scale keeps
// its edges (a plateau at the limit loses nothing) with advice of
// log2(1 / 0.604) = 0.73 stop, rounded up to the half stop: 1 stop darker.
// Paper 0.4 stop over the limit clips every edge: the photo is refused with
// the advice. Paper at linear 0.09 is 2.7 stops under: 2.5 stops brighter
// (half stops).
func TestExposureAdvice(t *testing.T) {
	s := Settings{PitchUM: 5}
	img, err := Run(context.Background(), "at-limit.png", squaresAt(t, 1.0), s, nil)
	if err != nil {
		t.Fatal(err)
	}
	kept := 0
	for _, m := range img.Measurements {
		if m.Kind == "edge" {
			kept++
		}
	}
	if kept < 20 || img.Exposure == nil || img.Exposure.Code != "overexposed" || img.Exposure.Stops != -1 {
		t.Errorf("paper at full scale: %d edges kept, advice %+v", kept, img.Exposure)
	} else if !strings.Contains(strings.Join(img.Warnings, "\n"), "shoot about 1 stop darker") {
		t.Errorf("warnings %q lack the advice", img.Warnings)
	}
	t.Logf("paper at full scale: %d edges kept; %s", kept, img.Exposure.Text)

	_, err = Run(context.Background(), "over.png", squaresAt(t, 1.3), s, nil)
	if !errors.Is(err, ErrNoTargets) || !strings.Contains(err.Error(), "shoot at least 1 stop darker") {
		t.Errorf("paper over the limit: %v", err)
	}
	t.Logf("paper 0.4 stop over: %v", err)

	img, err = Run(context.Background(), "dark.png", squaresAt(t, 0.09), s, nil)
	if err != nil {
		t.Fatal(err)
	}
	want := math.Ceil(2*math.Log2(0.604/0.09)-0.25) / 2
	if img.Exposure == nil || img.Exposure.Code != "underexposed" || math.Abs(img.Exposure.Stops-want) > 0.5 {
		t.Errorf("dark paper: advice %+v, want underexposed by %g stops", img.Exposure, want)
	} else {
		t.Logf("dark paper: %s", img.Exposure.Text)
	}

	img, err = Run(context.Background(), "good.png", squaresAt(t, 0.6), s, nil)
	if err != nil {
		t.Fatal(err)
	}
	if img.Exposure != nil {
		t.Errorf("well exposed photo advised: %+v", img.Exposure)
	}
}
