package chartsim_test

import (
	"context"
	"fmt"
	"math"
	"testing"

	"sagitta/core/analyze"
	"sagitta/core/chart"
	"sagitta/core/sim/chartsim"
	"sagitta/core/sim/simcam"
)

// realisticShot photographs the chart printed on the default sheet (A4,
// 600 dpi) as a camera JPEG would show it: a slight roll, yaw and pitch
// through a perspective camera, a lens softer with image height plus a
// demosaic-like blur, photon and read noise, sRGB and JPEG. variant changes
// the framing and the noise seed.
func realisticShot(t *testing.T, variant int) (*analyze.Image, *chart.Design, chart.Homography, simcam.Lens, chartsim.Print) {
	t.Helper()
	w, h, pitch := 4500, 3000, 8.0
	if testing.Short() {
		w, h, pitch = 3000, 2000, 12.0
	}
	d, err := chart.NewDesign(chart.Code{Aspect: "3:2"})
	if err != nil {
		t.Fatal(err)
	}
	vs := []chartsim.View{
		{W: w, H: h, Fill: 0.95, RollDeg: 0.6, YawDeg: 2, PitchDeg: -1.5, FocalPx: 2.2 * float64(w)},
		{W: w, H: h, Fill: 0.97, RollDeg: -0.9, YawDeg: -3, PitchDeg: 1, FocalPx: 2 * float64(w), ShiftX: 15},
		{W: w, H: h, Fill: 0.93, RollDeg: 1.4, YawDeg: 1, PitchDeg: 2.5, FocalPx: 1.8 * float64(w), ShiftY: -10},
	}
	v := vs[variant%len(vs)]
	hom := v.Homography(d)
	k := 6 / pitch
	// The lens plus 0.5 px of demosaic-like blur.
	lens := simcam.FieldLens{CentreX: float64(w) / 2, CentreY: float64(h) / 2, PitchUM: pitch,
		SigmaT: []float64{0.7 * k, 0, 0.003 * k}, SigmaS: []float64{0.7 * k, 0.03 * k}, ExtraSigmaPx: 0.5}
	lay, err := chart.NewLayout(chart.Options{})
	if err != nil {
		t.Fatal(err)
	}
	pr := chartsim.Print{DPI: lay.DPI, ChartMM: lay.UnitMM * lay.Scale}
	pl := chartsim.PrintedLens(lens, hom, pr)
	cam := simcam.Camera{W: w, H: h, Lens: pl, Encoding: simcam.SRGB8,
		FullWellE: 20000, ReadNoiseE: 3, Seed: uint64(11 + variant), JPEGQuality: 90}
	photo, err := cam.Encode(chartsim.Scene(d, hom, pr))
	if err != nil {
		t.Fatal(err)
	}
	img, err := analyze.Run(context.Background(), "real.jpg", photo, analyze.Settings{PitchUM: pitch}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if img.Chart == nil {
		t.Fatal("chart not recognised")
	}
	return img, d, hom, pl, pr
}

// TestGratingsRealistic: every grating of the chart is found in camera-like
// JPEGs (issue 18 item 2: the 360-cycle grating along x went missing), the
// grating records are one per direction of the design (item 6), and each
// grating's frequency is the design's seen through the recognised pose
// (item 6: 0.0289 was read for 0.0264 cy/px).
func TestGratingsRealistic(t *testing.T) {
	variants := []int{0, 1, 2}
	if testing.Short() {
		variants = []int{2}
	}
	var worst float64
	for _, variant := range variants {
		img, d, hom, pl, pr := realisticShot(t, variant)
		des := map[string]chart.Grating{}
		for _, g := range d.Gratings {
			des[g.ID] = g
		}
		tied := map[string]int{}
		for _, p := range img.Chart.Patterns {
			if p.Kind == "grating" {
				tied[p.TargetID] = p.ID
			}
		}
		for _, m := range img.Chart.Missing {
			if _, ok := des[m.TargetID]; ok {
				t.Errorf("variant %d: %s (%g cycles, direction %g) %s", variant, m.TargetID, des[m.TargetID].FreqPerUnit, des[m.TargetID].DirDeg, m.Reason)
			}
		}
		for id, gi := range tied {
			g := des[id]
			info := img.Gratings[gi-1]
			// The design's frequency through the true pose.
			_, want, _ := designFreq(hom, g)
			t.Logf("variant %d: %s %g cycles: read %.5f cy/px, design through the pose %.5f (%+.2f %%)", variant, id, g.FreqPerUnit, info.FreqCyPx, want, 100*(info.FreqCyPx/want-1))
			if math.Abs(info.FreqCyPx/want-1) > 0.01 {
				t.Errorf("variant %d: %s frequency %.5f, design %.5f cy/px", variant, id, info.FreqCyPx, want)
			}
			if info.Reference {
				continue
			}
			// The truth: lens x print x pixel (simcam.TrueMTF of the printed
			// lens) times the dots' own attenuation sinc(f p) of the printed
			// grating, over the same for the direction's 96-cycle reference
			// (Goodman ch. 6; Boreman ch. 2 for the dot's box).
			ref := des[fmt.Sprintf("grating-%s-96", map[float64]string{0: "x", 90: "y"}[g.DirDeg])]
			_, fr, _ := designFreq(hom, ref)
			dpu := pr.DotsPerUnit()
			truth := simcam.TrueMTF(pl, info.XPx, info.YPx, info.DirectionDeg, want) * sincT(g.FreqPerUnit/dpu) /
				(simcam.TrueMTF(pl, info.XPx, info.YPx, info.DirectionDeg, fr) * sincT(ref.FreqPerUnit/dpu))
			e := float64(info.MTF) - truth
			worst = math.Max(worst, math.Abs(e))
			t.Logf("  MTF %.4f, truth %.4f (%+.4f)", float64(info.MTF), truth, e)
			if math.Abs(e) > 0.01 { // README: within 0.005
				t.Errorf("variant %d: %s MTF %.4f, truth %.4f", variant, id, float64(info.MTF), truth)
			}
		}
		// No edge record on the frame's corner marks or the grey steps
		// (issue 18 item 5): their places from the simulation's own pose.
		inv, _ := hom.Inverse()
		mm := 1 / pr.ChartMM
		for _, m := range img.Measurements {
			if m.Kind != "edge" {
				continue
			}
			u, v := inv.Apply(m.XPx, m.YPx)
			du, dv := math.Abs(u)-d.W/2, math.Abs(v)-d.H/2
			if (du > 0 || dv > 0) && du > -(chart.CornerMarkMM+1)*mm && dv > -(chart.CornerMarkMM+1)*mm {
				t.Errorf("variant %d: edge record on a corner mark at (%.0f, %.0f)", variant, m.XPx, m.YPx)
			}
			if math.Abs(u-d.Wedge.X) < d.Wedge.W/2 && math.Abs(v-d.Wedge.Y) < d.Wedge.H/2 {
				t.Errorf("variant %d: edge record on the grey steps at (%.0f, %.0f)", variant, m.XPx, m.YPx)
			}
		}
		recs := 0
		for _, m := range img.Measurements {
			if m.Kind == "grating" {
				recs++
				t.Logf("variant %d: grating record at (%.0f, %.0f) dir %.1f freqs %.4f", variant, m.XPx, m.YPx, m.NormalDeg, m.Freq)
			}
		}
		if recs != 2 {
			t.Errorf("variant %d: %d grating records, want one per direction of the design (2)", variant, recs)
		}
	}
	t.Logf("largest grating MTF error against lens x print x pixel: %.4f", worst)
}

// designFreq returns grating g's frequency (cy/px) through homography h at
// its centre: cycles per chart unit times the gradient of the chart
// coordinate along its modulation (a row of the inverse Jacobian).
func designFreq(h chart.Homography, g chart.Grating) (float64, float64, float64) {
	j := h.Jacobian(g.X, g.Y)
	det := j[0][0]*j[1][1] - j[0][1]*j[1][0]
	gx, gy := j[1][1]/det, -j[0][1]/det
	if g.DirDeg == 90 {
		gx, gy = -j[1][0]/det, j[0][0]/det
	}
	return 0, g.FreqPerUnit * math.Hypot(gx, gy), 0
}

func sincT(x float64) float64 {
	if x == 0 {
		return 1
	}
	return math.Sin(math.Pi*x) / (math.Pi * x)
}
