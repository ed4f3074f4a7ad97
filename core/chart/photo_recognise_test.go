package chart_test

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"sagitta/core/chart"
	"sagitta/core/note"
	"sagitta/core/plane"
	"sagitta/core/sim/chartsim"
	"sagitta/core/sim/simcam"
)

// photos caches rendered photos by design code, view and lens, so tests
// that need the same photo render it once.
var photos = map[string]*plane.Plane{}

// photo renders design d seen through view v with a Gaussian lens of sigma
// px, noise of a 20000-electron pixel (fixed seed), linear.
func photo(t testing.TB, d *chart.Design, v chartsim.View, sigma float64) *plane.Plane {
	t.Helper()
	key := fmt.Sprintf("%v %+v %g", d.Code, v, sigma)
	if p, ok := photos[key]; ok {
		return p
	}
	cam := simcam.Camera{W: v.W, H: v.H, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: sigma, Sigma2: sigma}},
		FullWellE: 20000, ReadNoiseE: 3, Seed: 11}
	p, err := cam.Render(chartsim.Scene(d, v.Homography(d), chartsim.Print{}))
	if err != nil {
		t.Fatal(err)
	}
	photos[key] = p
	return p
}

// straight is the view of a camera square to the chart, which fills the
// frame; several tests use it.
var straight = chartsim.View{W: 900, H: 600, Fill: 0.97, FocalPx: 1500}

// lensSigma is the Gaussian lens's width in the recognition tests, px.
const lensSigma = 0.7

// poseError returns the largest distance, px, between where the true view
// and the recognised pose put the squares' corners.
func poseError(d *chart.Design, h chart.Homography, pose *chart.Pose) float64 {
	var worst float64
	for _, q := range d.Squares {
		for _, c := range q.Corners() {
			x0, y0 := h.Apply(c[0], c[1])
			x1, y1 := pose.H.Apply(c[0], c[1])
			worst = math.Max(worst, math.Hypot(x1-x0, y1-y0))
		}
	}
	return worst
}

// TestRecognise photographs charts of every shape from several angles and
// checks that the chart is recognised with the right code and that the pose
// puts every square's corners within 0.5 px of where the view put them.
func TestRecognise(t *testing.T) {
	cases := []struct {
		name  string
		code  chart.Code
		view  chartsim.View
		short bool
	}{
		{"3:2 straight", chart.Code{Aspect: "3:2"}, straight, true},
		{"3:2 upside down, yawed", chart.Code{Aspect: "3:2"}, chartsim.View{W: 900, H: 600, Fill: 0.9, RollDeg: 180, YawDeg: 8, FocalPx: 1500}, false},
		{"3:2 turned 25 degrees, small in frame", chart.Code{Aspect: "3:2"}, chartsim.View{W: 1200, H: 800, Fill: 0.6, RollDeg: 25, ShiftX: 40}, false},
		{"3:2 pitched, perspective", chart.Code{Aspect: "3:2"}, chartsim.View{W: 1200, H: 800, Fill: 0.95, PitchDeg: -12, FocalPx: 2000}, false},
		{"2:3 portrait", chart.Code{Aspect: "3:2", Portrait: true}, chartsim.View{W: 600, H: 900, Fill: 0.95}, false},
		{"4:3", chart.Code{Aspect: "4:3"}, chartsim.View{W: 1200, H: 900, Fill: 0.95, RollDeg: -3}, false},
		{"16:9", chart.Code{Aspect: "16:9"}, chartsim.View{W: 1280, H: 720, Fill: 0.95, YawDeg: -10, FocalPx: 1800}, false},
		{"1:1 portrait", chart.Code{Aspect: "1:1", Portrait: true}, chartsim.View{W: 900, H: 900, Fill: 0.95}, false},
		// Moved right and down: only the top-left, top-middle and
		// left-middle marks are in the frame, so the pose is affine (exact
		// for this view without perspective).
		{"three marks", chart.Code{Aspect: "3:2"}, chartsim.View{W: 900, H: 600, ShiftX: 200, ShiftY: 150}, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if testing.Short() && !c.short {
				t.Skip("heavy case")
			}
			d, err := chart.NewDesign(c.code)
			if err != nil {
				t.Fatal(err)
			}
			p := photo(t, d, c.view, lensSigma)
			pose, note := chart.Recognise(p)
			if pose == nil {
				t.Fatalf("not recognised: %q", note.Text)
			}
			if pose.Code != c.code {
				t.Errorf("code %v, want %v", pose.Code, c.code)
			}
			e := poseError(d, c.view.Homography(d), pose)
			t.Logf("%d marks, residual %.3f px, squares' corners within %.3f px", len(pose.Marks), pose.ResidualPx, e)
			want := 8
			if c.name == "three marks" {
				want = 3
			}
			if len(pose.Marks) != want || pose.Affine != (want == 3) {
				t.Errorf("read %d marks (affine %v), want %d", len(pose.Marks), pose.Affine, want)
			}
			if e > 0.5 {
				t.Errorf("pose error %.3f px, want <= 0.5", e)
			}
		})
	}
}

