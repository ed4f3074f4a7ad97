package field

import (
	"math"
	"testing"
)

func TestCornerFullFrame(t *testing.T) {
	// 36 x 24 mm sensor, centred axis: half-diagonal sqrt(18^2 + 12^2) =
	// 21.63 mm (common practice).
	g := NewGeometry(6000, 4000, 6)
	if got := g.CornerMM(); math.Abs(got-math.Hypot(18, 12)) > 1e-9 || math.Abs(got-21.633) > 5e-4 {
		t.Errorf("corner %.4f mm", got)
	}
	if h := g.HeightMM(6000, 2000); math.Abs(h-18) > 1e-9 {
		t.Errorf("height at the right edge %.4f mm, want 18", h)
	}
}

func TestClassify(t *testing.T) {
	// Optics convention (W. J. Smith, Modern Optical Engineering, 4th ed.,
	// ch. 3, meridional and sagittal planes; chapter from memory): a tangential measurement
	// varies along the radius (edge normal radial), a sagittal one across it.
	g := NewGeometry(1000, 1000, 5)
	cases := []struct {
		name      string
		x, y, dir float64
		want      Orientation
	}{
		{"right of centre, normal along x", 900, 500, 0, Tangential},
		{"right of centre, normal along y", 900, 500, 90, Sagittal},
		{"below centre, normal along y", 500, 900, 270, Tangential},
		{"diagonal, normal radial", 800, 800, 45, Tangential},
		{"diagonal, normal across", 800, 800, 135, Sagittal},
		{"within tolerance", 900, 500, 19, Tangential},
		{"beyond tolerance", 900, 500, 21, Mixed},
		{"sagittal within tolerance", 900, 500, 71, Sagittal},
		{"at the centre", 500, 500, 0, Mixed},
	}
	for _, c := range cases {
		if got, _ := g.Classify(c.x, c.y, c.dir); got != c.want {
			t.Errorf("%s: %s, want %s", c.name, got, c.want)
		}
	}
}

func TestValidate(t *testing.T) {
	if err := NewGeometry(10, 10, 0).Validate(); err == nil {
		t.Error("zero pitch accepted")
	}
	if err := NewGeometry(10, 10, 4).Validate(); err != nil {
		t.Error(err)
	}
}
