package plan

import (
	"math"
	"strings"
	"testing"

	"sagitta/core/chart"
)

// TestWorkedExample checks the planner against a case worked by hand with
// the thin-lens equation (u = f (1 + 1/m), v = f (1 + m); Hecht, Optics,
// section 5.2.3) and the print model of the package doc:
//
//	f = 50 mm, sensor 36 x 24 mm, 6 um pixels, chart 360 x 240 mm,
//	600 dpi on photo paper (ink spread 10 um, from memory).
//	m = 24 / 240 = 0.1 (36 / 360 = 0.1 too)
//	u = 50 (1 + 1/0.1) = 550 mm;  v = 50 (1 + 0.1) = 55 mm;  u + v = 605 mm
//	u / f = 11 focal lengths: under 25, so a close-range warning
//	10 and 30 lp/mm on the sensor are 1 and 3 lp/mm on paper
//	Nyquist = 1 / (2 x 0.006 mm) = 83.33 lp/mm, 8.333 lp/mm on paper
//	dot p = 25.4 / 600 = 0.042333 mm
//	at 8.333 lp/mm: F p = 0.35278, sinc = sin(1.10828) / 1.10828
//	  = 0.89493 / 1.10828 = 0.80750; spread exp(-2 pi^2 0.01^2 8.333^2)
//	  = exp(-0.137078) = 0.87190; print MTF = 0.70406
//	at 3 lp/mm: sinc(0.127) = 0.38848 / 0.39898 = 0.97368;
//	  exp(-0.0177653) = 0.98239; print MTF = 0.95653 (>= 0.95)
//	so: fine at the field frequencies, not at Nyquist: "borderline".
//	print blur sqrt(0.042333^2 / 12 + 0.01^2) = 0.015791 mm on paper,
//	  x 0.1 = 1.5791 um on the sensor, 0.2632 of the pitch.
func TestWorkedExample(t *testing.T) {
	p, err := Compute(Options{FocalMM: 50, Sensor: "36x24", PitchUM: 6, ChartMM: [2]float64{360, 240}})
	if err != nil {
		t.Fatal(err)
	}
	const tol = 1e-4
	for _, c := range []struct {
		name      string
		got, want float64
	}{
		{"magnification", p.Magnification, 0.1},
		{"object distance mm", p.ObjectDistanceMM, 550},
		{"image distance mm", p.ImageDistanceMM, 55},
		{"sensor to chart mm", p.SensorToChartMM, 605},
		{"focal lengths", p.FocalLengths, 11},
		{"10 lp/mm on paper", p.Freqs[0].PaperLPMM, 1},
		{"30 lp/mm on paper", p.Freqs[1].PaperLPMM, 3},
		{"print MTF at 30 lp/mm", p.Freqs[1].PrintMTF, 0.95653},
		{"Nyquist lp/mm", p.Nyquist.SensorLPMM, 83.3333},
		{"Nyquist on paper", p.Nyquist.PaperLPMM, 8.33333},
		{"print MTF at Nyquist", p.Nyquist.PrintMTF, 0.70406},
		{"print blur um", p.PrintBlurUM, 15.791},
		{"print blur on sensor um", p.PrintBlurSensorUM, 1.5791},
		{"blur over pitch", p.BlurOverPitch, 0.2632},
	} {
		if math.Abs(c.got-c.want) > tol*math.Max(1, math.Abs(c.want)) {
			t.Errorf("%s = %.6g, want %.6g", c.name, c.got, c.want)
		}
	}
	if p.Verdict != VerdictBorderline {
		t.Errorf("verdict %q, want %q", p.Verdict, VerdictBorderline)
	}
	if !has(p.Warnings, "11 focal lengths") {
		t.Errorf("no close-range warning in %q", p.Warnings)
	}
	if len(p.Advice) < 2 || !has(p.Advice, "farther") {
		t.Errorf("advice %q lacks a longer distance", p.Advice)
	}
	t.Logf("%s", p.Summary)
	for _, a := range p.Advice {
		t.Logf("advice: %s", a)
	}
}

func has(list []string, word string) bool {
	for _, s := range list {
		if strings.Contains(s, word) {
			return true
		}
	}
	return false
}

