package chart

import (
	"fmt"
	"math"

	"sagitta/core/draw"
)

// Layout is a Design placed on a sheet: the chart frame as large as the
// printable area allows at the chosen aspect ratio, with an information
// strip below it (the 100 mm and 4 in rulers and a text block) and small
// corner marks just outside the frame showing where the photo's frame
// should go. The strip lies outside the chart frame, so a photo framed to
// the corner marks does not contain it.
//
// Positions are "printed" millimetres on the sheet (origin top-left, y
// down): where things land on paper. The file draws them through the scale
// correction (FileXY), which differs from the identity only when the user
// entered a measured ruler length.
type Layout struct {
	Design       *Design
	Paper        string  // the sheet's name, e.g. "A4" or "300 x 400 mm"
	Portrait     bool    // page orientation
	PageW, PageH float64 // sheet, mm, as oriented
	DPI          float64 // printer resolution
	HighContrast bool    // black ink; else 4:1
	// Scale is the file's size over the printed size: 100 / RulerMM, or 1.
	Scale   float64
	RulerMM float64 // the measured ruler length the scale corrects, 0 if none
	// UnitMM is the printed size of one chart unit (the chart's short side),
	// mm.
	UnitMM float64
	// CentreMM is the printed position of the chart's centre on the sheet.
	CentreMM [2]float64
	// RulerMM0 is the printed position of the zero tick of the 100 mm
	// ruler, on its baseline; its ticks rise RulerTickMM above the baseline
	// at 0 and 100 mm.
	RulerMM0 [2]float64
	// Lines is the text block; TextAt the start of the first line's
	// baseline; TextSizeMM the font size.
	Lines      []string
	TextAt     [2]float64
	TextSizeMM float64
	// Piece is the sheet this layout prints of a chart across several
	// (sheets.go); nil for a chart on one sheet. PieceMM is its printed
	// position on this sheet: left, top, right, bottom, mm.
	Piece   *Sheet
	PieceMM [4]float64
}

// Sizes of the information strip, printed mm.
const (
	rulerLenMM     = 100
	inchLenMM      = 4 * 25.4
	RulerTickMM    = 5.0 // height of the 0 and 100 mm ticks of the ruler
	rulerHeightMM  = 15.5
	rulerWidthMM   = 112 // rulers plus their unit labels
	textSizeMM     = 2.4
	lineStepMM     = 3.5
	stripGapMM     = 6 // between the chart frame and the strip
	cornerMarkMM   = CornerMarkMM
	cornerOffMM    = CornerOffMM
	cornerWidthMM  = CornerWidthMM
	minChartHeight = 60 // smallest chart short side that is still useful, mm
)

// NewLayout places the chart for the options. Errors are OptionErrors in
// plain words. For a chart across several sheets it returns the first
// sheet's layout (NewSheets gives them all); its ChartMM is the assembled
// chart's size.
func NewLayout(opt Options) (*Layout, error) {
	s, err := opt.resolve()
	if err != nil {
		return nil, err
	}
	if s.sheets > 1 {
		ls, err := newSheets(s)
		if err != nil {
			return nil, err
		}
		return ls[0], nil
	}
	d, err := NewDesign(Code{Aspect: aspects[s.aspect].name, Portrait: s.portrait})
	if err != nil {
		return nil, err
	}
	l := &Layout{
		Design: d, Paper: s.paperName, Portrait: s.portrait, PageW: s.pageW, PageH: s.pageH,
		DPI: s.dpi, HighContrast: s.highContrast, Scale: s.scale, RulerMM: s.rulerMM,
		TextSizeMM: textSizeMM,
	}
	// The content box: the printable area, shrunk by the scale correction
	// when it enlarges the file, so that the enlarged drawing still stays
	// inside the margins.
	shrink := math.Max(s.scale, 1)
	bw := (s.pageW - 2*s.margin) / shrink
	bh := (s.pageH - 2*s.margin) / shrink
	bx := (s.pageW - bw) / 2
	by := (s.pageH - bh) / 2

	l.Lines = l.textLines(0, 0) // sizes only; numbers are filled in below
	textW := 0.0
	for _, t := range l.Lines {
		textW = math.Max(textW, draw.TextWidth(t, draw.TextStyle{Size: textSizeMM}))
	}
	textW += 6 // room for longer numbers
	textH := float64(len(l.Lines)-1)*lineStepMM + textSizeMM
	side := bw >= rulerWidthMM+8+textW
	stripH := rulerHeightMM
	if !side {
		stripH = rulerHeightMM + 4 + textH
	}
	if bw < rulerWidthMM {
		return nil, optErr("the sheet is too narrow for the 100 mm ruler: use a larger sheet or smaller margins")
	}
	corner := cornerOffMM + cornerWidthMM
	fw, fh := bw-2*corner, bh-2*corner-stripGapMM-stripH
	unit := math.Min(fw/d.W, fh/d.H)
	if !(unit*math.Min(d.W, d.H) >= minChartHeight) {
		return nil, optErr("the sheet leaves a chart under %d mm on its short side: use a larger sheet or smaller margins", minChartHeight)
	}
	l.UnitMM = unit
	cw, chh := d.W*unit, d.H*unit
	blockH := chh + corner + stripGapMM + stripH
	top := by + (bh-blockH-corner)/2 + corner
	l.CentreMM = [2]float64{bx + bw/2, top + chh/2}
	stripTop := top + chh + stripGapMM
	left := bx + bw/2 - cw/2
	if side {
		// Rulers at the frame's left edge, text at its right edge; when the
		// two do not fit under the frame, centred under it.
		x0, sw := left, cw
		if need := rulerWidthMM + 8 + textW; need > cw {
			x0, sw = bx+bw/2-need/2, need
		}
		l.RulerMM0 = [2]float64{x0 + 1, stripTop + RulerTickMM}
		l.TextAt = [2]float64{x0 + sw - textW, stripTop + textSizeMM}
	} else {
		l.RulerMM0 = [2]float64{bx + (bw-rulerWidthMM)/2 + 1, stripTop + RulerTickMM}
		l.TextAt = [2]float64{bx + (bw-rulerWidthMM)/2, stripTop + rulerHeightMM + 4 + textSizeMM}
	}
	l.Lines = l.textLines(cw, chh)
	return l, nil
}

