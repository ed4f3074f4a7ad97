package draw

import (
	"math"
	"strings"
	"sync"
	"unicode/utf8"

	"github.com/golang/freetype/truetype"
	"golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/math/fixed"
)

// face is one parsed Go font with a cache of glyph outlines in font units.
type face struct {
	f    *truetype.Font
	upem float64 // font units per em

	mu     sync.Mutex
	glyphs map[truetype.Index]*outline
	buf    truetype.GlyphBuf
}

var (
	facesOnce sync.Once
	faces     [2]*face // regular, bold
)

// faceFor returns the Go Regular or Go Bold face. The fonts are embedded in
// the binary, so a parse failure is a build defect and panics.
func faceFor(bold bool) *face {
	facesOnce.Do(func() {
		for i, ttf := range [][]byte{goregular.TTF, gobold.TTF} {
			f, err := truetype.Parse(ttf)
			if err != nil {
				panic("draw: embedded Go font does not parse: " + err.Error())
			}
			faces[i] = &face{f: f, upem: float64(f.FUnitsPerEm()), glyphs: map[truetype.Index]*outline{}}
		}
	})
	if bold {
		return faces[1]
	}
	return faces[0]
}

// advance returns the advance width of glyph i in font units.
func (fc *face) advance(i truetype.Index) float64 {
	// With scale = units per em (as a raw 26.6 value), HMetric's scaling
	// scale*v/upem is the identity, so the raw value is in font units.
	return float64(fc.f.HMetric(fixed.Int26_6(fc.f.FUnitsPerEm()), i).AdvanceWidth)
}

// cleanText makes s safe for every writer (and valid XML 1.0 character
// data): invalid UTF-8 and the non-characters U+FFFE and U+FFFF become
// U+FFFD, and control characters (C0, DEL, C1) become spaces.
func cleanText(s string) string {
	bad := !utf8.ValidString(s)
	for _, r := range s {
		if control(r) || r == 0xFFFE || r == 0xFFFF {
			bad = true
			break
		}
	}
	if !bad {
		return s
	}
	s = strings.ToValidUTF8(s, "\uFFFD")
	return strings.Map(func(r rune) rune {
		switch {
		case control(r):
			return ' '
		case r == 0xFFFE || r == 0xFFFF:
			return 0xFFFD
		}
		return r
	}, s)
}

// control reports whether r is a C0 or C1 control character or DEL.
func control(r rune) bool { return r < 0x20 || (r >= 0x7f && r < 0xa0) }

// textUnits returns the advance width of s in font units of face fc.
func textUnits(fc *face, s string) float64 {
	w := 0.0
	for _, r := range s {
		w += fc.advance(fc.f.Index(r))
	}
	return w
}

// TextWidth returns the advance width of text in user units when drawn with
// t's Size and Bold: the sum of the Go font's advance widths, without kerning
// (see the package doc for how the writers use it). It returns 0 for a size
// that is not positive and finite.
func TextWidth(text string, t TextStyle) float64 {
	if !(t.Size > 0 && t.Size <= MaxCoord) {
		return 0
	}
	fc := faceFor(t.Bold)
	return textUnits(fc, cleanText(text)) * t.Size / fc.upem
}

// anchorShift returns how far the start of a line of width w lies before
// the anchor point.
func anchorShift(a Anchor, w float64) float64 {
	switch a {
	case AnchorMiddle:
		return w / 2
	case AnchorEnd:
		return w
	}
	return 0
}

// validText reports whether a Text call can be drawn.
func validText(x, y float64, t TextStyle) bool {
	return finite(x) && finite(y) && t.Size > 0 && t.Size <= MaxCoord && finite(t.Angle)
}

// outline is a glyph outline in font units, y up: a sequence of contours,
// each a start point followed by lines and quadratic Béziers, implicitly
// closed.
type outline struct {
	verbs []verb // moveTo, lineTo, or quadTo (stored as cubicTo's slot)
	xy    []float64
}

// quadTo marks a quadratic segment in an outline (control point, end point).
const quadTo = cubicTo

// glyph returns the outline of glyph i, loading and caching it.
func (fc *face) glyph(i truetype.Index) *outline {
	fc.mu.Lock()
	defer fc.mu.Unlock()
	if o, ok := fc.glyphs[i]; ok {
		return o
	}
	o := &outline{}
	// scale = units per em gives points in font units (see advance).
	if err := fc.buf.Load(fc.f, fixed.Int26_6(fc.f.FUnitsPerEm()), i, font.HintingNone); err == nil {
		start := 0
		for _, end := range fc.buf.Ends {
			o.addContour(fc.buf.Points[start:end])
			start = end
		}
	}
	fc.glyphs[i] = o
	return o
}

