package analyze

import (
	"context"
	"math"
	"runtime"
	"slices"
	"testing"

	"sagitta/core/note"
	"sagitta/core/sim/demo"
)

// nativeOnlyWhenShort skips a whole-photo colour test in the short run
// under WebAssembly (one thread: minutes); TestChromaSubsampledJPEG keeps
// the colour path covered there.
func nativeOnlyWhenShort(t *testing.T) {
	if testing.Short() && runtime.GOOS == "js" {
		t.Skip("whole-photo colour test: run natively, or without -short")
	}
}

// caPhoto renders the demo's sheet of radially turned squares on a
// reduced sensor through a camera whose red, green and blue magnifications
// differ by mag (simcam.Camera.ChannelMag), as a PNG (quality 0) or a JPEG,
// and analyses it.
func caPhoto(t *testing.T, reduce int, mag [3]float64, quality int, s Settings) (*Image, demo.Scenario) {
	t.Helper()
	sc := demo.PortraitSmall(reduce)
	cam := sc.Camera()
	cam.JPEGQuality = quality
	cam.ChannelMag = mag
	cam.Falloff = nil // lateral colour alone: the corners keep their light (and their noise)
	data, err := cam.Encode(sc.Sheet())
	if err != nil {
		t.Fatal(err)
	}
	s.PitchUM = sc.PitchUM
	img, err := Run(context.Background(), "ca", data, s, nil)
	if err != nil {
		t.Fatal(err)
	}
	if img.LateralCA == nil {
		t.Fatal("no lateral_ca for a colour photo")
	}
	return img, sc
}

// TestLateralCARecovered: a lens imaging red 0.08 % larger and blue
// 0.08 % smaller than green about the optical centre displaces an edge at
// r px from the centre by +0.0008 r px (red) and -0.0008 r px (blue) along
// the radius: the difference of the magnifications times the height, plain
// geometry (ISO 19084:2015 defines chromatic displacement so). The
// issue asks for 0.05 px at every height; README quotes the curves within
// 0.0032 px of it at every sampled height and the points (edges) within
// 0.006 px rms, and the limits are twice those.
func TestLateralCARecovered(t *testing.T) {
	nativeOnlyWhenShort(t)
	const m = 0.0008
	img, sc := caPhoto(t, 5, [3]float64{m, 0, -m}, 0, Settings{}) // 1200 x 800 px, 8-bit sRGB PNG, photon noise
	ca := img.LateralCA
	t.Logf("%s; %s", ca.Text, ca.Selection)
	if ca.Code == string(note.CAFewEdges) || len(ca.Curves) != 2 {
		t.Fatalf("no curves: %s", ca.Text)
	}
	for _, e := range caErrors(t, ca, m, sc.PitchUM) {
		if e.worst > 0.0064 || e.rms > 0.012 {
			t.Errorf("%s: curve off by %.4f px (want 0.0064), points rms %.4f px (want 0.012)", e.pair, e.worst, e.rms)
		}
	}
	if ca.Used < 20 {
		t.Errorf("only %d edges used", ca.Used)
	}
}

type caError struct {
	pair       string
	worst, rms float64
}

// caErrors compares each pair's curve (at every sampled height) and points
// with the displacement a magnification difference of m (red +m, blue -m)
// gives: m times the height in px.
func caErrors(t *testing.T, ca *LateralCA, m, pitchUM float64) []caError {
	t.Helper()
	pxPerMM := 1000 / pitchUM
	var out []caError
	for _, c := range ca.Curves {
		sign := 1.0
		if c.Pair == "B-G" {
			sign = -1
		}
		worst := 0.0
		for i, h := range c.HeightMM {
			worst = math.Max(worst, math.Abs(c.Px[i]-sign*m*h*pxPerMM))
		}
		var ss float64
		for _, p := range ca.Points {
			v := p.RMinusGPx
			if c.Pair == "B-G" {
				v = p.BMinusGPx
			}
			d := v - sign*m*p.HeightMM*pxPerMM
			ss += d * d
		}
		rms := math.Sqrt(ss / float64(len(ca.Points)))
		t.Logf("%s: %d edges, curve worst %.4f px, points rms %.4f px, max %.3f px at %.1f mm (truth %.3f)", c.Pair, c.Used, worst, rms, c.MaxPx, c.MaxAtMM, sign*m*c.MaxAtMM*pxPerMM)
		out = append(out, caError{c.Pair, worst, rms})
	}
	return out
}

