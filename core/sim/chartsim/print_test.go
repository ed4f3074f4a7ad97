package chartsim_test

import (
	"context"
	"math"
	"slices"
	"testing"

	"sagitta/core/analyze"
	"sagitta/core/chart"
	"sagitta/core/sim/chartsim"
	"sagitta/core/sim/simcam"
)

// printedShot photographs the 3:2 chart printed with print pr (core/chart's
// dots-per-cycle limit and the print's blur, chartsim.Print) through lens l
// and analyses it with the given settings.
func printedShot(t *testing.T, w, h int, pitch float64, l simcam.Lens, pr chartsim.Print, s analyze.Settings) (*analyze.Image, chart.Homography, simcam.Lens, *chart.Design) {
	t.Helper()
	d, err := chart.NewDesign(chart.Code{Aspect: "3:2"})
	if err != nil {
		t.Fatal(err)
	}
	v := chartsim.View{W: w, H: h, Fill: 0.97}
	hom := v.Homography(d)
	pl := chartsim.PrintedLens(l, hom, pr)
	cam := simcam.Camera{W: w, H: h, Lens: pl, Encoding: simcam.Linear16}
	photo, err := cam.Encode(chartsim.Scene(d, hom, pr))
	if err != nil {
		t.Fatal(err)
	}
	s.PitchUM, s.Tone = pitch, "linear"
	img, err := analyze.Run(context.Background(), "print.png", photo, s, nil)
	if err != nil {
		t.Fatal(err)
	}
	return img, hom, pl, d
}

// TestStarsCutAtPrintLimit: a chart printed so coarsely for its framing that
// the stars' print limit (chart.PrintLimitDots dots per cycle, full
// modulation from chart.StarFadeEnd times that) falls at 0.40 cy/px, with
// full modulation up to 0.32 cy/px (issue 18 item 1). Every star record
// stops at the print's limit, is flagged, and agrees with the truth
// (simcam.TrueMTF of the lens cascaded with the print's Gaussian: lens x
// print x pixel, Goodman ch. 6) where it has data.
func TestStarsCutAtPrintLimit(t *testing.T) {
	w, h := 3000, 2000
	sc := 0.97 * 2000.0 // px per chart unit
	// dots per px 1.6: the modulation vanishes at 1.6 / 4 = 0.40 cy/px.
	pr := chartsim.Print{DPI: 600, ChartMM: 1.6 * sc * 25.4 / 600}
	lens := simcam.Fixed{PSF: simcam.Gaussian{Sigma1: 0.5, Sigma2: 0.5}}
	img, hom, pl, _ := printedShot(t, w, h, 12, lens, pr, analyze.Settings{PrintDPI: pr.DPI, ChartMM: pr.ChartMM})
	n := 0
	for _, m := range img.Measurements {
		if m.Kind != "star" {
			continue
		}
		n++
		u, v, _ := invert(hom, m.XPx, m.YPx)
		j := hom.Jacobian(u, v)
		limit := pr.PrintLimitCyPx(math.Sqrt(math.Abs(j[0][0]*j[1][1] - j[0][1]*j[1][0])))
		hi := m.MeasuredCyPx[1]
		last := m.Freq[len(m.Freq)-1]
		t.Logf("star at (%.0f, %.0f): measured %.3f..%.3f cy/px, curve to %.3f, print limit %.3f, flags %v",
			m.XPx, m.YPx, m.MeasuredCyPx[0], hi, last, limit, m.Flags)
		if hi > limit+0.005 || last > limit+0.005 {
			t.Errorf("star at (%.0f, %.0f) reports data to %.3f cy/px (curve to %.3f) beyond the print's limit %.3f", m.XPx, m.YPx, hi, last, limit)
		}
		if !slices.Contains(m.Flags, "print-limit") {
			t.Errorf("star at (%.0f, %.0f) not flagged print-limit: %v", m.XPx, m.YPx, m.Flags)
		}
		var worst, wf float64
		for i, f := range m.Freq {
			if f < m.MeasuredCyPx[0] || f > hi || f < 0.05 {
				continue
			}
			truth := simcam.TrueMTF(pl, m.XPx, m.YPx, m.NormalDeg, f)
			if e := math.Abs(m.MTF[i] - truth); e > worst {
				worst, wf = e, f
			}
		}
		t.Logf("  largest error against lens x print x pixel %.4f at %.2f cy/px", worst, wf)
		if worst > 0.01 { // README: within 0.005
			t.Errorf("star at (%.0f, %.0f): error %.3f at %.2f cy/px", m.XPx, m.YPx, worst, wf)
		}
	}
	if n == 0 {
		t.Fatal("no star record")
	}
}

// invert maps image px back to chart units.
func invert(h chart.Homography, x, y float64) (float64, float64, bool) {
	inv, ok := h.Inverse()
	if !ok {
		return 0, 0, false
	}
	u, v := inv.Apply(x, y)
	return u, v, true
}
