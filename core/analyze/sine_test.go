package analyze

import (
	"context"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"sagitta/core/curve"
	"sagitta/core/decode"
	"sagitta/core/edgefind"
	"sagitta/core/sim/simcam"
)

// photo encodes scene s with camera c (16-bit sRGB PNG unless c says
// otherwise) and analyses it with a 5 um pitch.
func photo(t testing.TB, c simcam.Camera, s simcam.Scene) (*Image, []byte) {
	t.Helper()
	data, err := c.Encode(s)
	if err != nil {
		t.Fatal(err)
	}
	img, err := Run(context.Background(), "sim.png", data, Settings{PitchUM: 5}, nil)
	if err != nil {
		t.Fatal(err)
	}
	return img, data
}

// TestStarOnlyPhoto: a photo holding only a sinusoidal star gives no edge
// measurement and two star records, sagittal and tangential, in the
// contract's shape. The star has wide spokes (28 cycles, radius 300 px),
// which the edge finder alone traces as straight runs and offers as edges.
func TestStarOnlyPhoto(t *testing.T) {
	st := simcam.Star{X: 400.3, Y: 350.6, Radius: 300, Cycles: 28, Mean: 0.4, Amplitude: 0.3}
	cam := simcam.Camera{W: 800, H: 700, Lens: simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.8, Sigma2: 0.8}}, Encoding: simcam.SRGB16}
	sc := simcam.Scene{Background: 0.7, Stars: []simcam.Star{st}}
	img, data := photo(t, cam, sc)

	// Without the exclusion the edge finder would report spokes.
	dec, err := decode.Decode(data, decode.Options{})
	if err != nil {
		t.Fatal(err)
	}
	raw, _ := edgefind.Edges(dec.Lum, edgefind.Options{})
	if len(raw) == 0 {
		t.Fatal("the edge finder offers no spoke here: the test would prove nothing")
	}
	t.Logf("edge candidates on the spokes before excluding the star: %d", len(raw))

	kinds := map[string]int{}
	for _, m := range img.Measurements {
		kinds[m.Kind]++
	}
	if kinds["edge"] != 0 || kinds["star"] != 2 || len(img.Stars) != 1 {
		t.Fatalf("records by kind %v, %d stars; want 0 edges, 2 star records, 1 star", kinds, len(img.Stars))
	}
	for _, r := range img.Rejected {
		if math.Hypot((r.X0+r.X1)/2-st.X, (r.Y0+r.Y1)/2-st.Y) < st.Radius+10 {
			t.Errorf("rejected run %+v lies on the star", r)
		}
	}
	s := img.Stars[0]
	if math.Hypot(s.XPx-st.X, s.YPx-st.Y) > 0.1 || s.Cycles != st.Cycles || len(s.Segments) != 8 {
		t.Errorf("star at (%.2f, %.2f), %d cycles, %d segments", s.XPx, s.YPx, s.Cycles, len(s.Segments))
	}
	orient := map[string]bool{}
	for _, m := range img.Measurements {
		orient[string(m.Orientation)] = true
		if m.Freq[0] != 0 || m.MTF[0] != 1 || m.MeasuredCyPx == nil || m.PatternID != s.ID {
			t.Errorf("record %d: starts at (%v, %v), measured %v, pattern %d", m.ID, m.Freq[0], m.MTF[0], m.MeasuredCyPx, m.PatternID)
		}
		for i := 1; i < len(m.Freq); i++ {
			if !(m.Freq[i] > m.Freq[i-1]) {
				t.Fatalf("record %d: frequencies not ascending at %d", m.ID, i)
			}
		}
		// 28 cycles reach Nyquist at r = 28/pi = 8.9 px, inside the
		// smallest ring with 8 px per segment (64 / (2 pi) = 10.2 px): the
		// record must stop at 28 / (2 pi 10.2) = 0.4375 cy/px and say so.
		last := m.Freq[len(m.Freq)-1]
		if last != m.MeasuredCyPx[1] || last >= curve.Nyquist || !contains(m.Flags, "short-range") {
			t.Errorf("record %d ends at %v, measured to %v, flags %v", m.ID, last, m.MeasuredCyPx[1], m.Flags)
		}
	}
	if !orient["sagittal"] || !orient["tangential"] {
		t.Errorf("orientations %v, want sagittal and tangential", orient)
	}
	b, err := json.Marshal(img)
	if err != nil {
		t.Fatal(err)
	}
	for _, key := range []string{`"kind":"star"`, `"stars":[{`, `"segments":[{`, `"measured_cy_px":[`, `"agreement":null`} {
		if !strings.Contains(string(b), key) {
			t.Errorf("JSON lacks %s", key)
		}
	}
}

