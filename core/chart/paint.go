package chart

import (
	"image/color"
	"math"
	"sagitta/core/decode/srgb"
	"strconv"

	"sagitta/core/draw"
)

// Tone mapping. Every grey on the chart is chosen as a linear reflectance R
// relative to the paper's white (0 = no light reflected, 1 = paper) and
// written as the 8-bit sRGB code round(255 * sRGB(R)), sRGB the encoding of
// IEC 61966-2-1, in all three writers. A printer that honours sRGB then
// prints the intended reflectances; a real print's tone curve is unknown and
// departs from it, which scales the printed contrast and bends a sine
// slightly out of shape. Neither matters to the analysis: an edge's MTF is
// normalised by its own two plateaus, and a sine pattern's modulation is
// normalised by the sheet's own low-frequency reference (the reference
// grating, and the stars' outer rim), which went through the same tone
// curve.

// printCode returns the 8-bit sRGB code of linear reflectance r (clamped to
// [0, 1]).
func printCode(r float64) uint8 {
	v := srgb.FromLinear(math.Min(math.Max(r, 0), 1))
	return uint8(math.Round(255 * v))
}

// Draw draws the layout on c, whose user units must be the file's page
// millimetres (as draw.NewPDF, draw.NewSVG(w, h, "mm") and draw.NewRaster
// with dpi/25.4 pixels per unit give).
func (l *Layout) Draw(c draw.Canvas) {
	d := l.Design
	dark := color.Gray{Y: printCode(l.DarkReflectance())}
	k := l.UnitMM * l.Scale // file mm per chart unit
	xy := func(x, y float64) (float64, float64) { return l.FileXY(l.PageXY(x, y)) }

	draw.BeginGroup(c, "squares", "slanted-edge squares")
	var p draw.Path
	for _, q := range d.Squares {
		if !l.onPiece(q.X, q.Y) {
			continue
		}
		p.Reset()
		cs := q.Corners()
		pts := make([]float64, 0, 8)
		for _, v := range cs {
			x, y := xy(v[0], v[1])
			pts = append(pts, x, y)
		}
		p.Polygon(pts...)
		c.Path(&p, draw.Style{Fill: dark})
	}
	draw.EndGroup(c)

	draw.BeginGroup(c, "marks", "recognition marks")
	black := color.Gray{Y: 0}
	for _, m := range d.Marks {
		if l.Piece != nil && m.Sheet != l.pieceIndex() {
			continue
		}
		cx, cy := xy(m.X, m.Y)
		r := m.R * k
		p.Reset()
		p.Circle(cx, cy, DiscOfR*r)
		for _, run := range m.DarkRuns() {
			annularSector(&p, cx, cy, RingInOfR*r, RingOutOfR*r, run[0], run[1])
		}
		c.Path(&p, draw.Style{Fill: black})
	}
	draw.EndGroup(c)

	draw.BeginGroup(c, "wedge", "grey steps for the tone curve")
	for k, r := range d.Wedge.Steps {
		if !l.onPiece(d.Wedge.X, d.Wedge.Y) {
			break
		}
		x, y, pw, ph := d.Wedge.Patch(k)
		p.Reset()
		x0, y0 := xy(x-pw/2, y-ph/2)
		x1, y1 := xy(x+pw/2, y+ph/2)
		p.Polygon(x0, y0, x1, y0, x1, y1, x0, y1)
		c.Path(&p, draw.Style{Fill: color.Gray{Y: printCode(r)}})
	}
	draw.EndGroup(c)

	draw.BeginGroup(c, "sine", "sine stars and gratings")
	for _, s := range d.Stars {
		if l.onPiece(s.X, s.Y) {
			l.drawPattern(c, starPattern(l, s))
		}
	}
	for _, g := range d.Gratings {
		if l.onPiece(g.X, g.Y) {
			l.drawPattern(c, gratingPattern(l, g))
		}
	}
	draw.EndGroup(c)

	draw.BeginGroup(c, "frame", "corner marks of the chart frame")
	l.drawCorners(c)
	draw.EndGroup(c)
	if l.Piece != nil {
		draw.BeginGroup(c, "guides", "cutting and assembly guides")
		l.drawGuides(c)
		draw.EndGroup(c)
	}
	draw.BeginGroup(c, "ruler", "100 mm and 4 inch rulers")
	l.drawRulers(c)
	draw.EndGroup(c)
	draw.BeginGroup(c, "text", "chart information")
	for i, t := range l.Lines {
		x, y := l.FileXY(l.TextAt[0], l.TextAt[1]+float64(i)*lineStepMM)
		c.Text(x, y, t, draw.TextStyle{Size: l.TextSizeMM * l.Scale, Bold: i == 0})
	}
	draw.EndGroup(c)
}

// annularSector adds the closed region between radii r0 < r1 about (cx, cy)
// from angle a0 to a1 degrees (a0 < a1, increasing clockwise on the page),
// the arcs as cubic Béziers of at most 45 degrees each.
func annularSector(p *draw.Path, cx, cy, r0, r1, a0, a1 float64) {
	if a1-a0 >= 360-1e-9 {
		// A whole ring: the outer circle one way, the inner the other, so
		// the non-zero winding rule leaves the hole.
		addArc(p, cx, cy, r1, 0, 360, true)
		p.Close()
		addArc(p, cx, cy, r0, 360, 0, true)
		p.Close()
		return
	}
	a := a0 * math.Pi / 180
	p.MoveTo(cx+r1*math.Cos(a), cy+r1*math.Sin(a))
	addArc(p, cx, cy, r1, a0, a1, false)
	b := a1 * math.Pi / 180
	p.LineTo(cx+r0*math.Cos(b), cy+r0*math.Sin(b))
	addArc(p, cx, cy, r0, a1, a0, false)
	p.Close()
}

