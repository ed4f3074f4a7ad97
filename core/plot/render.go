package plot

import (
	"image/color"
	"math"

	"sagitta/core/draw"
)

// Text sizes, px.
const (
	titleSize  = 16
	axisSize   = 12.5
	tickSize   = 11.5
	legendSize = 12
	noteSize   = 11.5
)

// Layout, px.
const (
	titleBand   = 40  // height reserved for the title
	noteLine    = 16  // height of one note line
	marginLeft  = 64  // panel: room for tick labels and the y title
	marginRight = 16  // panel: right margin
	marginBot   = 48  // panel: room for tick labels and the x title
	keyWidth    = 84  // room for a heat map's colour key
	legendRow   = 19  // height of one legend entry
	legendPad   = 12  // legend inset
	sampleLen   = 30  // length of a legend line sample
	minLegend   = 130 // narrowest legend column
	maxLegend   = 300 // widest legend column
)

var white = color.NRGBA{0xff, 0xff, 0xff, 0xff}

// box is a rectangle in px.
type box struct{ x0, y0, x1, y1 float64 }

func (b box) w() float64 { return b.x1 - b.x0 }
func (b box) h() float64 { return b.y1 - b.y0 }

// render draws the whole figure on c.
func (f *Figure) render(c draw.Canvas) {
	w, h := f.size()
	var p draw.Path
	p.Rect(0, 0, w, h)
	c.Path(&p, draw.Style{Fill: white})
	c.Text(16, 26, f.Title, draw.TextStyle{Size: titleSize, Bold: true, Colour: InkColour})

	notes := wrapLines(f.Notes, w-32, draw.TextStyle{Size: noteSize})
	nh := 0.0
	if len(notes) > 0 {
		nh = float64(len(notes))*noteLine + 8
	}
	lw, lh := f.legendWidth(), 0.0
	if f.LegendBelow {
		lw, lh = 0, f.legendRows(w)*legendRow+8
	}
	area := box{0, titleBand, w - lw, h - nh - lh}
	if n := len(f.Panels); n > 0 {
		cols := f.Columns
		if cols <= 0 || cols > n {
			cols = n
		}
		rows := (n + cols - 1) / cols
		pw, ph := area.w()/float64(cols), area.h()/float64(rows)
		for i, pn := range f.Panels {
			x0, y0 := area.x0+float64(i%cols)*pw, area.y0+float64(i/cols)*ph
			draw.BeginGroup(c, "", panelName(pn, i))
			pn.render(c, box{x0, y0, x0 + pw, y0 + ph})
			draw.EndGroup(c)
		}
	}
	if len(f.Legend) > 0 {
		draw.BeginGroup(c, "", "Legend")
		if f.LegendBelow {
			f.renderLegendRows(c, box{0, h - nh - lh, w, h - nh})
		} else {
			f.renderLegend(c, box{w - lw, titleBand, w, h - nh})
		}
		draw.EndGroup(c)
	}
	if len(notes) > 0 {
		draw.BeginGroup(c, "", "Notes")
		y := h - nh + 6 + noteLine*0.75
		for _, n := range notes {
			c.Text(16, y, n, draw.TextStyle{Size: noteSize, Colour: InkColour})
			y += noteLine
		}
		draw.EndGroup(c)
	}
}

func panelName(pn *Panel, i int) string {
	if pn.Title != "" {
		return pn.Title
	}
	if pn.Y.Title != "" && pn.X.Title != "" {
		return pn.Y.Title + " against " + pn.X.Title
	}
	return ""
}

