package analyze_test

import (
	"context"
	"math"
	"testing"

	"sagitta/core/analyze"
	"sagitta/core/chart"
	"sagitta/core/sim/chartsim"
	"sagitta/core/sim/demo"
	"sagitta/core/sim/simcam"
)

// shootChart photographs the 3:2 chart filling 97 % of a w x h frame with
// the simulated camera cam (its size set here), 16-bit linear, and
// analyses it.
func shootChart(t *testing.T, cam simcam.Camera, w, h int, v chartsim.View) *analyze.Image {
	t.Helper()
	d, err := chart.NewDesign(chart.Code{Aspect: "3:2"})
	if err != nil {
		t.Fatal(err)
	}
	v.W, v.H = w, h
	if v.Fill == 0 {
		v.Fill = 0.97
	}
	cam.W, cam.H = w, h
	cam.Lens = simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.8, Sigma2: 0.8}}
	cam.Encoding, cam.FullWellE, cam.Seed = simcam.Linear16, 40000, 7
	photo, err := cam.Encode(chartsim.Scene(d, v.Homography(d), chartsim.Print{}))
	if err != nil {
		t.Fatal(err)
	}
	img, err := analyze.Run(context.Background(), "chart.png", photo, analyze.Settings{PitchUM: 24, Tone: "linear"}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if img.Chart == nil {
		t.Fatal("the chart was not recognised")
	}
	return img
}

// geometrySize is the frame of the geometry tests: 1500 x 1000 px (the
// same field of view as a 24 MP full-frame photo at 24 um).
const geometryW, geometryH = 1500, 1000

// TestDistortionSimulated applies a known radial distortion with the
// simulated camera (simcam.Distortion: the radial terms of Brown's model,
// D. C. Brown, Photogrammetric Engineering 32 (1966), normalised to the
// half-diagonal) and checks the fitted displacement curve against the
// applied one, 100 (K1 s^2 + K2 s^4) %, at every height from the centre to
// the corner. Barrel (K1 = -0.02): measured 0.0013 %, README quotes
// 0.002 %, asserted at 0.004 %; moustache (K1 = +0.02, K2 = -0.03):
// measured 0.024 %, README quotes 0.025 %, asserted at 0.05 % (the
// issue's figure).
func TestDistortionSimulated(t *testing.T) {
	for _, tc := range []struct {
		name   string
		k1, k2 float64
		kind   string
		limit  float64 // %
	}{
		{"barrel", -0.02, 0, "barrel", 0.004},
		{"moustache", 0.02, -0.03, "moustache", 0.05},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if testing.Short() && tc.name != "barrel" {
				t.Skip("one case under -short")
			}
			dist := &simcam.Distortion{K1: tc.k1, K2: tc.k2}
			img := shootChart(t, simcam.Camera{Distortion: dist}, geometryW, geometryH, chartsim.View{})
			ds := img.Distortion
			if ds == nil || !ds.Measured {
				t.Fatalf("distortion not measured: %+v", ds)
			}
			worst := 0.0
			for i, s := range ds.HeightFrac {
				worst = math.Max(worst, math.Abs(ds.DisplacementPct[i]-dist.DisplacementPct(s)))
			}
			t.Logf("%s: k1 %.5f k2 %.5f (applied %g, %g); corner %+.3f %% (applied %+.3f); worst error %.4f %%; rms %.3f px over %d points; %s",
				tc.name, ds.K1, ds.K2, tc.k1, tc.k2, ds.CornerPct, dist.DisplacementPct(1), worst, ds.ResidualPx, ds.Points, ds.Text)
			if worst > tc.limit {
				t.Errorf("fitted curve off the applied one by %.4f %%, want <= %g %%", worst, tc.limit)
			}
			if ds.Kind != tc.kind {
				t.Errorf("kind %q, want %q", ds.Kind, tc.kind)
			}
		})
	}
}

// TestFalloffCos4 applies the cosine-fourth law of natural vignetting,
// E(theta) = E0 cos^4(theta) (W. J. Smith, Modern Optical Engineering, 4th
// ed. (2008), section 10.9, chapter from memory), with the exit pupil one
// half-diagonal from the sensor (45 degrees at the corner, -2 EV there),
// and checks the measured curve against 4 log2(cos(atan(s R / f))) at
// every height: measured 0.0063 EV, README quotes 0.007 EV, asserted at
// 0.014 EV (the issue asks for 0.05). A frame without fall-off reads
// within 0.001 EV of 0 everywhere (measured 0.0002), asserted at 0.002.
func TestFalloffCos4(t *testing.T) {
	R := math.Hypot(geometryW, geometryH) / 2
	for _, tc := range []struct {
		name  string
		f     float64 // Cos4FocalPx; 0: none
		limit float64 // EV
	}{{"cos4", R, 0.014}, {"flat", 0, 0.002}} {
		t.Run(tc.name, func(t *testing.T) {
			if testing.Short() && tc.name != "cos4" {
				t.Skip("one case under -short")
			}
			cam := simcam.Camera{}
			if tc.f > 0 {
				cam.Falloff = &simcam.Falloff{Cos4FocalPx: tc.f}
			}
			img := shootChart(t, cam, geometryW, geometryH, chartsim.View{})
			fo := img.Falloff
			if fo == nil || !fo.Measured {
				t.Fatalf("fall-off not measured: %+v", fo)
			}
			want := func(s float64) float64 {
				if tc.f == 0 {
					return 0
				}
				return 4 * math.Log2(math.Cos(math.Atan(s*R/tc.f)))
			}
			worst := 0.0
			for i, s := range fo.HeightFrac {
				worst = math.Max(worst, math.Abs(fo.EV[i]-want(s)))
			}
			t.Logf("%s: corner %+.3f EV (law %+.3f); worst error %.4f EV; %d patches, rms %.4f EV; uneven %.3f EV; cautions %q",
				tc.name, fo.CornerEV, want(1), worst, fo.Points, fo.ResidualEV, fo.UnevenEV, fo.CautionCodes)
			if worst > tc.limit {
				t.Errorf("measured fall-off off the law by %.4f EV, want <= %g", worst, tc.limit)
			}
		})
	}
}