// lensScene is a simulated lens (field-dependent Gaussian, more blur along
// the radius than across it) and a scene of one star at 350 px from the
// optical centre with four slanted squares at the same image height, their
// sides along and across the radius, so that sagittal and tangential edges
// sit beside the star.
func lensScene() (simcam.FieldLens, simcam.Scene) {
	const w, h = 1600, 1200
	lens := simcam.FieldLens{CentreX: w / 2, CentreY: h / 2, PitchUM: 5, SigmaT: []float64{0.7, 0.08}, SigmaS: []float64{0.7, 0.02}}
	sc := simcam.Scene{Background: 0.75,
		Stars: []simcam.Star{{X: w/2 + 350, Y: h / 2, Radius: 160, Cycles: 48, Mean: 0.42, Amplitude: 0.32}}}
	for _, a := range []float64{-50, 50, 130, 230} {
		x := w/2 + 350*math.Cos(a*math.Pi/180)
		y := h/2 + 350*math.Sin(a*math.Pi/180)
		sc.Polygons = append(sc.Polygons, simcam.Square(x, y, 120, a+5, 0.12))
	}
	return lens, sc
}

// TestStarsAgreeWithEdges: on one simulated lens the star's sagittal and
// tangential MTF lie within 0.032 of the analytic MTF (simcam.TrueMTF:
// Goodman ch. 6, Boreman ch. 2) and within 0.04 of each edge of the same
// orientation within 0.5 mm of its image height, from 0.05 to 0.35 cy/px,
// rms 0.006 (twice README's 0.016, 0.02 and 0.003).
func TestStarsAgreeWithEdges(t *testing.T) {
	if testing.Short() {
		t.Skip("heavy")
	}
	lens, sc := lensScene()
	img, _ := photo(t, simcam.Camera{W: 1600, H: 1200, Lens: lens, Encoding: simcam.SRGB16}, sc)
	if img.Agreement == nil || img.Agreement.Records != 2 {
		t.Fatalf("agreement %+v, want two star records compared", img.Agreement)
	}
	t.Logf("agreement: rms %.4f, mean %.4f", img.Agreement.RMSDiff, img.Agreement.MeanDiff)
	if img.Agreement.RMSDiff > 2*0.003 { // README: rms 0.003
		t.Errorf("stars and edges differ by %.3f rms", img.Agreement.RMSDiff)
	}
	for _, w := range img.Warnings {
		if strings.Contains(w, "disagree") {
			t.Errorf("warning %q", w)
		}
	}
	for _, st := range img.Measurements {
		if st.Kind != "star" {
			continue
		}
		sc := curve.Curve{Freq: st.Freq, Value: st.MTF}
		worst := 0.0
		for f := 0.05; f <= 0.35+1e-9; f += 0.01 {
			worst = math.Max(worst, math.Abs(sc.At(f)-simcam.TrueMTF(lens, st.XPx, st.YPx, st.NormalDeg, f)))
		}
		t.Logf("star %s: max |star - true| %.4f", st.Orientation, worst)
		if worst > 2*0.016 { // README: anisotropic Gaussians within 0.016
			t.Errorf("star %s: %.4f from the analytic MTF", st.Orientation, worst)
		}
		for _, e := range img.Measurements {
			if e.Kind != "edge" || e.Orientation != st.Orientation || math.Abs(e.HeightMM-st.HeightMM) > 0.5 {
				continue
			}
			ec := curve.Curve{Freq: e.Freq, Value: e.MTF}
			d := 0.0
			for f := 0.05; f <= 0.35+1e-9; f += 0.01 {
				d = math.Max(d, math.Abs(sc.At(f)-ec.At(f)))
			}
			t.Logf("star %s, edge %d at %.2f mm: max difference %.4f", st.Orientation, e.ID, e.HeightMM, d)
			if d > 2*0.02 { // README: within 0.02 (measured 0.020, tangential at 1.45 mm)
				t.Errorf("star %s and edge %d differ by %.4f", st.Orientation, e.ID, d)
			}
		}
	}
}

