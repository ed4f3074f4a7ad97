package simcam

import (
	"math"
	"testing"
)

// TestFalloffRender: a uniform scene through a camera with the
// cosine-fourth fall-off renders, at every pixel centre, the background
// times cos^4 of the field angle, theta = atan(r / f) (W. J. Smith, Modern
// Optical Engineering, 4th ed., section 10.9, chapter from memory), times
// 2^(-CornerEV s^4) for the extra term.
func TestFalloffRender(t *testing.T) {
	const w, h = 64, 48
	f := 40.0
	cam := Camera{W: w, H: h, Falloff: &Falloff{Cos4FocalPx: f, CornerEV: 0.5}}
	p, err := cam.Render(Scene{Background: 0.7})
	if err != nil {
		t.Fatal(err)
	}
	R := math.Hypot(w, h) / 2
	worst := 0.0
	for j := range h {
		for i := range w {
			r := math.Hypot(float64(i)+0.5-w/2, float64(j)+0.5-h/2)
			c := math.Cos(math.Atan(r / f))
			want := 0.7 * c * c * c * c * math.Pow(2, -0.5*math.Pow(r/R, 4))
			worst = math.Max(worst, math.Abs(float64(p.At(i, j))-want))
		}
	}
	if worst > 1e-6 {
		t.Errorf("rendered fall-off off the law by %g", worst)
	}
}

// TestDistortionMap: the mapping follows r_d = r_u (1 + K1 s^2 + K2 s^4)
// about the frame's centre, moves a square's corners there (and keeps it a
// polygon with its sides cut into pieces of at most 64 px), and a folding
// distortion is refused.
func TestDistortionMap(t *testing.T) {
	const w, h = 300, 200
	d := Distortion{K1: -0.02, K2: 0.01}
	R := math.Hypot(w, h) / 2
	x, y := d.Map(250, 180, w, h)
	s := math.Hypot(100, 80) / R
	want := 1 + d.DisplacementPct(s)/100
	if got := math.Hypot(x-150, y-100) / math.Hypot(100, 80); math.Abs(got-want) > 1e-12 {
		t.Errorf("radial ratio %g, want %g", got, want)
	}
	if math.Abs(math.Atan2(y-100, x-150)-math.Atan2(80, 100)) > 1e-12 {
		t.Error("the point left its radius")
	}
	sc := d.distort(Scene{Polygons: []Polygon{Square(150, 100, 150, 0, 0.2)}}, w, h)
	if n := len(sc.Polygons[0].Pts); n != 12 {
		t.Errorf("%d vertices, want 12 (each 150 px side in 3 pieces)", n)
	}
	cx, cy := d.Map(75, 25, w, h)
	if p := sc.Polygons[0].Pts[0]; math.Hypot(p[0]-cx, p[1]-cy) > 1e-12 {
		t.Errorf("first corner at %v, want (%g, %g)", p, cx, cy)
	}
	cam := Camera{W: w, H: h, Distortion: &Distortion{K1: -0.3}}
	if err := cam.Validate(); err == nil {
		t.Error("a folding distortion was accepted")
	}
}
