package draw

import (
	"image"
	"image/color"
	"math"

	"github.com/golang/freetype/raster"
	"golang.org/x/image/math/fixed"
)

// MaxRasterBytes bounds the pixel memory of one Raster (1 GiB): A3 at 1200
// dpi in grey (14031 x 19843 px) fits, A3 at 2880 dpi does not.
const MaxRasterBytes = 1 << 30

// Raster is a Canvas that renders into an anti-aliased *image.RGBA or
// *image.Gray. Coverage is the exact area of each pixel covered by a shape,
// as accumulated by github.com/golang/freetype/raster in 26.6 fixed point
// (1/64 px positions, 12-bit coverage), and is composited in sRGB values
// with the source-over operator, as PDF and SVG viewers do.
//
// Pixel (i, j) covers [i, i+1) x [j, j+1) in device pixels, and the user
// point (x, y) lies at device point (x*pxPerUnit, y*pxPerUnit).
type Raster struct {
	rgba  *image.RGBA
	gray  *image.Gray
	w, h  int
	scale float64 // pixels per user unit

	r      *raster.Rasterizer
	paint  painter
	a, b   polys // scratch polylines
	clip   []pt  // scratch for polygon clipping
	clip2  []pt
	stroke raster.Path
	cols   []int // scratch column table for images
}

// NewRaster returns a blank raster canvas for a page of w x h user units at
// pxPerUnit pixels per unit (dpi/25.4 for a page in millimetres, 1 for a
// plot in pixels). The image has round(w*pxPerUnit) x round(h*pxPerUnit)
// pixels (round half away from zero: A4 at 300 dpi is 2480 x 3508 px), so
// its last row and column may extend or cut the page by under half a pixel;
// the scale itself is exact.
//
// model selects the pixel type: color.RGBAModel gives an *image.RGBA that
// starts fully transparent; color.GrayModel gives an *image.Gray that
// starts white, like paper, at a quarter of the memory. Other models return
// an UnsupportedError; sizes that are not positive and finite, or a raster
// above MaxRasterBytes, return an ArgumentError.
func NewRaster(w, h, pxPerUnit float64, model color.Model) (*Raster, error) {
	if err := checkPage(w, h); err != nil {
		return nil, err
	}
	if !(pxPerUnit > 0 && pxPerUnit <= MaxCoord) {
		return nil, ArgumentError("pixels per unit " + fmtFloat(pxPerUnit) + " is not positive and finite")
	}
	fw, fh := math.Round(w*pxPerUnit), math.Round(h*pxPerUnit)
	bpp := 4.0
	if model == color.GrayModel {
		bpp = 1
	} else if model != color.RGBAModel {
		return nil, UnsupportedError("raster colour model other than color.RGBAModel or color.GrayModel")
	}
	if fw < 1 || fh < 1 || fw*fh*bpp > MaxRasterBytes {
		return nil, ArgumentError("raster of " + fmtFloat(fw) + " x " + fmtFloat(fh) + " px is empty or exceeds MaxRasterBytes")
	}
	c := &Raster{w: int(fw), h: int(fh), scale: pxPerUnit}
	r := image.Rect(0, 0, c.w, c.h)
	if bpp == 1 {
		c.gray = image.NewGray(r)
		for i := range c.gray.Pix {
			c.gray.Pix[i] = 0xff
		}
		c.paint.gray = c.gray
	} else {
		c.rgba = image.NewRGBA(r)
		c.paint.rgba = c.rgba
	}
	c.r = raster.NewRasterizer(c.w, c.h)
	return c, nil
}

// Pixels returns the image drawn so far: an *image.RGBA or an *image.Gray.
func (c *Raster) Pixels() image.Image {
	if c.gray != nil {
		return c.gray
	}
	return c.rgba
}

// PxPerUnit returns the scale, in pixels per user unit.
func (c *Raster) PxPerUnit() float64 { return c.scale }

// bounds returns the canvas rectangle in pixels.
func (c *Raster) bounds() rect { return rect{0, 0, float64(c.w), float64(c.h)} }

// grow returns r enlarged by m pixels on every side.
func grow(r rect, m float64) rect { return rect{r.x0 - m, r.y0 - m, r.x1 + m, r.y1 + m} }