// addArc adds a circular arc from angle a0 to a1 degrees (either direction)
// as cubic Béziers of at most 45 degrees, with the control-point distance
// 4/3 tan(theta/4) r that makes each piece meet the circle at its ends and
// middle (a standard construction). With move set it starts a new subpath.
func addArc(p *draw.Path, cx, cy, r, a0, a1 float64, move bool) {
	n := int(math.Ceil(math.Abs(a1-a0) / 45))
	if n == 0 {
		return
	}
	step := (a1 - a0) / float64(n) * math.Pi / 180
	h := 4.0 / 3 * math.Tan(step/4) * r
	t := a0 * math.Pi / 180
	if move {
		p.MoveTo(cx+r*math.Cos(t), cy+r*math.Sin(t))
	}
	for range n {
		s0, c0 := math.Sincos(t)
		s1, c1 := math.Sincos(t + step)
		p.CubicTo(cx+r*c0-h*s0, cy+r*s0+h*c0, cx+r*c1+h*s1, cy+r*s1-h*c1, cx+r*c1, cy+r*s1)
		t += step
	}
}

// drawCorners draws an L-shaped mark just outside each corner of the chart
// frame, its arms along the frame's sides.
func (l *Layout) drawCorners(c draw.Canvas) {
	w, h := l.ChartMM()
	var p draw.Path
	for _, s := range [4][2]float64{{-1, -1}, {1, -1}, {1, 1}, {-1, 1}} {
		if !l.onPiece(s[0]*l.Design.W/2, s[1]*l.Design.H/2) {
			continue
		}
		vx := l.CentreMM[0] + s[0]*(w/2+cornerOffMM+cornerWidthMM/2)
		vy := l.CentreMM[1] + s[1]*(h/2+cornerOffMM+cornerWidthMM/2)
		ax, ay := l.FileXY(vx-s[0]*cornerMarkMM, vy)
		bx, by := l.FileXY(vx, vy)
		ex, ey := l.FileXY(vx, vy-s[1]*cornerMarkMM)
		p.MoveTo(ax, ay)
		p.LineTo(bx, by)
		p.LineTo(ex, ey)
	}
	c.Path(&p, draw.Style{Stroke: color.Gray{Y: 0}, Width: cornerWidthMM * l.Scale})
}

// drawRulers draws the 100 mm ruler (ticks rising from its baseline, every
// millimetre, longer every 5 and 10 mm, longest at 0 and 100 mm) and below
// it the 4 inch ruler (ticks hanging from its baseline every 1/16 inch).
func (l *Layout) drawRulers(c draw.Canvas) {
	x0, y0 := l.RulerMM0[0], l.RulerMM0[1]
	s := l.Scale
	black := color.Gray{Y: 0}
	var p draw.Path
	const tickW, lineW = 0.15, 0.2
	rect := func(xa, ya, xb, yb float64) {
		ax, ay := l.FileXY(xa, ya)
		bx, by := l.FileXY(xb, yb)
		p.Rect(ax, ay, bx-ax, by-ay)
	}
	// Millimetre ruler.
	rect(x0-tickW/2, y0-lineW/2, x0+rulerLenMM+tickW/2, y0+lineW/2)
	for i := 0; i <= rulerLenMM; i++ {
		n := 1.5
		switch {
		case i == 0 || i == rulerLenMM:
			n = RulerTickMM
		case i%10 == 0:
			n = 3.5
		case i%5 == 0:
			n = 2.5
		}
		x := x0 + float64(i)
		rect(x-tickW/2, y0-n, x+tickW/2, y0)
	}
	// Inch ruler.
	yi := y0 + 6
	rect(x0-tickW/2, yi-lineW/2, x0+inchLenMM+tickW/2, yi+lineW/2)
	for i := 0; i <= 64; i++ {
		n := 1.0
		switch {
		case i == 0 || i == 64:
			n = 4.5
		case i%16 == 0:
			n = 3.5
		case i%8 == 0:
			n = 2.8
		case i%4 == 0:
			n = 2.0
		case i%2 == 0:
			n = 1.5
		}
		x := x0 + float64(i)*25.4/16
		rect(x-tickW/2, yi, x+tickW/2, yi+n)
	}
	c.Path(&p, draw.Style{Fill: black})
	num := draw.TextStyle{Size: 2 * s, Anchor: draw.AnchorMiddle}
	for i := 0; i <= rulerLenMM; i += 10 {
		x, y := l.FileXY(x0+float64(i), y0+2.8)
		c.Text(x, y, strconv.Itoa(i), num)
	}
	for i := 0; i <= 4; i++ {
		x, y := l.FileXY(x0+float64(i)*25.4, yi-0.6)
		c.Text(x, y, strconv.Itoa(i), num)
	}
	unit := draw.TextStyle{Size: 2 * s}
	x, y := l.FileXY(x0+rulerLenMM+3, y0+2.8)
	c.Text(x, y, "mm", unit)
	x, y = l.FileXY(x0+inchLenMM+2, yi-0.6)
	c.Text(x, y, "in", unit)
}