// TestDistortionFromEdges: without the chart, long straight bars (a scene
// straight in the world) bent by the simulated camera's barrel distortion
// (K1 = -0.02) give K1 by the plumb-line method (Brown 1971; core/distortion,
// lines.go): the curve within 0.0012 % of the applied one from the centre
// to the corner (README quotes 0.002 %), asserted at 0.004 %, with the
// caution that it comes from edges first.
func TestDistortionFromEdges(t *testing.T) {
	const w, h = geometryW, geometryH
	bar := func(cx, cy, length, thick, rotDeg float64) simcam.Polygon {
		s, c := math.Sincos(rotDeg * math.Pi / 180)
		var pts [][2]float64
		for _, q := range [4][2]float64{{-length / 2, -thick / 2}, {length / 2, -thick / 2}, {length / 2, thick / 2}, {-length / 2, thick / 2}} {
			pts = append(pts, [2]float64{cx + q[0]*c - q[1]*s, cy + q[0]*s + q[1]*c})
		}
		return simcam.Polygon{Pts: pts, Level: 0.2}
	}
	sc := simcam.Scene{Background: 0.8, Polygons: []simcam.Polygon{
		bar(750, 140, 950, 70, 4), bar(750, 860, 950, 70, -4),
		bar(130, 500, 700, 70, 94), bar(1370, 500, 700, 70, 86),
	}}
	dist := &simcam.Distortion{K1: -0.02}
	cam := simcam.Camera{W: w, H: h, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.8, Sigma2: 0.8}},
		Encoding: simcam.Linear16, FullWellE: 40000, Seed: 3, Distortion: dist}
	photo, err := cam.Encode(sc)
	if err != nil {
		t.Fatal(err)
	}
	img, err := analyze.Run(context.Background(), "bars.png", photo, analyze.Settings{PitchUM: 24, Tone: "linear"}, nil)
	if err != nil {
		t.Fatal(err)
	}
	ds := img.Distortion
	if ds == nil || !ds.Measured || ds.Source != "edges" {
		t.Fatalf("distortion %+v, want measured from edges", ds)
	}
	worst := 0.0
	for i, s := range ds.HeightFrac {
		worst = math.Max(worst, math.Abs(ds.DisplacementPct[i]-dist.DisplacementPct(s)))
	}
	t.Logf("edges: k1 %.5f (applied -0.02), corner %+.3f %%, worst error %.4f %%, %d lines, %d pieces, rms %.3f px; %q",
		ds.K1, ds.CornerPct, worst, ds.Lines, ds.Points, ds.ResidualPx, ds.CautionCodes)
	if worst > 0.004 {
		t.Errorf("curve off the applied one by %.4f %%, want <= 0.004 %%", worst)
	}
	if len(ds.CautionCodes) == 0 || ds.CautionCodes[0] != "distortion-from-edges" {
		t.Errorf("cautions %q, want distortion-from-edges first", ds.CautionCodes)
	}
}

// TestDemoGeometry: the demo photo (an sRGB JPEG of the chart at a quarter
// of the 24 MP size; invented lens in core/sim/demo) reads the distortion
// and fall-off its simulated lens applies at the frame's corner: measured
// 0.011 % and 0.006 EV off, README quotes 0.011 % and 0.006 EV, asserted
// at 0.02 % and 0.012 EV.
func TestDemoGeometry(t *testing.T) {
	sc := demo.PortraitSmall(4)
	data, err := sc.Photo()
	if err != nil {
		t.Fatal(err)
	}
	img, err := analyze.Run(context.Background(), "demo.jpg", data, analyze.Settings{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	ds, fo := img.Distortion, img.Falloff
	if ds == nil || !ds.Measured || fo == nil || !fo.Measured {
		t.Fatalf("distortion %+v, fall-off %+v: want both measured", ds, fo)
	}
	wantPct := sc.Distortion.DisplacementPct(1)
	wantEV := math.Log2(sc.Falloff.Gain(0, 0, sc.W, sc.H))
	t.Logf("demo: corner %+.3f %% (lens %+.3f), %+.3f EV (lens %+.3f)", ds.CornerPct, wantPct, fo.CornerEV, wantEV)
	if e := math.Abs(ds.CornerPct - wantPct); e > 0.02 {
		t.Errorf("distortion at the corner off by %.3f %%", e)
	}
	if e := math.Abs(fo.CornerEV - wantEV); e > 0.012 {
		t.Errorf("fall-off at the corner off by %.3f EV", e)
	}
}