// render draws the panel inside b.
func (pn *Panel) render(c draw.Canvas, b box) {
	top := 12.0
	if pn.Title != "" {
		top = 28
	}
	right := marginRight
	if pn.Heat != nil {
		right += keyWidth
	}
	pr := box{b.x0 + marginLeft, b.y0 + top, b.x1 - float64(right), b.y1 - marginBot}
	if pr.w() < 20 || pr.h() < 20 {
		return
	}
	dx, dy := math.Abs(pn.X.Max-pn.X.Min), math.Abs(pn.Y.Max-pn.Y.Min)
	if pn.EqualAspect && dx > 0 && dy > 0 {
		s := math.Min(pr.w()/dx, pr.h()/dy)
		nw, nh := s*dx, s*dy
		pr.x0 += (pr.w() - nw) / 2
		pr.x1 = pr.x0 + nw
		pr.y0 += (pr.h() - nh) / 2
		pr.y1 = pr.y0 + nh
	}
	m := mapping{pr: pr, x: pn.X, y: pn.Y}
	xt, xs := ticksOf(pn.X, pr.w()/90)
	yt, ys := ticksOf(pn.Y, pr.h()/65)

	var p draw.Path
	if pn.Heat == nil {
		for _, t := range xt {
			p.MoveTo(m.px(t), pr.y0)
			p.LineTo(m.px(t), pr.y1)
		}
		for _, t := range yt {
			p.MoveTo(pr.x0, m.py(t))
			p.LineTo(pr.x1, m.py(t))
		}
		c.Path(&p, draw.Style{Stroke: GridColour, Width: 1})
	} else {
		draw.BeginGroup(c, "", "Map cells")
		pn.Heat.render(c, m)
		draw.EndGroup(c)
	}
	for _, bd := range pn.Bands {
		draw.BeginGroup(c, "", bd.Name)
		bd.render(c, m)
		draw.EndGroup(c)
	}
	for _, r := range pn.Refs {
		r.render(c, m)
	}
	for _, s := range pn.Series {
		draw.BeginGroup(c, "", s.Name)
		s.render(c, m)
		draw.EndGroup(c)
	}
	var placed []box
	for _, mk := range pn.Marks {
		if m.inside(mk.X, mk.Y) {
			x, y := m.px(mk.X), m.py(mk.Y)
			drawMarker(c, x, y, mk.Marker, mk.Size, mk.Colour, false)
			if mk.Label != "" {
				placed = append(placed, label(c, x, y, mk.Size, mk.Label, pr, placed))
			}
		}
	}

	// Frame, ticks, labels and titles.
	p.Reset()
	p.Rect(pr.x0, pr.y0, pr.w(), pr.h())
	c.Path(&p, draw.Style{Stroke: InkColour, Width: 1})
	p.Reset()
	ts := draw.TextStyle{Size: tickSize, Colour: InkColour, Anchor: draw.AnchorMiddle}
	for _, t := range xt {
		x := m.px(t)
		p.MoveTo(x, pr.y1)
		p.LineTo(x, pr.y1+4)
		c.Text(x, pr.y1+17, tickLabel(t, xs), ts)
	}
	ts.Anchor = draw.AnchorEnd
	for _, t := range yt {
		y := m.py(t)
		p.MoveTo(pr.x0-4, y)
		p.LineTo(pr.x0, y)
		c.Text(pr.x0-7, y+4, tickLabel(t, ys), ts)
	}
	c.Path(&p, draw.Style{Stroke: InkColour, Width: 1})
	as := draw.TextStyle{Size: axisSize, Colour: InkColour, Anchor: draw.AnchorMiddle}
	c.Text((pr.x0+pr.x1)/2, pr.y1+38, pn.X.Title, as)
	as.Angle = -90
	c.Text(b.x0+16, (pr.y0+pr.y1)/2, pn.Y.Title, as)
	if pn.Title != "" {
		c.Text(pr.x0, pr.y0-9, pn.Title, draw.TextStyle{Size: axisSize, Colour: InkColour, Bold: true})
	}
	if pn.Heat != nil {
		draw.BeginGroup(c, "", "Colour key: "+pn.Heat.KeyTitle)
		pn.Heat.renderKey(c, box{pr.x1 + 16, pr.y0, pr.x1 + 30, pr.y1})
		draw.EndGroup(c)
	}
}

