package analyze

import (
	"fmt"
	"math"

	"sagitta/core/chart"
)

// The print's limit. core/chart prints a sine star with no modulation where
// a cycle spans fewer than chart.PrintLimitDots printer dots and full
// modulation only from chart.StarFadeEnd times that radius on (a grating
// finer than PrintLimitDots dots per cycle aliases on the dot grid). With
// the chart recognised, the homography's scale at a pattern (px per chart
// unit) and the print's dots per chart unit (printer resolution x the
// chart's short side) give the finest frequency the print holds there, in
// cycles per photo pixel; a record is cut there and flagged "print-limit",
// since beyond it the pattern measures the printer, not the lens.

// Defaults of the print when the settings do not give it: core/chart's
// default sheet (A4 landscape, 600 dpi).
const defaultPrintDPI = chart.DefaultDPI

// starCutMargin and starCutPx widen the radius from which a star is cut:
// measured rings are 1 px wide and resampled onto the frequency grid from
// their neighbours, and the lens's and the print's blur spread the fade a
// few px outward (on a simulated print the last ring before the fade read
// 0.024 low without them).
const (
	starCutMargin = 1.1
	starCutPx     = 2.0
)

// FlagPrintLimit marks a star or grating record cut at the print's limit.
const FlagPrintLimit = "print-limit"

// PrintInfo is the print the analysis assumed to cut sine patterns at the
// print's limit.
type PrintInfo struct {
	DPI     float64 `json:"dpi"`
	ChartMM float64 `json:"chart_mm"` // the chart's short side as printed, mm
	Source  string  `json:"source"`   // "settings" or "assumed: the chart's default sheet"
	// DotsPerUnit is the printer dots per chart unit (chart short side).
	DotsPerUnit float64 `json:"dots_per_unit"`
}

// printInfo resolves the print from the settings, else the default sheet
// for chart code code.
func printInfo(s Settings, code chart.Code) PrintInfo {
	p := PrintInfo{DPI: s.PrintDPI, ChartMM: s.ChartMM, Source: "settings"}
	if p.DPI <= 0 || p.ChartMM <= 0 {
		p.Source = "assumed: the chart's default sheet (A4, 600 dpi)"
		sheets := ""
		if code.Sheets > 1 {
			sheets = fmt.Sprintf("%dx%d", code.Sheets, code.Sheets)
			p.Source = fmt.Sprintf("assumed: the chart's default sheets (%d x %d A4, 600 dpi)", code.Sheets, code.Sheets)
		}
		if p.DPI <= 0 {
			p.DPI = defaultPrintDPI
		}
		if p.ChartMM <= 0 {
			orient := "landscape"
			if code.Portrait {
				orient = "portrait"
			}
			if l, err := chart.NewLayout(chart.Options{Aspect: code.Aspect, Orientation: orient, DPI: p.DPI, Sheets: sheets}); err == nil {
				p.ChartMM = l.UnitMM * l.Scale
			}
		}
	}
	p.DotsPerUnit = p.DPI / 25.4 * p.ChartMM
	return p
}

// dotsPerPx returns the printer dots per photo px at (x, y) px: the dots
// per chart unit over the pose's scale there (px per chart unit, the square
// root of the homography's Jacobian determinant); 0 when unknown.
func dotsPerPx(pose *chart.Pose, p PrintInfo, x, y float64) float64 {
	u, v := pose.Inv.Apply(x, y)
	j := pose.H.Jacobian(u, v)
	sc := math.Sqrt(math.Abs(j[0][0]*j[1][1] - j[0][1]*j[1][0]))
	if !(sc > 0) || !(p.DotsPerUnit > 0) {
		return 0
	}
	return p.DotsPerUnit / sc
}

// cutAtPrint cuts every star record at the print's limit under
// it (pose: the recognised chart) and flags the records cut.
func cutAtPrint(img *Image, pose *chart.Pose, p PrintInfo) {
	if !(p.DotsPerUnit > 0) {
		return
	}
	for i := range img.Measurements {
		m := &img.Measurements[i]
		if m.Kind != "star" {
			continue // grating records are cut when they are made (gratings.go)
		}
		dpp := dotsPerPx(pose, p, m.XPx, m.YPx)
		if !(dpp > 0) {
			continue
		}
		// The radius (px) from which the star is printed at full
		// modulation, widened by starCutMargin and starCutPx for the rings'
		// width, the resampling and the blur, which carry the fade outward.
		n := float64(chart.StarCycles)
		for _, s := range img.Stars {
			if s.ID == m.PatternID {
				n = float64(s.Cycles)
			}
		}
		rFull := chart.StarFadeEnd * chart.PrintLimitDots * n / (2 * math.Pi * dpp)
		lim := n / (2 * math.Pi * (starCutMargin*rFull + starCutPx))
		if m.MeasuredCyPx == nil || m.MeasuredCyPx[1] <= lim {
			continue
		}
		k := len(m.Freq)
		for k > 0 && m.Freq[k-1] > lim+1e-9 {
			k--
		}
		m.Freq, m.MTF = m.Freq[:k:k], m.MTF[:k:k]
		if m.StdErr != nil && len(m.StdErr) > k {
			m.StdErr = m.StdErr[:k:k]
		}
		hi := lim
		if k > 0 {
			hi = math.Min(lim, m.Freq[k-1])
		}
		m.MeasuredCyPx = &[2]float64{math.Min(m.MeasuredCyPx[0], hi), hi}
		m.Flags = append(m.Flags, FlagPrintLimit)
		m.Warnings = append(m.Warnings, fmt.Sprintf("the print holds no finer detail than %.2f cy/px here (%.0f dpi, chart %.0f mm): the record stops there", lim, p.DPI, p.ChartMM))
	}
}