// TestNotAChart: a photo of squares and plain discs (no marks) is not a
// chart, and says nothing; a chart cut down to two marks is reported as
// too few.
func TestNotAChart(t *testing.T) {
	s := simcam.Scene{Background: 0.8}
	for i := range 6 {
		s.Polygons = append(s.Polygons, simcam.Square(100+float64(i)*120, 200, 70, 5, 0.2))
		var disc [][2]float64
		for a := 0.0; a < 360; a += 10 {
			disc = append(disc, [2]float64{100 + float64(i)*120 + 25*math.Cos(a*math.Pi/180), 400 + 25*math.Sin(a*math.Pi/180)})
		}
		s.Polygons = append(s.Polygons, simcam.Polygon{Pts: disc, Level: 0.03})
	}
	cam := simcam.Camera{W: 800, H: 600, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.8, Sigma2: 0.8}}}
	p := cam.RenderLinear(s)
	if pose, note := chart.Recognise(p); pose != nil || note.Text != "" || note.Code != "" {
		t.Errorf("a photo without marks gave pose %v, note %q", pose, note)
	}
	// The chart moved right and down so that only two marks (top-left and
	// left-middle) stay in the frame.
	d, _ := chart.NewDesign(chart.Code{Aspect: "3:2"})
	if testing.Short() {
		return
	}
	q := photo(t, d, chartsim.View{W: 900, H: 600, ShiftX: 560, ShiftY: 150}, lensSigma)
	pose, note := chart.Recognise(q)
	// The code is the contract's (core/note); the words may change.
	if pose != nil || !strings.Contains(note.Text, "too few") || note.Code != "chart-few-marks" {
		t.Errorf("a chart cut to two marks gave pose %v, note %q", pose != nil, note.Text)
	}
}