// ticksOf returns the axis's ticks (its own, or nice ones for about want).
func ticksOf(a Axis, want float64) ([]float64, float64) {
	lo, hi := math.Min(a.Min, a.Max), math.Max(a.Min, a.Max)
	if a.Ticks != nil {
		step := 1.0
		if len(a.Ticks) > 1 {
			step = math.Abs(a.Ticks[1] - a.Ticks[0])
		}
		var in []float64
		for _, t := range a.Ticks {
			if t >= lo-1e-9 && t <= hi+1e-9 {
				in = append(in, t)
			}
		}
		return in, step
	}
	return niceTicks(lo, hi, max(3, min(11, int(math.Round(want)))))
}

// mapping converts data coordinates to px inside a plot rectangle.
type mapping struct {
	pr   box
	x, y Axis
}

func (m mapping) px(v float64) float64 {
	t := (v - m.x.Min) / (m.x.Max - m.x.Min)
	if m.x.Reverse {
		t = 1 - t
	}
	return m.pr.x0 + t*m.pr.w()
}

func (m mapping) py(v float64) float64 {
	t := (v - m.y.Min) / (m.y.Max - m.y.Min)
	if m.y.Reverse {
		t = 1 - t
	}
	return m.pr.y1 - t*m.pr.h()
}

// inside reports whether the data point lies in the plot rectangle (with
// half a pixel of slack).
func (m mapping) inside(x, y float64) bool {
	px, py := m.px(x), m.py(y)
	return px >= m.pr.x0-0.5 && px <= m.pr.x1+0.5 && py >= m.pr.y0-0.5 && py <= m.pr.y1+0.5
}

// render draws the series: its line clipped to the plot rectangle, then its
// markers inside it.
func (s *Series) render(c draw.Canvas, m mapping) {
	n := min(len(s.X), len(s.Y))
	if s.Width > 0 {
		var p draw.Path
		var lx, ly float64
		pen := false
		for i := 1; i < n; i++ {
			if !finite(s.X[i-1], s.Y[i-1]) || !finite(s.X[i], s.Y[i]) {
				continue
			}
			ax, ay, bx, by, ok := clipSegment(m.px(s.X[i-1]), m.py(s.Y[i-1]), m.px(s.X[i]), m.py(s.Y[i]), m.pr)
			if !ok {
				continue
			}
			if !pen || ax != lx || ay != ly {
				p.MoveTo(ax, ay)
			}
			p.LineTo(bx, by)
			lx, ly, pen = bx, by, true
		}
		st := draw.Style{Stroke: s.Colour, Width: s.Width, Dash: s.Dash, Cap: draw.CapRound, Join: draw.JoinRound}
		if s.Dash != nil {
			st.Cap = draw.CapButt // round caps would close the gaps of thick dashes
		}
		c.Path(&p, st)
	}
	if s.Marker != NoMarker {
		size := s.MarkerSize
		if size <= 0 {
			size = 3.5
		}
		for i := 0; i < n; i++ {
			if finite(s.X[i], s.Y[i]) && m.inside(s.X[i], s.Y[i]) {
				drawMarker(c, m.px(s.X[i]), m.py(s.Y[i]), s.Marker, size, s.Colour, s.Open)
			}
		}
	}
}

// render fills the band between Lo and Hi, clipped to the plot rectangle.
func (bd *Band) render(c draw.Canvas, m mapping) {
	n := min(len(bd.X), len(bd.Lo), len(bd.Hi))
	var poly []pt
	for i := 0; i < n; i++ {
		if finite(bd.X[i], bd.Hi[i]) {
			poly = append(poly, pt{m.px(bd.X[i]), m.py(bd.Hi[i])})
		}
	}
	for i := n - 1; i >= 0; i-- {
		if finite(bd.X[i], bd.Lo[i]) {
			poly = append(poly, pt{m.px(bd.X[i]), m.py(bd.Lo[i])})
		}
	}
	poly = clipPolygon(poly, m.pr)
	if len(poly) < 3 {
		return
	}
	var p draw.Path
	p.MoveTo(poly[0].x, poly[0].y)
	for _, q := range poly[1:] {
		p.LineTo(q.x, q.y)
	}
	p.Close()
	c.Path(&p, draw.Style{Fill: bd.Colour})
}

