package plan

import (
	"fmt"
	"math"
	"strings"

	"sagitta/core/chart"
)

// Tiling is a chart across N x N sheets of the user's paper (core/chart,
// tiling.go) proposed when one sheet (or the 2 x 2 chart) limits the
// measurement: the assembled
// chart's size, the distance at which it fills the frame (the thin-lens
// distances of the package doc), and the print's MTF at the field
// frequencies and at Nyquist seen from there.
type Tiling struct {
	Sheets           string     `json:"sheets"` // "2x2" or "3x3", as chart.Options.Sheets takes it
	ChartMM          [2]float64 `json:"chart_mm"`
	Magnification    float64    `json:"magnification"`
	ObjectDistanceMM float64    `json:"object_distance_mm"`
	SensorToChartMM  float64    `json:"sensor_to_chart_mm"`
	Freqs            []Freq     `json:"frequencies"`
	Nyquist          *Freq      `json:"nyquist,omitempty"`
	// Enough is true when the print keeps MinPrintMTF at every frequency
	// the one sheet failed at (the field frequencies when chart-limited,
	// Nyquist when borderline); the smallest such tiling is proposed, else
	// 3 x 3 as the nearest.
	Enough bool `json:"enough"`
}

// proposeTiling sets Tiling and adds its advice, for a plan whose one sheet
// limits the measurement.
func (p *Plan) proposeTiling(opt Options, co chart.Options, pr printer) {
	if opt.ChartMM[0] > 0 {
		return // a chart printed elsewhere
	}
	// Larger tilings than the chart's own.
	var cands []string
	switch strings.ToLower(strings.ReplaceAll(strings.TrimSpace(co.Sheets), " ", "")) {
	case "", "1x1", "1":
		cands = []string{"2x2", "3x3"}
	case "2x2", "2":
		cands = []string{"3x3"}
	}
	for _, n := range cands {
		c := co
		c.Sheets = n
		l, err := chart.NewLayout(c)
		if err != nil {
			continue
		}
		w, h := l.ChartMM()
		m := math.Min(math.Min(p.SensorMM[0], p.SensorMM[1])/math.Min(w, h), math.Max(p.SensorMM[0], p.SensorMM[1])/math.Max(w, h))
		t := &Tiling{Sheets: n, ChartMM: [2]float64{w, h}, Magnification: m,
			ObjectDistanceMM: opt.FocalMM * (1 + 1/m), Enough: true}
		t.SensorToChartMM = t.ObjectDistanceMM + opt.FocalMM*(1+m)
		for _, f := range p.Freqs {
			g := Freq{f.SensorLPMM, f.SensorLPMM * m, pr.mtf(f.SensorLPMM * m)}
			t.Freqs = append(t.Freqs, g)
			if p.Verdict == VerdictLimited && g.PrintMTF < MinPrintMTF {
				t.Enough = false
			}
		}
		if p.Nyquist != nil {
			ny := p.Nyquist.SensorLPMM
			t.Nyquist = &Freq{ny, ny * m, pr.mtf(ny * m)}
			if p.Verdict == VerdictBorderline && t.Nyquist.PrintMTF < MinPrintMTF {
				t.Enough = false
			}
		}
		p.Tiling = t
		if t.Enough {
			break
		}
	}
	t := p.Tiling
	if t == nil {
		return
	}
	worst := t.Freqs[0]
	for _, f := range t.Freqs {
		if f.PrintMTF < worst.PrintMTF {
			worst = f
		}
	}
	if p.Verdict == VerdictBorderline && t.Nyquist != nil {
		worst = *t.Nyquist
	}
	nn := t.Sheets[:1]
	if t.Enough {
		p.Advice = append(p.Advice, fmt.Sprintf("Or print the chart across %s x %s sheets of %s and assemble it on a wall: the chart is %.0f x %.0f mm, fills the frame from %.2f m (lens to chart), and the print keeps %.0f %% of its contrast at %s lp/mm on the sensor.",
			nn, nn, p.paperName(), t.ChartMM[0], t.ChartMM[1], t.ObjectDistanceMM/1000, 100*worst.PrintMTF, freqText(worst.SensorLPMM)))
	} else {
		p.Advice = append(p.Advice, fmt.Sprintf("A chart across %s x %s sheets of %s (%.0f x %.0f mm, from %.2f m) comes closer but is not enough: the print keeps %.0f %% of its contrast at %s lp/mm on the sensor.",
			nn, nn, p.paperName(), t.ChartMM[0], t.ChartMM[1], t.ObjectDistanceMM/1000, 100*worst.PrintMTF, freqText(worst.SensorLPMM)))
	}
}

// freqText writes a sensor frequency: as given when whole (the field
// frequencies), rounded otherwise (Nyquist).
func freqText(f float64) string {
	if f == math.Round(f) {
		return fmt.Sprintf("%g", f)
	}
	return fmt.Sprintf("%.0f", f)
}

// paperName is the plan's sheet without its orientation.
func (p *Plan) paperName() string { return strings.TrimSuffix(p.Paper, " portrait") }