// TestLateralCAZero: with the same magnification in every channel the
// displacement must vanish (the issue asks for |curve| < 0.02 px
// everywhere; README quotes 0.0008 px, the limit is twice that) and the verdict
// be "barely visible". Red's magnification differs by 1e-12 (0.0000006 px
// at the corner) only so that the camera renders each channel on its own,
// each with its own photon and read noise.
func TestLateralCAZero(t *testing.T) {
	nativeOnlyWhenShort(t)
	img, _ := caPhoto(t, 5, [3]float64{1e-12, 0, 0}, 0, Settings{})
	ca := img.LateralCA
	for _, c := range ca.Curves {
		t.Logf("%s: largest %.4f px at %.1f mm", c.Pair, c.MaxPx, c.MaxAtMM)
		for i, v := range c.Px {
			if math.Abs(v) > 0.0016 {
				t.Errorf("%s: %.4f px at %.1f mm, want under 0.0016", c.Pair, v, c.HeightMM[i])
				break
			}
		}
	}
	if ca.Code != string(note.CABarely) {
		t.Errorf("verdict %s (%s), want %s", ca.Code, ca.Text, note.CABarely)
	}
	if slices.Contains(img.WarningCodes, string(note.ChromaSubsampled)) {
		t.Error("a PNG carries the chroma warning")
	}
}

// TestChromaSubsampledJPEG: Go's JPEG encoder stores colour 4:2:0 (half
// the resolution both ways; image/jpeg, writer.go): the result says that
// colour fringes are measured less precisely.
func TestChromaSubsampledJPEG(t *testing.T) {
	const m = 0.0008
	img, sc := caPhoto(t, 6, [3]float64{m, 0, -m}, 90, Settings{})
	if !slices.Contains(img.WarningCodes, string(note.ChromaSubsampled)) {
		t.Errorf("warnings %q lack the chroma note", img.Warnings)
	}
	t.Logf("JPEG 4:2:0: %s", img.LateralCA.Text)
	// Even so the displacement is found: README quotes the curves within
	// 0.03 px and the points within 0.06 px rms.
	for _, e := range caErrors(t, img.LateralCA, m, sc.PitchUM) {
		if e.worst > 0.05 || e.rms > 0.1 {
			t.Errorf("%s: curve off by %.4f px (want 0.05), points rms %.4f px (want 0.1)", e.pair, e.worst, e.rms)
		}
	}
}