// render draws the reference line and its label.
func (r *RefLine) render(c draw.Canvas, m mapping) {
	w := r.Width
	if w <= 0 {
		w = 1.2
	}
	var p draw.Path
	ts := draw.TextStyle{Size: tickSize, Colour: r.Colour}
	if r.Vertical {
		x := m.px(r.At)
		if x < m.pr.x0-0.5 || x > m.pr.x1+0.5 {
			return
		}
		p.MoveTo(x, m.pr.y0)
		p.LineTo(x, m.pr.y1)
		ts.Anchor = draw.AnchorEnd
		c.Path(&p, draw.Style{Stroke: r.Colour, Width: w, Dash: r.Dash})
		c.Text(x-4, m.pr.y0+14, r.Label, ts)
		return
	}
	y := m.py(r.At)
	if y < m.pr.y0-0.5 || y > m.pr.y1+0.5 {
		return
	}
	p.MoveTo(m.pr.x0, y)
	p.LineTo(m.pr.x1, y)
	c.Path(&p, draw.Style{Stroke: r.Colour, Width: w, Dash: r.Dash})
	if r.Label != "" {
		ts.Anchor = draw.AnchorEnd
		c.Text(m.pr.x1-4, y-4, r.Label, ts)
	}
}

// render paints the heat map's cells.
func (hm *HeatMap) render(c draw.Canvas, m mapping) {
	if hm.Cols <= 0 || hm.Rows <= 0 || len(hm.Values) < hm.Cols*hm.Rows {
		return
	}
	cw := (hm.X1 - hm.X0) / float64(hm.Cols)
	ch := (hm.Y1 - hm.Y0) / float64(hm.Rows)
	var p draw.Path
	for r := 0; r < hm.Rows; r++ {
		for col := 0; col < hm.Cols; col++ {
			x0, x1 := m.px(hm.X0+float64(col)*cw), m.px(hm.X0+float64(col+1)*cw)
			y0, y1 := m.py(hm.Y0+float64(r)*ch), m.py(hm.Y0+float64(r+1)*ch)
			p.Reset()
			// Cells overlap by a quarter pixel so anti-aliasing leaves no
			// hairline seams between them.
			p.Rect(math.Min(x0, x1)-0.125, math.Min(y0, y1)-0.125, math.Abs(x1-x0)+0.25, math.Abs(y1-y0)+0.25)
			c.Path(&p, draw.Style{Fill: hm.colour(hm.Values[r*hm.Cols+col])})
		}
	}
}

// colour maps a value onto the heat map's scale.
func (hm *HeatMap) colour(v float64) color.NRGBA {
	if math.IsNaN(v) {
		return MaskColour
	}
	t := 0.5
	if hm.Max > hm.Min {
		t = (v - hm.Min) / (hm.Max - hm.Min)
	}
	s := hm.Scale
	if s == nil {
		s = SharpnessScale
	}
	return s.At(t)
}

// renderKey draws the colour key as a vertical bar in b, low values at the
// bottom, with ticks and the key title.
func (hm *HeatMap) renderKey(c draw.Canvas, b box) {
	const steps = 64
	lo, hi := hm.Min, hm.Max
	if !(hi > lo) {
		lo, hi = lo-1, hi+1
	}
	var p draw.Path
	for i := 0; i < steps; i++ {
		y0 := b.y1 - b.h()*float64(i+1)/steps
		p.Reset()
		p.Rect(b.x0, y0-0.25, b.w(), b.h()/steps+0.5)
		c.Path(&p, draw.Style{Fill: hm.colour(lo + (hi-lo)*(float64(i)+0.5)/steps)})
	}
	p.Reset()
	p.Rect(b.x0, b.y0, b.w(), b.h())
	c.Path(&p, draw.Style{Stroke: InkColour, Width: 0.8})
	ticks, step := niceTicks(lo, hi, 5)
	p.Reset()
	ts := draw.TextStyle{Size: tickSize, Colour: InkColour}
	for _, t := range ticks {
		y := b.y1 - b.h()*(t-lo)/(hi-lo)
		p.MoveTo(b.x1, y)
		p.LineTo(b.x1+4, y)
		c.Text(b.x1+6, y+4, tickLabel(t, step), ts)
	}
	c.Path(&p, draw.Style{Stroke: InkColour, Width: 1})
	c.Text(b.x1+48, (b.y0+b.y1)/2, hm.KeyTitle, draw.TextStyle{Size: axisSize, Colour: InkColour, Anchor: draw.AnchorMiddle, Angle: -90})
}