// TestSetupChecks: a straight view gives no warnings; a turned chart warns
// of the rotation with its angle; a yawed camera warns of the keystone,
// whose size matches the pinhole model; a small chart warns that it does
// not fill the frame; an enlarged one that it is cut off.
//
// Keystone reference: a small patch of a plane at depth z images with area
// magnification f^2 D / z^3 (D the plane's distance from the camera centre:
// the patch subtends dA cos(theta) / r^2 of solid angle, cos(theta) = D / r,
// and the image plane receives f^2 / cos^3(alpha) per unit solid angle at
// cos(alpha) = z / r; Hartley and Zisserman, 2nd ed., section 6.1 for the
// camera). The linear scale goes as z^(-3/2), so a yaw of phi, which puts
// the chart's left and right sides at depths Z -+ (W/2) sin(phi), gives
// a left/right ratio ((Z + (W/2) sin phi) / (Z - (W/2) sin phi))^(3/2).
//
// The checks run on the pose recognised in a photo of each view; under
// -short, on the view's true pose.
func TestSetupChecks(t *testing.T) {
	d, _ := chart.NewDesign(chart.Code{Aspect: "3:2"})
	type want struct {
		words []string // each must appear in some warning
		none  bool     // no warnings at all
	}
	const f = 1500.0 // the focal length of the straight view
	cases := []struct {
		name string
		view chartsim.View
		want want
	}{
		{"straight", straight, want{none: true}},
		{"turned 4 degrees", chartsim.View{W: 900, H: 600, Fill: 0.9, RollDeg: 4}, want{words: []string{"turned 4.0 degrees clockwise"}}},
		{"turned -3 degrees", chartsim.View{W: 900, H: 600, Fill: 0.9, RollDeg: -3}, want{words: []string{"turned 3.0 degrees anticlockwise"}}},
		{"yawed 3 degrees", chartsim.View{W: 900, H: 600, Fill: 0.95, YawDeg: 3, FocalPx: f}, want{words: []string{"left side appears", "not square"}}},
		{"pitched -3 degrees", chartsim.View{W: 900, H: 600, Fill: 0.95, PitchDeg: -3, FocalPx: f}, want{words: []string{"bottom appears", "tilted"}}},
		{"small", chartsim.View{W: 900, H: 600, Fill: 0.7}, want{words: []string{"fills only"}}},
		{"cut off", chartsim.View{W: 900, H: 600, Fill: 1.1}, want{words: []string{"outside the frame"}}},
		{"off centre", chartsim.View{W: 900, H: 600, Fill: 0.8, ShiftX: 60}, want{words: []string{"away from the frame's centre"}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var pose *chart.Pose
			if testing.Short() {
				// The checks alone, on the true pose: no photo.
				h := c.view.Homography(d)
				inv, _ := h.Inverse()
				pose = &chart.Pose{Code: d.Code, Design: d, H: h, Inv: inv, W: c.view.W, Hpx: c.view.H}
			} else {
				var why note.Note
				if pose, why = chart.Recognise(photo(t, d, c.view, lensSigma)); pose == nil {
					t.Fatalf("not recognised: %s", why.Text)
				}
			}
			s := pose.Check(c.view.FocalPx)
			t.Logf("cover %.1f %%, visible %.1f %%, rotation %.3f deg, keystone LR %.3f %% TB %.3f %%, off centre %.2f %%, tilt %.2f deg",
				s.CoverPct, s.VisiblePct, s.RotationDeg, s.KeystoneLRPct, s.KeystoneTBPct, s.OffCentrePct, s.TiltDeg)
			if c.want.none && len(s.Warnings) > 0 {
				t.Errorf("warnings for a straight view: %q", s.Warnings)
			}
			for _, w := range c.want.words {
				found := false
				for _, m := range s.Warnings {
					found = found || strings.Contains(m, w)
				}
				if !found {
					t.Errorf("no warning with %q in %q", w, s.Warnings)
				}
			}
			if math.Abs(s.RotationDeg-c.view.RollDeg) > 0.05 {
				t.Errorf("rotation %.3f degrees, want %.1f", s.RotationDeg, c.view.RollDeg)
			}
			if c.view.YawDeg != 0 || c.view.PitchDeg != 0 {
				scale := c.view.Fill * math.Min(float64(c.view.W)/d.W, float64(c.view.H)/d.H)
				z := c.view.FocalPx / scale
				lr := 100 * (math.Pow((z+d.W/2*math.Sin(c.view.YawDeg*math.Pi/180))/(z-d.W/2*math.Sin(c.view.YawDeg*math.Pi/180)), 1.5) - 1)
				tb := 100 * (math.Pow((z+d.H/2*math.Sin(c.view.PitchDeg*math.Pi/180))/(z-d.H/2*math.Sin(c.view.PitchDeg*math.Pi/180)), 1.5) - 1)
				if math.Abs(s.KeystoneLRPct-lr) > 0.1 || math.Abs(s.KeystoneTBPct-tb) > 0.1 {
					t.Errorf("keystone %.3f / %.3f %%, pinhole model %.3f / %.3f %%", s.KeystoneLRPct, s.KeystoneTBPct, lr, tb)
				}
				tilt := math.Hypot(c.view.YawDeg, c.view.PitchDeg)
				if math.Abs(s.TiltDeg-tilt) > 0.2 {
					t.Errorf("tilt %.2f degrees, want %.1f", s.TiltDeg, tilt)
				}
			}
		})
	}
}