// TestLongLens: f = 200 mm on a 23.5 x 15.6 mm sensor (APS-C, from memory)
// with a 600 x 400 mm chart: m = min(15.6/400, 23.5/600) = min(0.039,
// 0.039167) = 0.039, height-limited; u = 200 (1 + 1/0.039) = 5328.2 mm,
// 26.6 focal lengths (no close-range warning). 10 and 30 lp/mm are 0.39 and
// 1.17 lp/mm on paper.
func TestLongLens(t *testing.T) {
	p, err := Compute(Options{FocalMM: 200, Sensor: "aps-c", ChartMM: [2]float64{600, 400}})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(p.Magnification-0.039) > 1e-12 || p.Limit != "height" {
		t.Errorf("m = %g limited by %s, want 0.039 by height", p.Magnification, p.Limit)
	}
	if math.Abs(p.ObjectDistanceMM-200*(1+1/0.039)) > 1e-9 || math.Abs(p.ObjectDistanceMM-5328.205) > 1e-3 {
		t.Errorf("u = %.3f mm, want 5328.205", p.ObjectDistanceMM)
	}
	if has(p.Warnings, "focal lengths away") {
		t.Errorf("close-range warning at %.1f focal lengths", p.FocalLengths)
	}
	if !has(p.Warnings, "pixel pitch") || p.Nyquist != nil {
		t.Errorf("without a pitch the plan should skip Nyquist and say so: %q", p.Warnings)
	}
	if math.Abs(p.Freqs[1].PaperLPMM-1.17) > 1e-12 {
		t.Errorf("30 lp/mm is %g lp/mm on paper, want 1.17", p.Freqs[1].PaperLPMM)
	}
	if p.Verdict != VerdictFine {
		t.Errorf("verdict %q: %s", p.Verdict, p.Summary)
	}
}

// TestFromLayout: the chart size comes from the chart layout for the sheet
// (A3 landscape), the aspect from the sensor, and a tiny sheet makes the
// print limit the measurement with advice to use a larger sheet.
func TestFromLayout(t *testing.T) {
	opt := Options{FocalMM: 50, Sensor: "full-frame", Pixels: [2]int{6000, 4000}, Chart: chart.Options{Paper: "A3"}}
	p, err := Compute(opt)
	if err != nil {
		t.Fatal(err)
	}
	l, _ := chart.NewLayout(chart.Options{Paper: "A3", Aspect: "3:2"})
	w, h := l.ChartMM()
	if p.ChartMM != [2]float64{w, h} || p.Aspect != "3:2" || p.PitchUM != 6 {
		t.Errorf("chart %v aspect %s pitch %g; want %v x %v, 3:2, 6 um", p.ChartMM, p.Aspect, p.PitchUM, w, h)
	}
	if math.Abs(p.Magnification-24/h) > 1e-12 {
		t.Errorf("m = %g, want 24 / %g", p.Magnification, h)
	}
	// Plain paper at 300 dpi, 40 mm lens with 3 um pixels, 20 and 60 lp/mm.
	opt = Options{FocalMM: 40, Sensor: "36x24", PitchUM: 3, Surface: "plain", FreqsLPMM: []float64{20, 60},
		Chart: chart.Options{Paper: "A4", DPI: 300}}
	p, err = Compute(opt)
	if err != nil {
		t.Fatal(err)
	}
	if p.Verdict != VerdictLimited {
		t.Errorf("verdict %q, want %q: %s", p.Verdict, VerdictLimited, p.Summary)
	}
	if !has(p.Advice, "larger") || !has(p.Advice, "farther") || !has(p.Advice, "dpi") {
		t.Errorf("advice %q should offer a larger chart, a longer distance and a finer print", p.Advice)
	}
	t.Logf("%s", p.Summary)
	for _, a := range p.Advice {
		t.Logf("advice: %s", a)
	}
}

func TestErrors(t *testing.T) {
	for _, c := range []struct {
		name string
		opt  Options
		want string
	}{
		{"focal", Options{FocalMM: 0, Sensor: "36x24"}, "focal length"},
		{"sensor", Options{FocalMM: 50, Sensor: "medium"}, "sensor"},
		{"pitch", Options{FocalMM: 50, Sensor: "36x24", PitchUM: 0.1}, "pixel pitch"},
		{"surface", Options{FocalMM: 50, Sensor: "36x24", Surface: "canvas"}, "surface"},
		{"chart", Options{FocalMM: 50, Sensor: "36x24", Chart: chart.Options{Paper: "B4"}}, "unknown paper"},
		{"freq", Options{FocalMM: 50, Sensor: "36x24", FreqsLPMM: []float64{-1}}, "frequency"},
	} {
		_, err := Compute(c.opt)
		if err == nil || !strings.Contains(err.Error(), c.want) || !(strings.HasPrefix(err.Error(), "plan: ") || strings.HasPrefix(err.Error(), "chart: ")) {
			t.Errorf("%s: error %v, want one mentioning %q", c.name, err, c.want)
		}
	}
}