// Path fills and strokes p (see Canvas).
func (c *Raster) Path(p *Path, s Style) {
	if s.fills() {
		c.a.reset()
		flatten(&c.a, p, c.scale, c.bounds())
		c.fill(&c.a, s.Fill, !s.EvenOdd)
	}
	if s.strokes() {
		c.strokePath(p, s)
	}
}

// fill rasterises the polylines of ps as closed polygons, clipped to the
// canvas, and paints them in colour col.
func (c *Raster) fill(ps *polys, col color.Color, nonZero bool) {
	c.r.Clear()
	c.r.UseNonZeroWinding = nonZero
	b := c.bounds()
	drawn := false
	for i := range ps.ends {
		line, _ := ps.get(i)
		if len(line) < 3 {
			continue
		}
		if outsideAny(b, line) {
			c.clip, c.clip2 = clipPolygon(c.clip, c.clip2, line, b)
			line = c.clip
			if len(line) < 3 {
				continue
			}
		}
		c.r.Start(fix(line[0]))
		for _, q := range line[1:] {
			c.r.Add1(fix(q))
		}
		c.r.Add1(fix(line[0]))
		drawn = true
	}
	if drawn {
		c.paint.setColour(col)
		c.r.Rasterize(&c.paint)
	}
}

// fix converts a point in pixels (inside the canvas or a small margin
// around it) to 26.6 fixed point, rounding to the nearest 1/64 px.
func fix(p pt) fixed.Point26_6 {
	return fixed.Point26_6{X: fixed.Int26_6(math.Round(p.x * 64)), Y: fixed.Int26_6(math.Round(p.y * 64))}
}

// unfix converts a 26.6 fixed-point point to pixels.
func unfix(p fixed.Point26_6) pt { return pt{float64(p.X) / 64, float64(p.Y) / 64} }

// strokePath strokes p: the path is flattened, dashed, clipped to the canvas
// plus a margin wider than any join or cap, outlined by freetype's
// raster.Stroke (with a miter joiner of our own, below) and filled with the
// non-zero rule, which unites overlapping parts of the outline.
func (c *Raster) strokePath(p *Path, s Style) {
	// A stroke wider than maxStrokePx is drawn that wide, which keeps the
	// stroker's 26.6 fixed point (about +-3.3e7 px) from overflowing.
	widthPx := math.Min(s.Width*c.scale, maxStrokePx)
	margin := widthPx/2*MiterLimit + 2
	clip := grow(c.bounds(), margin)
	c.a.reset()
	flatten(&c.a, p, c.scale, clip)
	c.b.reset()
	if d := dashPattern(s.Dash); d != nil && sum(d)*c.scale >= minDashPeriod {
		px := make([]float64, len(d))
		for i, v := range d {
			px[i] = v * c.scale
		}
		dashLines(&c.b, &c.a, px, clip, s.Cap != CapButt)
	} else {
		clipLines(&c.b, &c.a, clip)
	}
	var capper raster.Capper
	switch s.Cap {
	case CapRound:
		capper = raster.RoundCapper
	case CapSquare:
		capper = raster.SquareCapper
	default:
		capper = raster.ButtCapper
	}
	var joiner raster.Joiner
	switch s.Join {
	case JoinRound:
		joiner = raster.RoundJoiner
	case JoinBevel:
		joiner = raster.BevelJoiner
	default:
		joiner = raster.JoinerFunc(miterJoiner)
	}
	width := fixed.Int26_6(math.Round(widthPx * 64))
	c.a.reset()
	out := &outlineAdder{ps: &c.a, cull: grow(c.bounds(), 1)}
	for i := range c.b.ends {
		line, closed := c.b.get(i)
		c.stroke = c.stroke[:0]
		first := fix(line[0])
		last := first
		c.stroke.Start(first)
		n := 1
		for _, q := range line[1:] {
			if f := fix(q); f != last {
				c.stroke.Add1(f)
				last = f
				n++
			}
		}
		if closed && n > 1 && last == first {
			n-- // an explicit return to the start, then Close
			c.stroke = c.stroke[:len(c.stroke)-4]
		}
		if n == 1 {
			// A zero-length subpath: only its caps show.
			if s.Cap == CapButt {
				continue
			}
			c.stroke.Add1(first.Add(fixed.Point26_6{X: 1}))
		} else if closed && n > 2 {
			// Close, then run along the first segment again so that the
			// start gets a join rather than two caps (freetype caps every
			// subpath); the overlap is united by the non-zero rule.
			c.stroke.Add1(first)
			c.stroke.Add1(fixed.Point26_6{X: c.stroke[5], Y: c.stroke[6]})
		}
		raster.Stroke(out, c.stroke, width, capper, joiner)
	}
	c.fill(&c.a, s.Stroke, true)
}

