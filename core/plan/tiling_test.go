package plan

import (
	"math"
	"testing"

	"sagitta/core/chart"
)

// TestTiling: a 50 mm lens on full frame with the A4 chart at 30 lp/mm is
// limited by the one sheet, and the planner proposes the 2 x 2 chart, with
// the distance and print MTF worked out here from the published formulas:
// the thin-lens object distance u = f (1 + 1/m) (Hecht, Optics, 4th ed.,
// section 5.2.3) for m = 24 mm over the assembled chart's height, and the
// print MTF |sinc(F p)| exp(-2 pi^2 s^2 F^2) at F = 30 m cycles/mm on
// paper (the dot's box aperture, Boreman, Modulation Transfer Function in
// Optical and Electro-Optical Systems, ch. 2, times a Gaussian spread,
// Goodman, Introduction to Fourier Optics, ch. 2) with p = 25.4 / 600 mm
// and s = 10 um (photo paper, from memory). A 1-inch sensor, which the one
// sheet serves at the same frequencies, gets no proposal.
func TestTiling(t *testing.T) {
	p, err := Compute(Options{FocalMM: 50, Sensor: "full-frame"})
	if err != nil {
		t.Fatal(err)
	}
	if p.Verdict != VerdictLimited || p.Tiling == nil {
		t.Fatalf("verdict %q, tiling %+v: want chart-limited with a tiling", p.Verdict, p.Tiling)
	}
	ls, err := chart.NewSheets(chart.Options{Sheets: "2x2"})
	if err != nil {
		t.Fatal(err)
	}
	w, h := ls[0].ChartMM()
	m := 24 / h
	u := 50 * (1 + 1/m)
	F, dot, s := 30*m, 25.4/600, 0.010
	x := math.Pi * F * dot
	want := math.Sin(x) / x * math.Exp(-2*math.Pi*math.Pi*s*s*F*F)
	tl := p.Tiling
	t.Logf("one sheet: %.0f %% at 30 lp/mm; %s: %.0f x %.0f mm from %.0f mm, %.1f %%", 100*p.Freqs[1].PrintMTF, tl.Sheets, tl.ChartMM[0], tl.ChartMM[1], tl.ObjectDistanceMM, 100*tl.Freqs[1].PrintMTF)
	if tl.Sheets != "2x2" || !tl.Enough || tl.ChartMM != [2]float64{w, h} {
		t.Errorf("tiling %+v, want 2x2 of %.1f x %.1f mm, enough", tl, w, h)
	}
	if math.Abs(tl.ObjectDistanceMM-u) > 1e-6 || math.Abs(tl.Freqs[1].PrintMTF-want) > 1e-9 {
		t.Errorf("distance %.3f mm, print MTF %.6f; want %.3f, %.6f", tl.ObjectDistanceMM, tl.Freqs[1].PrintMTF, u, want)
	}
	if want < MinPrintMTF || p.Freqs[1].PrintMTF >= MinPrintMTF {
		t.Errorf("the case does not test a proposal: one sheet %.3f, 2x2 %.3f", p.Freqs[1].PrintMTF, want)
	}
	if !has(p.Advice, "2 x 2 sheets") {
		t.Errorf("advice %q does not propose the 2 x 2 chart", p.Advice)
	}
	p, err = Compute(Options{FocalMM: 50, Sensor: "1-inch"})
	if err != nil {
		t.Fatal(err)
	}
	if p.Verdict != VerdictFine || p.Tiling != nil {
		t.Errorf("1-inch sensor: verdict %q, tiling %+v; want fine and none", p.Verdict, p.Tiling)
	}
	// The 2 x 2 chart short of the sensor's Nyquist frequency (6 um
	// pixels: 83 lp/mm) is offered the 3 x 3 one; the 3 x 3 chart gets no
	// proposal.
	p, err = Compute(Options{FocalMM: 50, Sensor: "full-frame", PitchUM: 6, Chart: chart.Options{Sheets: "2x2"}})
	if err != nil {
		t.Fatal(err)
	}
	if p.Verdict != VerdictBorderline || p.Tiling == nil || p.Tiling.Sheets != "3x3" {
		t.Errorf("2x2 at 6 um: verdict %q, tiling %+v; want borderline and 3x3 proposed", p.Verdict, p.Tiling)
	}
	p, err = Compute(Options{FocalMM: 50, Sensor: "full-frame", PitchUM: 3, Chart: chart.Options{Sheets: "3x3"}})
	if err != nil {
		t.Fatal(err)
	}
	if p.Tiling != nil {
		t.Errorf("a 3x3 chart got a tiling proposal %+v", p.Tiling)
	}
}
