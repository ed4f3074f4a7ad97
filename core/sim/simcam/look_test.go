package simcam

import (
	"os"
	"path/filepath"
	"runtime"
	"testing"

	"sagitta/core/internal/look"
)

// lookScene is a 600 x 400 scene with tilted squares, a star and a grating.
func lookScene() Scene {
	s := Scene{Background: 0.6}
	for i := range 5 {
		for j := range 2 {
			s.Polygons = append(s.Polygons, Square(60+float64(i)*60, 70+float64(j)*120, 40, 5+float64(i*7+j*3), 0.08))
		}
	}
	s.Stars = []Star{{X: 470, Y: 130, Radius: 90, Cycles: 36, Mean: 0.35, Amplitude: 0.3}}
	s.Gratings = []Grating{{Corners: [4][2]float64{{30, 290}, {330, 290}, {330, 380}, {30, 380}}, FreqCyPx: 0.12, DirectionDeg: 20, Mean: 0.35, Amplitude: 0.3}}
	s.Polygons = append(s.Polygons, Polygon{Pts: [][2]float64{{400, 260}, {580, 250}, {560, 380}, {480, 320}, {420, 390}}, Level: 0.9})
	return s
}

func lookLens() FieldLens {
	return FieldLens{CentreX: 300, CentreY: 200, PitchUM: 4, SigmaT: []float64{0.5, 0, 1.2}, SigmaS: []float64{0.5, 0.3}, TiltPerMM: 0.2}
}

// TestDeterministic renders the look scene on one and on several goroutines:
// the planes must be bit-identical (rows are computed independently). With
// SIMCAM_LOOK=1 it also writes /tmp/simcam-look.png for inspection.
func TestDeterministic(t *testing.T) {
	cam := Camera{W: 600, H: 400, Lens: lookLens()}
	if testing.Short() {
		cam.W, cam.H = 300, 200
	}
	prev := runtime.GOMAXPROCS(1)
	a := cam.RenderLinear(lookScene())
	runtime.GOMAXPROCS(max(prev, 3))
	b := cam.RenderLinear(lookScene())
	runtime.GOMAXPROCS(prev)
	for i := range a.Pix {
		if a.Pix[i] != b.Pix[i] {
			t.Fatalf("pixel %d differs: %v vs %v", i, a.Pix[i], b.Pix[i])
		}
	}
	dir, ok := look.Dir(t, "simcam")
	if !ok {
		return
	}
	cam = Camera{W: 600, H: 400, Lens: lookLens(), FullWellE: 20000, ReadNoiseE: 3, Seed: 7}
	buf, err := cam.Encode(lookScene())
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(dir, "look.png"), buf, 0o644); err != nil {
		t.Fatal(err)
	}
}