// maxStrokePx is the widest stroke drawn, in pixels.
const maxStrokePx = 1e6

// sum returns the sum of d.
func sum(d []float64) float64 {
	s := 0.0
	for _, v := range d {
		s += v
	}
	return s
}

// miterJoiner joins two stroke segments with a miter, falling back to a
// bevel when the miter ratio exceeds MiterLimit (ISO 32000-1 §8.4.3.5).
// n0 and n1 are the segment normals of length halfWidth; the miter tip lies
// at pivot + k (n0 + n1) with k = u^2 / (u^2 + n0.n1), and the miter ratio
// is |tip|/u = u sqrt(2 / (u^2 + n0.n1)). The outer side is chosen as in
// freetype's RoundJoiner.
func miterJoiner(lhs, rhs raster.Adder, halfWidth fixed.Int26_6, pivot, n0, n1 fixed.Point26_6) {
	u := float64(halfWidth)
	a, b := unfixRaw(n0), unfixRaw(n1)
	dot := a.x*b.x + a.y*b.y
	den := u*u + dot
	miter := den > 0 && 2*u*u/den <= MiterLimit*MiterLimit
	var tip fixed.Point26_6
	if miter {
		k := u * u / den
		tip = fixed.Point26_6{X: fixed.Int26_6(math.Round(k * (a.x + b.x))), Y: fixed.Int26_6(math.Round(k * (a.y + b.y)))}
	}
	// Rotating n0 clockwise gives the incoming direction; a non-negative dot
	// product with n1 means the left-hand side is the outer side.
	if d0 := (fixed.Point26_6{X: -n0.Y, Y: n0.X}); int64(d0.X)*int64(n1.X)+int64(d0.Y)*int64(n1.Y) >= 0 {
		if miter {
			lhs.Add1(pivot.Add(tip))
		}
		lhs.Add1(pivot.Add(n1))
		rhs.Add1(pivot.Sub(n1))
	} else {
		lhs.Add1(pivot.Add(n1))
		if miter {
			rhs.Add1(pivot.Sub(tip))
		}
		rhs.Add1(pivot.Sub(n1))
	}
}

// unfixRaw converts a 26.6 vector to float64 without rescaling.
func unfixRaw(p fixed.Point26_6) pt { return pt{float64(p.X), float64(p.Y)} }

// outlineAdder receives the outline made by raster.Stroke and stores it as
// polylines in pixels, flattening its quadratic and cubic pieces.
type outlineAdder struct {
	ps   *polys
	cur  pt
	cull rect
}

func (o *outlineAdder) Start(a fixed.Point26_6) {
	o.cur = unfix(a)
	o.ps.start(o.cur)
	o.ps.close()
}
func (o *outlineAdder) Add1(b fixed.Point26_6) { o.cur = unfix(b); o.ps.add(o.cur) }
func (o *outlineAdder) Add2(b, c fixed.Point26_6) {
	e := unfix(c)
	addQuad(o.ps, o.cur, unfix(b), e)
	o.cur = e
}
func (o *outlineAdder) Add3(b, c, d fixed.Point26_6) {
	e := unfix(d)
	addCubic(o.ps, o.cur, unfix(b), unfix(c), e, o.cull)
	o.cur = e
}

// Text draws text with the Go fonts (see Canvas and TextWidth).
func (c *Raster) Text(x, y float64, text string, t TextStyle) {
	if !validText(x, y, t) || transparentText(t.Colour) {
		return
	}
	c.a.reset()
	textOutline(&c.a, x, y, text, t, c.scale)
	col := t.Colour
	if col == nil {
		col = color.Black
	}
	c.fill(&c.a, col, true)
}

// transparentText reports whether a text colour paints nothing (nil is
// black, not transparent).
func transparentText(col color.Color) bool { return col != nil && transparent(col) }
