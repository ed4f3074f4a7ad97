package chart

import (
	"fmt"
	"image/color"
	"math"

	"sagitta/core/draw"
)

// Sheets of a chart across N x N sheets (tiling.go gives the design). Every
// sheet is a Layout of the whole design that prints only its own piece:
// the targets and marks whose centres lie on it, the frame's corner marks
// of the frame corners it holds, and below the piece the 100 mm and 4 inch
// rulers and a text block naming the sheet. All pieces share one scale,
// the largest at which every piece, with its guides, fits the printable
// area.
//
// Assembly guides, printed mm:
//   - on a side whose neighbour lies to the right or below, the piece's
//     border is a solid line with ticks every grid cell running
//     OverlapMM into the paper beyond it, and that paper is the overlap:
//     the neighbour is laid over it;
//   - on a side whose neighbour lies to the left or above, the border is
//     a dashed cutting line, reaching OverlapMM beyond the piece: the sheet
//     is cut there and its cut edge laid on the neighbour's solid line.
//
// Seams run along grid lines, between cells, so no target is cut and a
// seam misplaced by a few millimetres moves whole targets, which the
// analysis follows sheet by sheet.
const (
	// OverlapMM is the width of the overlap beyond a seam.
	OverlapMM = 12.0
	tickMM    = 4.0
	guideMM   = 0.2 // width of the guide lines
)

// NewSheets places the chart for the options on its sheets, in reading
// order (one layout for a chart on one sheet). Errors are OptionErrors in
// plain words.
func NewSheets(opt Options) ([]*Layout, error) {
	s, err := opt.resolve()
	if err != nil {
		return nil, err
	}
	if s.sheets < 2 {
		l, err := NewLayout(opt)
		if err != nil {
			return nil, err
		}
		return []*Layout{l}, nil
	}
	return newSheets(s)
}

// newSheets lays out the sheets of a chart across s.sheets x s.sheets.
func newSheets(s settings) ([]*Layout, error) {
	d, err := NewDesign(Code{Aspect: aspects[s.aspect].name, Portrait: s.portrait, Sheets: s.sheets})
	if err != nil {
		return nil, err
	}
	n := s.sheets
	shrink := math.Max(s.scale, 1)
	bw := (s.pageW - 2*s.margin) / shrink
	bh := (s.pageH - 2*s.margin) / shrink
	bx := (s.pageW - bw) / 2
	by := (s.pageH - bh) / 2
	if bw < rulerWidthMM {
		return nil, optErr("the sheet is too narrow for the 100 mm ruler: use a larger sheet or smaller margins")
	}
	corner := cornerOffMM + cornerWidthMM
	proto := &Layout{Design: d, Paper: s.paperName, Portrait: s.portrait, PageW: s.pageW, PageH: s.pageH,
		DPI: s.dpi, HighContrast: s.highContrast, Scale: s.scale, RulerMM: s.rulerMM, TextSizeMM: textSizeMM}
	proto.Piece = &d.Sheets[0]
	lines := proto.sheetLines(0, 0)
	textW := 0.0
	for _, t := range lines {
		textW = math.Max(textW, draw.TextWidth(t, draw.TextStyle{Size: textSizeMM}))
	}
	textW += 6
	textH := float64(len(lines)-1)*lineStepMM + textSizeMM
	side := bw >= rulerWidthMM+8+textW
	stripH := rulerHeightMM
	if !side {
		stripH = rulerHeightMM + 4 + textH
	} else {
		stripH = math.Max(stripH, textH)
	}
	// The largest chart unit at which every piece fits: its own width
	// plus the corner marks' room on the frame's sides, or the overlap on
	// a seam.
	unit := math.Inf(1)
	for _, p := range d.Sheets {
		right, bottom := corner, corner
		if p.Col < n-1 {
			right = OverlapMM
		}
		if p.Row < n-1 {
			bottom = OverlapMM
		}
		unit = math.Min(unit, (bw-corner-right)/(p.X1-p.X0))
		unit = math.Min(unit, (bh-corner-math.Max(bottom, sheetGap(p, n)+stripH))/(p.Y1-p.Y0))
	}
	if !(unit*math.Min(d.W, d.H)/float64(n) >= minChartHeight/2) {
		return nil, optErr("the sheet leaves too little room for a piece of the chart: use a larger sheet or smaller margins")
	}
	w, h := d.W*unit, d.H*unit
	out := make([]*Layout, len(d.Sheets))
	for i := range d.Sheets {
		l := *proto
		p := &d.Sheets[i]
		l.Piece, l.UnitMM = p, unit
		left, top := bx+corner, by+corner
		l.PieceMM = [4]float64{left, top, left + (p.X1-p.X0)*unit, top + (p.Y1-p.Y0)*unit}
		l.CentreMM = [2]float64{left - p.X0*unit, top - p.Y0*unit}
		stripTop := l.PieceMM[3] + sheetGap(*p, n)
		if side {
			l.RulerMM0 = [2]float64{left + 1, stripTop + RulerTickMM}
			l.TextAt = [2]float64{left + rulerWidthMM + 8, stripTop + textSizeMM}
		} else {
			l.RulerMM0 = [2]float64{left + 1, stripTop + RulerTickMM}
			l.TextAt = [2]float64{left, stripTop + rulerHeightMM + 4 + textSizeMM}
		}
		l.Lines = l.sheetLines(w, h)
		out[i] = &l
	}
	return out, nil
}