// label writes a mark's label beside the point (x, y) px, above and to the
// right, or to the left when it would leave the plot rectangle pr, on a
// white ground so it stays readable over data; it moves a line at a time,
// alternately up and down, until it overlaps none of the labels already
// placed, and returns the box it took.
func label(c draw.Canvas, x, y, r float64, text string, pr box, placed []box) box {
	ts := draw.TextStyle{Size: tickSize, Colour: InkColour, Bold: true}
	w := textWidth(text, ts)
	tx, ty := x+r+4, y-r-3
	if tx+w > pr.x1-2 {
		tx = x - r - 4 - w
	}
	if ty-tickSize < pr.y0+2 {
		ty = y + r + 3 + tickSize
	}
	const step = tickSize + 4
	b := box{tx - 2, ty - tickSize + 1, tx + w + 2, ty + 4}
	for i := 0; i < 12; i++ {
		d := float64((i+1)/2) * step
		if i%2 == 1 {
			d = -d
		}
		try := box{b.x0, b.y0 + d, b.x1, b.y1 + d}
		if !overlapsAny(try, placed) && try.y0 >= pr.y0 && try.y1 <= pr.y1 {
			b, ty = try, ty+d
			break
		}
	}
	var p draw.Path
	p.Rect(b.x0, b.y0, b.w(), b.h())
	c.Path(&p, draw.Style{Fill: translucent(white, 0xd8)})
	c.Text(tx, ty, text, ts)
	return b
}

func overlapsAny(b box, bs []box) bool {
	for _, o := range bs {
		if b.x0 < o.x1 && o.x0 < b.x1 && b.y0 < o.y1 && o.y0 < b.y1 {
			return true
		}
	}
	return false
}

// drawMarker draws a marker of radius r at (x, y): filled with a thin white
// outline, or open (white inside, coloured ring).
func drawMarker(c draw.Canvas, x, y float64, mk Marker, r float64, col color.NRGBA, open bool) {
	var p draw.Path
	switch mk {
	case Circle:
		p.Circle(x, y, r)
	case Triangle:
		p.Polygon(x, y-1.3*r, x+1.15*r, y+0.7*r, x-1.15*r, y+0.7*r)
	case Square:
		p.Rect(x-0.9*r, y-0.9*r, 1.8*r, 1.8*r)
	case Diamond:
		p.Polygon(x, y-1.3*r, x+1.3*r, y, x, y+1.3*r, x-1.3*r, y)
	case Cross:
		p.MoveTo(x-r, y)
		p.LineTo(x+r, y)
		p.MoveTo(x, y-r)
		p.LineTo(x, y+r)
		c.Path(&p, draw.Style{Stroke: white, Width: 4.5, Cap: draw.CapRound})
		c.Path(&p, draw.Style{Stroke: col, Width: 2, Cap: draw.CapRound})
		return
	default:
		return
	}
	if open {
		c.Path(&p, draw.Style{Fill: white, Stroke: col, Width: 1.4})
		return
	}
	c.Path(&p, draw.Style{Fill: col, Stroke: white, Width: 0.7})
}

// finite reports whether both coordinates are finite numbers.
func finite(x, y float64) bool {
	return !math.IsNaN(x) && !math.IsNaN(y) && !math.IsInf(x, 0) && !math.IsInf(y, 0)
}

// fontSlack is how much wider than the Go fonts (which the PNG uses and
// draw.TextWidth measures) text is allowed to run: the SVG names the
// generic sans-serif family, and common sans-serif fonts set the same text
// up to about 12 % wider.
const fontSlack = 1.12

// textWidth is the width of text for layout, px, with fontSlack.
func textWidth(text string, ts draw.TextStyle) float64 {
	return fontSlack * draw.TextWidth(text, ts)
}