// TestSharpenedDisagreement: in-camera sharpening (an unsharp mask on the
// encoded values, simcam.Camera.Sharpen) lifts the edges' MTF above the
// star's, and the analysis says so. Two effects part them: the star's
// modulation rises with frequency at its largest ring, so it is normalised
// there (flag "sharpened") and reads low by that ring's own gain, while an
// edge is normalised at zero frequency; and the mask works on gamma-encoded
// values, which treats a large step differently from a sine pattern.
func TestSharpenedDisagreement(t *testing.T) {
	if testing.Short() {
		t.Skip("heavy")
	}
	lens, sc := lensScene()
	cam := simcam.Camera{W: 1600, H: 1200, Lens: lens, Encoding: simcam.SRGB8, Sharpen: &simcam.UnsharpMask{Amount: 1.5, RadiusPx: 2}}
	img, _ := photo(t, cam, sc)
	if img.Agreement == nil {
		t.Fatal("no agreement figure")
	}
	t.Logf("agreement: rms %.4f, mean %.4f; warnings %q", img.Agreement.RMSDiff, img.Agreement.MeanDiff, img.Warnings)
	// README: the edges read 0.18 higher; asserted between half and twice that.
	if img.Agreement.MeanDiff < 0.09 || img.Agreement.MeanDiff > 0.36 {
		t.Errorf("edges exceed the star by %.3f on average, README says 0.18", img.Agreement.MeanDiff)
	}
	if img.Agreement.MeanDiff <= DisagreeRMS || img.Agreement.RMSDiff <= DisagreeRMS {
		t.Errorf("edges exceed the star by %.3f on average (rms %.3f), want more than %.2f", img.Agreement.MeanDiff, img.Agreement.RMSDiff, DisagreeRMS)
	}
	warned := false
	for i, w := range img.Warnings {
		warned = warned || strings.Contains(w, "disagree") && strings.Contains(w, "edges read higher") && img.WarningCodes[i] == "stars-edges-disagree"
	}
	if !warned {
		t.Errorf("no disagreement warning in %q", img.Warnings)
	}
	for _, m := range img.Measurements {
		if m.Kind == "star" && (!contains(m.Flags, "disagrees-with-edges") || !contains(m.Flags, "sharpened")) {
			t.Errorf("star record %s lacks the disagreement or sharpening flag: %v", m.Orientation, m.Flags)
		}
	}
}

func contains(list []string, s string) bool {
	for _, v := range list {
		if v == s {
			return true
		}
	}
	return false
}

// TestGratingRecords: a reference grating of 0.02 cy/px and a set of three
// gratings on the same sheet, side by side along the field radius (so all
// tangential), give one grating record whose values, the
// modulation ratios against the reference, lie within 0.028 of the analytic
// MTF (simcam.TrueMTF; Goodman ch. 6, Boreman ch. 2).
func TestGratingRecords(t *testing.T) {
	if testing.Short() {
		t.Skip("heavy")
	}
	const w, h = 1300, 700
	lens := simcam.FieldLens{CentreX: w / 2, CentreY: h / 2, PitchUM: 5, SigmaT: []float64{0.9}, SigmaS: []float64{0.7}}
	rect := func(cx, cy, gw, gh float64) [4][2]float64 {
		return [4][2]float64{{cx - gw/2, cy - gh/2}, {cx + gw/2, cy - gh/2}, {cx + gw/2, cy + gh/2}, {cx - gw/2, cy + gh/2}}
	}
	sc := simcam.Scene{Background: 0.72, Gratings: []simcam.Grating{
		{Corners: rect(300, 150, 260, 110), FreqCyPx: 0.02, Mean: 0.42, Amplitude: 0.3},
		{Corners: rect(780, 350, 180, 100), FreqCyPx: 0.1, Mean: 0.42, Amplitude: 0.3},
		{Corners: rect(990, 350, 180, 100), FreqCyPx: 0.2, Mean: 0.42, Amplitude: 0.3},
		{Corners: rect(1200, 350, 180, 100), FreqCyPx: 0.3, Mean: 0.42, Amplitude: 0.3},
	}}
	img, _ := photo(t, simcam.Camera{W: w, H: h, Lens: lens, Encoding: simcam.SRGB16}, sc)
	if len(img.Gratings) != 4 {
		t.Fatalf("%d gratings, want 4: %+v", len(img.Gratings), img.Gratings)
	}
	var recs []Measurement
	for _, m := range img.Measurements {
		if m.Kind == "grating" {
			recs = append(recs, m)
		}
		if m.Kind == "edge" {
			t.Errorf("edge record at (%.0f, %.0f) on a sheet of gratings", m.XPx, m.YPx)
		}
	}
	if len(recs) != 1 || len(recs[0].Freq) != 4 {
		t.Fatalf("grating records %+v, want one with three gratings", recs)
	}
	r := recs[0]
	for i, f := range r.Freq[1:] {
		g := sc.Gratings[i+1]
		if math.Abs(f-g.FreqCyPx) > 2e-3 {
			t.Errorf("point %d at %.4f cy/px, want %.2f", i, f, g.FreqCyPx)
		}
		cx, cy := (g.Corners[0][0]+g.Corners[2][0])/2, (g.Corners[0][1]+g.Corners[2][1])/2
		want := simcam.TrueMTF(lens, cx, cy, 0, g.FreqCyPx)
		t.Logf("%.2f cy/px: %.4f, true %.4f", f, r.MTF[i+1], want)
		if math.Abs(r.MTF[i+1]-want) > 2*0.014 { // README: 0.014 against the reference grating
			t.Errorf("%.2f cy/px: MTF %.4f, true %.4f", f, r.MTF[i+1], want)
		}
	}
}