// sheetGap is the room between a piece and its rulers, mm: more below a
// seam, for the ticks and the label that names the sheet going over it.
func sheetGap(p Sheet, n int) float64 {
	if p.Row < n-1 {
		return tickMM + 2*textSizeMM + 2
	}
	return stripGapMM
}

// sheetLines words the text block of one sheet of a chart w x h printed mm.
func (l *Layout) sheetLines(w, h float64) []string {
	n := l.Design.Code.Sheets
	p := l.Piece
	orient := "landscape"
	if l.Portrait {
		orient = "portrait"
	}
	contrast := "4:1"
	if l.HighContrast {
		contrast = "high"
	}
	lines := []string{
		fmt.Sprintf("Sheet %s (row %d, column %d of %d x %d), chart code %s", p.Name(), p.Row+1, p.Col+1, n, n, l.Design.Code),
		fmt.Sprintf("%d sheets %s %s, %g dpi, assembled chart %.1f x %.1f mm, contrast %s", n*n, l.Paper, orient, l.DPI, w, h, contrast),
	}
	if l.RulerMM > 0 {
		lines = append(lines, fmt.Sprintf("Drawn at %.2f %% to correct a ruler that printed at %.1f mm.", 100*l.Scale, l.RulerMM))
	}
	return append(lines,
		"Print at 100 % (no fit to page). The ruler must measure 100 mm.",
		"Cut on the dashed lines; lay each cut edge on the next sheet's solid line.",
		"Hang the sheets flat, edge to edge; frame the photo to the corner marks.")
}

// drawGuides draws the seams' cutting lines, alignment lines and ticks of
// a sheet's layout (see the comment at the top of this file).
func (l *Layout) drawGuides(c draw.Canvas) {
	p := l.Piece
	n := l.Design.Code.Sheets
	black := color.Gray{Y: 0}
	cw := l.Design.W / float64(l.Design.Cols) * l.UnitMM
	ch := l.Design.H / float64(l.Design.Rows) * l.UnitMM
	x0, y0, x1, y1 := l.PieceMM[0], l.PieceMM[1], l.PieceMM[2], l.PieceMM[3]
	var solid, dashed draw.Path
	line := func(q *draw.Path, ax, ay, bx, by float64) {
		fx, fy := l.FileXY(ax, ay)
		gx, gy := l.FileXY(bx, by)
		q.MoveTo(fx, fy)
		q.LineTo(gx, gy)
	}
	label := func(x, y float64, t string) {
		fx, fy := l.FileXY(x, y)
		c.Text(fx, fy, t, draw.TextStyle{Size: textSizeMM * l.Scale, Anchor: draw.AnchorMiddle})
	}
	if p.Col < n-1 { // right: the neighbour goes over the overlap
		line(&solid, x1, y0-OverlapMM/2, x1, y1+OverlapMM/2)
		for k := 0; k <= p.J1-p.J0; k++ {
			y := y0 + float64(k)*ch
			line(&solid, x1, y, x1+tickMM, y)
		}
		nb := Sheet{Row: p.Row, Col: p.Col + 1}
		fx, fy := l.FileXY(x1+OverlapMM/2+textSizeMM/3, (y0+y1)/2)
		c.Text(fx, fy, "Sheet "+nb.Name()+" goes over this strip", draw.TextStyle{Size: textSizeMM * l.Scale, Anchor: draw.AnchorMiddle, Angle: -90})
	}
	if p.Row < n-1 { // below
		line(&solid, x0-OverlapMM/2, y1, x1+OverlapMM/2, y1)
		for k := 0; k <= p.I1-p.I0; k++ {
			x := x0 + float64(k)*cw
			line(&solid, x, y1, x, y1+tickMM)
		}
		nb := Sheet{Row: p.Row + 1, Col: p.Col}
		label((x0+x1)/2, y1+tickMM+textSizeMM+0.5, "Sheet "+nb.Name()+" goes over this strip")
	}
	if p.Col > 0 { // left: cut here
		line(&dashed, x0, y0-OverlapMM, x0, y1+OverlapMM)
	}
	if p.Row > 0 { // above: cut here
		line(&dashed, x0-OverlapMM, y0, x1+OverlapMM, y0)
	}
	c.Path(&solid, draw.Style{Stroke: black, Width: guideMM * l.Scale})
	c.Path(&dashed, draw.Style{Stroke: black, Width: guideMM * l.Scale, Dash: []float64{3 * l.Scale, 2 * l.Scale}})
}

// onPiece reports whether the chart point (x, y) is drawn by this layout:
// always for a chart on one sheet, else when it lies on the layout's piece.
func (l *Layout) onPiece(x, y float64) bool {
	return l.Piece == nil || l.Design.SheetAt(x, y) == l.pieceIndex()
}

// pieceIndex returns the index of the layout's piece in Design.Sheets.
func (l *Layout) pieceIndex() int {
	if l.Piece == nil {
		return -1
	}
	return l.Piece.Row*l.Design.Code.Sheets + l.Piece.Col
}