// addContour converts one TrueType contour of on- and off-curve points into
// lines and quadratic segments. Two consecutive off-curve points imply an
// on-curve point midway between them (Apple TrueType Reference Manual,
// chapter 6, 'glyf' table).
func (o *outline) addContour(ps []truetype.Point) {
	n := len(ps)
	if n == 0 {
		return
	}
	on := func(k int) bool { return ps[k%n].Flags&1 != 0 }
	xy := func(k int) (float64, float64) { return float64(ps[k%n].X), float64(ps[k%n].Y) }
	// Start at an on-curve point, or midway between two off-curve ones.
	first := -1
	for k := range n {
		if on(k) {
			first = k
			break
		}
	}
	var sx, sy float64
	if first >= 0 {
		sx, sy = xy(first)
	} else {
		x0, y0 := xy(0)
		x1, y1 := xy(1)
		sx, sy, first = (x0+x1)/2, (y0+y1)/2, 0
	}
	o.verbs = append(o.verbs, moveTo)
	o.xy = append(o.xy, sx, sy)
	// Visit the other points in order, then return to the start point.
	cnt := n - 1
	if !on(first) {
		cnt = n // the synthesised start lies between points n-1... 0 and 1
	}
	var cx, cy float64 // pending off-curve control point
	pending := false
	for j := 1; j <= cnt+1; j++ {
		x, y, isOn := sx, sy, true
		if j <= cnt {
			x, y = xy(first + j)
			isOn = on(first + j)
		}
		switch {
		case !isOn:
			if pending {
				o.verbs = append(o.verbs, quadTo)
				o.xy = append(o.xy, cx, cy, (cx+x)/2, (cy+y)/2)
			}
			cx, cy, pending = x, y, true
		case pending:
			o.verbs = append(o.verbs, quadTo)
			o.xy = append(o.xy, cx, cy, x, y)
			pending = false
		default:
			o.verbs = append(o.verbs, lineTo)
			o.xy = append(o.xy, x, y)
		}
	}
}

// textOutline appends to ps the glyph outlines of text placed as Text(x, y,
// text, t) would draw it, in pixels at s pixels per user unit.
func textOutline(ps *polys, x, y float64, text string, t TextStyle, s float64) {
	fc := faceFor(t.Bold)
	text = cleanText(text)
	k := t.Size / fc.upem // user units per font unit
	sin, cos := math.Sincos(t.Angle * math.Pi / 180)
	pen := -anchorShift(t.Anchor, textUnits(fc, text))
	// A font-space point (u, v), y up, goes to the user-space point
	// (x, y) + u k (cos, sin) + v k (sin, -cos).
	tr := func(u, v float64) pt {
		u, v = (u+pen)*k, v*k
		return pt{(x + u*cos + v*sin) * s, (y + u*sin - v*cos) * s}
	}
	for _, r := range text {
		i := fc.f.Index(r)
		o := fc.glyph(i)
		var cur pt
		c := 0
		for _, v := range o.verbs {
			switch v {
			case moveTo:
				cur = tr(o.xy[c], o.xy[c+1])
				ps.start(cur)
				ps.close()
				c += 2
			case lineTo:
				cur = tr(o.xy[c], o.xy[c+1])
				ps.add(cur)
				c += 2
			case quadTo:
				b, e := tr(o.xy[c], o.xy[c+1]), tr(o.xy[c+2], o.xy[c+3])
				addQuad(ps, cur, b, e)
				cur = e
				c += 4
			}
		}
		pen += fc.advance(i)
	}
}

// winAnsi maps the characters of Windows code page 1252 at 0x80-0x9F to
// their bytes; PDF's WinAnsiEncoding (ISO 32000-1 Annex D.2) uses that code
// page, and 0xA0-0xFF equal Latin-1. Checked against Python's cp1252 codec.
var winAnsi = map[rune]byte{
	0x20AC: 0x80, 0x201A: 0x82, 0x0192: 0x83, 0x201E: 0x84, 0x2026: 0x85,
	0x2020: 0x86, 0x2021: 0x87, 0x02C6: 0x88, 0x2030: 0x89, 0x0160: 0x8A,
	0x2039: 0x8B, 0x0152: 0x8C, 0x017D: 0x8E, 0x2018: 0x91, 0x2019: 0x92,
	0x201C: 0x93, 0x201D: 0x94, 0x2022: 0x95, 0x2013: 0x96, 0x2014: 0x97,
	0x02DC: 0x98, 0x2122: 0x99, 0x0161: 0x9A, 0x203A: 0x9B, 0x0153: 0x9C,
	0x017E: 0x9E, 0x0178: 0x9F,
}

// toWinAnsi encodes cleaned text for a PDF string in WinAnsiEncoding.
// Characters outside it become '?', except U+2212 MINUS SIGN, which becomes
// the hyphen-minus '-'.
func toWinAnsi(dst []byte, s string) []byte {
	for _, r := range s {
		switch {
		case r < 0x80 || (r >= 0xA0 && r <= 0xFF):
			dst = append(dst, byte(r))
		case r == 0x2212:
			dst = append(dst, '-')
		default:
			if b, ok := winAnsi[r]; ok {
				dst = append(dst, b)
			} else {
				dst = append(dst, '?')
			}
		}
	}
	return dst
}