// textLines words the text block for a chart of w x h printed mm.
func (l *Layout) textLines(w, h float64) []string {
	orient := "landscape"
	if l.Portrait {
		orient = "portrait"
	}
	contrast := "4:1"
	if l.HighContrast {
		contrast = "high"
	}
	lines := []string{
		fmt.Sprintf("Sagitta sharpness chart, chart code %s", l.Design.Code),
		fmt.Sprintf("Sheet %s %s, %g dpi, chart %.1f x %.1f mm, contrast %s", l.Paper, orient, l.DPI, w, h, contrast),
	}
	if l.RulerMM > 0 {
		lines = append(lines, fmt.Sprintf("Drawn at %.2f %% to correct a ruler that printed at %.1f mm.", 100*l.Scale, l.RulerMM))
	}
	return append(lines,
		"Print at 100 % (no fit to page). The ruler must measure 100 mm.",
		"Frame the photo to the corner marks; keep the camera square to the sheet.")
}

// ChartMM returns the printed size of the chart frame, mm.
func (l *Layout) ChartMM() (w, h float64) { return l.Design.W * l.UnitMM, l.Design.H * l.UnitMM }

// PageXY maps chart units to printed sheet millimetres.
func (l *Layout) PageXY(x, y float64) (float64, float64) {
	return l.CentreMM[0] + x*l.UnitMM, l.CentreMM[1] + y*l.UnitMM
}

// FileXY maps printed sheet millimetres to the file's page millimetres:
// the scale correction, about the sheet's centre.
func (l *Layout) FileXY(x, y float64) (float64, float64) {
	cx, cy := l.PageW/2, l.PageH/2
	return cx + l.Scale*(x-cx), cy + l.Scale*(y-cy)
}

// DarkReflectance is the reflectance of the dark parts relative to the
// paper's white, in linear terms: 0.25 at 4:1 contrast, 0 (black ink) at
// high contrast.
func (l *Layout) DarkReflectance() float64 {
	if l.HighContrast {
		return 0
	}
	return 0.25
}

// The frame's corner marks (paint.go): at each corner of the frame an L of
// lines CornerWidthMM wide whose vertex lies CornerOffMM (plus half the
// width) outside the corner along both axes, its arms CornerMarkMM long
// running back along the frame's sides.
const (
	CornerMarkMM  = 6
	CornerOffMM   = 1.5
	CornerWidthMM = 0.3
)

// printerDPIs are printer resolutions in common use, ascending (from
// memory: the 300/600/1200 and 360/720/1440/2880 families).
var printerDPIs = []float64{300, 360, 600, 720, 1200, 1440, 2880}

// Notes lists what the printer resolution cannot print faithfully: sine
// gratings with fewer than printLimitDots printer dots per cycle, which may
// print with false patterns. (The stars' centres, where the same limit is
// reached, fade to grey by design; see starPattern.)
func (l *Layout) Notes() []string {
	var out []string
	dot := draw.MMPerInch / l.DPI // printed mm per dot
	seen := map[float64]bool{}
	for _, g := range l.Design.Gratings {
		dots := l.UnitMM / g.FreqPerUnit / dot
		if dots < printLimitDots && !seen[g.FreqPerUnit] {
			seen[g.FreqPerUnit] = true
			need := l.DPI * printLimitDots / dots
			better := fmt.Sprintf("%.0f dpi or more", math.Ceil(need))
			for _, r := range printerDPIs {
				if r >= need {
					better = fmt.Sprintf("%g dpi", r)
					break
				}
			}
			out = append(out, fmt.Sprintf("At %g dpi the %g-cycle gratings get only %.1f printer dots per cycle and may print with false patterns: print at %s, or on a larger sheet.",
				l.DPI, g.FreqPerUnit, dots, better))
		}
	}
	return out
}
