package plan

import (
	"fmt"
	"math"

	"sagitta/core/chart"
	"sagitta/core/note"
)

// verdict sets the chart-limit verdict, its summary, the advice on what to
// change and the other warnings.
func (p *Plan) verdict(opt Options, co chart.Options, pr printer) {
	p.Advice, p.Warnings, p.WarningCodes = []string{}, []string{}, []string{}
	worst := p.Freqs[0]
	for _, f := range p.Freqs {
		if f.PrintMTF < worst.PrintMTF {
			worst = f
		}
	}
	top := p.Freqs[0]
	for _, f := range p.Freqs {
		if f.SensorLPMM > top.SensorLPMM {
			top = f
		}
	}
	pct := func(v float64) string { return fmt.Sprintf("%.0f %%", 100*v) }
	crit := top // the highest sensor frequency the print must keep
	switch {
	case worst.PrintMTF < MinPrintMTF:
		p.Verdict = VerdictLimited
		p.Summary = fmt.Sprintf("The print limits the measurement: at %g lp/mm on the sensor (%.2g lp/mm on paper) it keeps only %s of its contrast, so every value there reads at least %s low.",
			worst.SensorLPMM, worst.PaperLPMM, pct(worst.PrintMTF), pct(1-worst.PrintMTF))
		if p.Nyquist != nil {
			crit = *p.Nyquist
		}
	case p.Nyquist != nil && p.Nyquist.PrintMTF < MinPrintMTF:
		p.Verdict = VerdictBorderline
		crit = *p.Nyquist
		p.Summary = fmt.Sprintf("The print is sharp enough for the field frequencies (it keeps %s or more of its contrast up to %g lp/mm on the sensor), but not up to the sensor's Nyquist frequency, %.0f lp/mm on the sensor (%.2g lp/mm on paper), where it keeps %s: MTF50 and values near Nyquist will read low.",
			pct(worst.PrintMTF), top.SensorLPMM, p.Nyquist.SensorLPMM, p.Nyquist.PaperLPMM, pct(p.Nyquist.PrintMTF))
	default:
		p.Verdict = VerdictFine
		upTo := fmt.Sprintf("%g lp/mm on the sensor", top.SensorLPMM)
		if p.Nyquist != nil {
			upTo = fmt.Sprintf("the sensor's Nyquist frequency, %.0f lp/mm on the sensor", p.Nyquist.SensorLPMM)
		}
		p.Summary = fmt.Sprintf("The print is sharp enough: up to %s it keeps at least %s of its contrast.", upTo, pct(math.Min(worst.PrintMTF, nyq(p))))
	}
	if p.Verdict != VerdictFine {
		p.advise(opt, co, pr, crit)
		p.proposeTiling(opt, co, pr)
	}
	if p.Nyquist == nil {
		p.warn(note.PlanNoPitch, "Give the pixel pitch (or the photo's size in pixels) to check the print up to the sensor's Nyquist frequency.")
	}
	if p.FocalLengths < MinFocalLengths {
		p.warn(note.PlanCloseRange, fmt.Sprintf("The chart is only %.0f focal lengths away (%.2f m from the lens): lenses behave differently at close range, so the field curves may not show how the lens draws distant subjects. A larger sheet lets you shoot from farther (common practice: about %d focal lengths or more).",
			p.FocalLengths, p.ObjectDistanceMM/1000, MinFocalLengths))
	}
	if sa := nearestAspect(p.SensorMM); sa != p.Aspect {
		p.warn(note.PlanAspect, fmt.Sprintf("The chart is %s but the sensor is nearer %s: the chart cannot fill the frame, and the frame's corners are not measured.", p.Aspect, sa))
	}
}

// nyq returns the print MTF at Nyquist, or 1 when the pitch is unknown.
func nyq(p *Plan) float64 {
	if p.Nyquist == nil {
		return 1
	}
	return p.Nyquist.PrintMTF
}

// advise says what would make the print sharp enough at sensor frequency
// crit: a larger sheet, a longer distance, or a finer print.
func (p *Plan) advise(opt Options, co chart.Options, pr printer, crit Freq) {
	mMax := pr.maxPaperLPMM() / crit.SensorLPMM // the largest magnification the print allows
	need := p.side(p.SensorMM) / mMax           // chart side needed along the limiting direction
	// A larger sheet, same printer and options: the smallest that is enough.
	sheet, best := "", math.Inf(1)
	for _, name := range chart.PaperNames() {
		c := co
		c.Paper, c.PaperMM = name, [2]float64{}
		l, err := chart.NewLayout(c)
		if err != nil {
			continue
		}
		w, h := l.ChartMM()
		if s := p.side([2]float64{w, h}); s >= need && s < best {
			sheet, best = name, s
		}
	}
	if sheet != "" {
		p.Advice = append(p.Advice, fmt.Sprintf("Print on a larger sheet: %s gives a chart %.0f mm along its %s (%.0f mm or more is enough to stay sharp at %.0f lp/mm on the sensor).", sheet, best, p.Limit, need, crit.SensorLPMM))
	} else {
		p.Advice = append(p.Advice, fmt.Sprintf("Print a larger chart: at least %.0f mm along its %s, more than the sheets offered here give (a print shop can make one).", need, p.Limit))
	}
	// Farther, same sheet.
	u := opt.FocalMM * (1 + 1/mMax)
	p.Advice = append(p.Advice, fmt.Sprintf("Or shoot from farther: from %.2f m (lens to chart) the print is sharp enough, but the chart then fills only %.0f %% of the frame's %s, so the frame's edges and corners are not measured.",
		u/1000, 100*mMax/p.Magnification, p.Limit))
	// Finer print.
	dpi := math.Max(p.DPI, 1200)
	fine := printer{dotMM: 25.4 / dpi, spreadMM: math.Min(pr.spreadMM, inkSpreadUM["photo"]/1000)}
	if fine != pr {
		v := fine.mtf(crit.PaperLPMM)
		if v >= MinPrintMTF {
			p.Advice = append(p.Advice, fmt.Sprintf("Or print finer: at %.0f dpi on photo paper the print keeps %.0f %% of its contrast at %.0f lp/mm on the sensor (%.2g lp/mm on paper).", dpi, 100*v, crit.SensorLPMM, crit.PaperLPMM))
		} else {
			p.Advice = append(p.Advice, fmt.Sprintf("A finer print alone is not enough: at %.0f dpi on photo paper it keeps %.0f %% of its contrast at %.0f lp/mm on the sensor (%.2g lp/mm on paper).", dpi, 100*v, crit.SensorLPMM, crit.PaperLPMM))
		}
	}
}

// side returns the side of a w x h rectangle along the plan's limiting
// direction (the long side when the long side limits).
func (p *Plan) side(wh [2]float64) float64 {
	if p.limitLong {
		return math.Max(wh[0], wh[1])
	}
	return math.Min(wh[0], wh[1])
}

// warn adds a warning with its code.
func (p *Plan) warn(c note.Code, text string) {
	p.Warnings = append(p.Warnings, text)
	p.WarningCodes = append(p.WarningCodes, string(c))
}