// TestLateralCAChartJPEG: the demo's chart (4:1 contrast) through the same
// magnifications as the demo lens (red +0.03 %, blue -0.04 %; truth: the
// difference times the height in px), 1500 x 1000 px, as JPEG files whose
// colour is stored 4:2:0: at quality 100 README quotes the curves within
// 0.014 px of the truth, at quality 92 (the demo's) within 0.12 px, the
// colour's quantisation moving the offsets; the limits are twice those.
func TestLateralCAChartJPEG(t *testing.T) {
	nativeOnlyWhenShort(t)
	qs := []struct {
		q     int
		limit float64
	}{{100, 0.028}, {92, 0.24}}
	if testing.Short() {
		qs = qs[:1]
	}
	for _, tc := range qs {
		sc := demo.PortraitSmall(4)
		cam := sc.Camera()
		cam.JPEGQuality = tc.q
		cam.ChannelMag = [3]float64{0.0003, 0, -0.0004}
		scene, err := sc.ChartScene()
		if err != nil {
			t.Fatal(err)
		}
		data, err := cam.Encode(scene)
		if err != nil {
			t.Fatal(err)
		}
		img, err := Run(context.Background(), "chart.jpg", data, Settings{PitchUM: sc.PitchUM}, nil)
		if err != nil {
			t.Fatal(err)
		}
		ca := img.LateralCA
		pxPerMM := 1000 / sc.PitchUM
		for _, c := range ca.Curves {
			m := cam.ChannelMag[0]
			if c.Pair == "B-G" {
				m = cam.ChannelMag[2]
			}
			worst := 0.0
			for i, h := range c.HeightMM {
				worst = math.Max(worst, math.Abs(c.Px[i]-m*h*pxPerMM))
			}
			t.Logf("quality %d, %s: %d edges, curve within %.4f px; largest %.3f px at %.1f mm (truth %.3f)", tc.q, c.Pair, c.Used, worst, c.MaxPx, c.MaxAtMM, m*c.MaxAtMM*pxPerMM)
			if worst > tc.limit {
				t.Errorf("quality %d, %s: curve off by %.4f px, want within %g", tc.q, c.Pair, worst, tc.limit)
			}
		}
	}
}

// TestLateralCARaw: the demo's raw DNG (RGGB mosaic, no demosaicking) of
// its chart through the demo lens (red +0.03 %, blue -0.04 %), 1500 x
// 1000 px: the red and blue sites' edges located against green's fit on
// the mosaic give the displacement (truth: the difference of the
// magnifications times the height in px). README quotes the curves within
// 0.0087 px; the limit is about twice that. The truth includes the demo
// lens's barrel distortion, applied after the colours' magnifications.
func TestLateralCARaw(t *testing.T) {
	nativeOnlyWhenShort(t)
	sc := demo.PortraitSmall(4)
	data, err := sc.RawPhoto()
	if err != nil {
		t.Fatal(err)
	}
	img, err := Run(context.Background(), "chart.dng", data, Settings{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	ca := img.LateralCA
	if ca == nil || len(ca.Curves) != 2 {
		t.Fatalf("no colour fringes from the mosaic: %+v", ca)
	}
	pxPerMM := 1000 / sc.PitchUM
	for _, c := range ca.Curves {
		m := sc.ChannelMag[0]
		if c.Pair == "B-G" {
			m = sc.ChannelMag[2]
		}
		worst := 0.0
		for i, h := range c.HeightMM {
			worst = math.Max(worst, math.Abs(c.Px[i]-distortedCA(sc, m, h*pxPerMM)))
		}
		t.Logf("raw %s: %d edges, curve within %.4f px; largest %.3f px at %.1f mm (truth %.3f)", c.Pair, c.Used, worst, c.MaxPx, c.MaxAtMM, distortedCA(sc, m, c.MaxAtMM*pxPerMM))
		if worst > 0.017 {
			t.Errorf("raw %s: curve off by %.4f px, want within 0.017", c.Pair, worst)
		}
	}
}

// distortedCA is the displacement along the radius, px, at hPx px from the
// frame's centre of a colour imaged with magnification 1+m before the
// scenario's radial distortion r(1 + k1 s^2 + k2 s^4) (s: r over the
// half-diagonal): plain geometry, D(D^-1(h)(1+m)) - h.
func distortedCA(sc demo.Scenario, m, hPx float64) float64 {
	hd2 := (float64(sc.W)*float64(sc.W) + float64(sc.H)*float64(sc.H)) / 4
	d := func(r float64) float64 {
		s2 := r * r / hd2
		return r * (1 + sc.Distortion.K1*s2 + sc.Distortion.K2*s2*s2)
	}
	if hPx == 0 {
		return 0
	}
	r := hPx
	for range 50 { // fixed point: r = h / (1 + k1 s^2 + k2 s^4), a contraction for mild distortion
		r = hPx * r / d(r)
	}
	return d(r*(1+m)) - hPx
}
