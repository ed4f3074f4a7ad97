package draw

import (
	"bytes"
	"encoding/base64"
	"image"
	"image/color"
	"image/png"
	"math"
	"strings"
)

// SVG is a Canvas that writes an SVG 1.1 document. Its width and height
// attributes carry the unit and its viewBox is in user units, so one user
// unit is one millimetre (or pixel) on the rendered page. Numbers have at
// most four decimals with trailing zeros trimmed, and the output depends only
// on the drawing calls (no dates, ids or random values).
type SVG struct {
	w, h   float64
	unit   string
	title  string
	body   bytes.Buffer
	depth  int // open groups
	images bool
	num    []byte
}

// NewSVG returns an empty SVG page of w x h user units, where unit is "mm"
// (printable pages) or "px" (plots for the screen). Another unit returns an
// UnsupportedError; a size that is not positive and finite, an ArgumentError.
func NewSVG(w, h float64, unit string) (*SVG, error) {
	if unit != "mm" && unit != "px" {
		return nil, UnsupportedError("SVG unit " + unit + " (want mm or px)")
	}
	if err := checkPage(w, h); err != nil {
		return nil, err
	}
	return &SVG{w: w, h: h, unit: unit}, nil
}

// SetTitle gives the whole picture an accessible name: the root element
// gets role="img" and aria-label, and a <title> child (SVG 1.1 §5.4).
func (c *SVG) SetTitle(title string) { c.title = cleanText(title) }

// Group opens a <g> element with the given id (omitted if empty); a
// non-empty title becomes its aria-label and <title>. It implements Grouper.
func (c *SVG) Group(id, title string) {
	c.body.WriteString("<g")
	if id = cleanText(id); id != "" {
		c.attr("id", id)
	}
	if title = cleanText(title); title != "" {
		c.attr("role", "group")
		c.attr("aria-label", title)
		c.body.WriteString("><title>")
		xmlEscape(&c.body, title)
		c.body.WriteString("</title>\n")
	} else {
		c.body.WriteString(">\n")
	}
	c.depth++
}

// End closes the innermost group opened by Group; it does nothing when no
// group is open. It implements Grouper.
func (c *SVG) End() {
	if c.depth > 0 {
		c.body.WriteString("</g>\n")
		c.depth--
	}
}

// attr writes ` name="value"` with value escaped.
func (c *SVG) attr(name, value string) {
	c.body.WriteByte(' ')
	c.body.WriteString(name)
	c.body.WriteString(`="`)
	xmlEscape(&c.body, value)
	c.body.WriteByte('"')
}

// numAttr writes ` name="v"` in the number format of appendNum.
func (c *SVG) numAttr(name string, v float64) {
	c.body.WriteByte(' ')
	c.body.WriteString(name)
	c.body.WriteString(`="`)
	c.num = appendNum(c.num[:0], v)
	c.body.Write(c.num)
	c.body.WriteByte('"')
}

// paint writes a colour attribute and its opacity when below 1.
func (c *SVG) paint(name string, col color.Color) {
	r, g, b, a := rgba8(col)
	const hex = "0123456789abcdef"
	c.body.WriteString(" " + name + `="#`)
	c.body.Write([]byte{hex[r>>4], hex[r&15], hex[g>>4], hex[g&15], hex[b>>4], hex[b&15]})
	c.body.WriteByte('"')
	if a < 1 {
		c.numAttr(name+"-opacity", a)
	}
}

// Path writes a <path> element (see Canvas).
func (c *SVG) Path(p *Path, s Style) {
	fill, stroke := s.fills(), s.strokes()
	if !fill && !stroke {
		return
	}
	c.num = c.num[:0]
	p.walk(func(v verb, xy []float64) {
		switch v {
		case moveTo:
			c.num = append(c.num, 'M')
		case lineTo:
			c.num = append(c.num, 'L')
		case cubicTo:
			c.num = append(c.num, 'C')
		case closeP:
			c.num = append(c.num, 'Z')
		}
		for i, x := range xy {
			if i > 0 {
				c.num = append(c.num, ' ')
			}
			c.num = appendNum(c.num, x)
		}
	})
	if len(c.num) == 0 {
		return
	}
	c.body.WriteString(`<path d="`)
	c.body.Write(c.num)
	c.body.WriteByte('"')
	if fill {
		c.paint("fill", s.Fill)
		if s.EvenOdd {
			c.body.WriteString(` fill-rule="evenodd"`)
		}
	} else {
		c.body.WriteString(` fill="none"`)
	}
	if stroke {
		c.paint("stroke", s.Stroke)
		c.numAttr("stroke-width", s.Width)
		if d := dashPattern(s.Dash); d != nil {
			c.num = c.num[:0]
			for i, v := range d {
				if i > 0 {
					c.num = append(c.num, ' ')
				}
				c.num = appendNum(c.num, v)
			}
			c.body.WriteString(` stroke-dasharray="`)
			c.body.Write(c.num)
			c.body.WriteByte('"')
		}
		switch s.Cap {
		case CapRound:
			c.body.WriteString(` stroke-linecap="round"`)
		case CapSquare:
			c.body.WriteString(` stroke-linecap="square"`)
		}
		switch s.Join {
		case JoinRound:
			c.body.WriteString(` stroke-linejoin="round"`)
		case JoinBevel:
			c.body.WriteString(` stroke-linejoin="bevel"`)
		}
	}
	c.body.WriteString("/>\n")
}

// Text writes a <text> element in the generic sans-serif family (see
// Canvas); text-anchor lets the viewer centre or end-align with the font it
// actually uses.
func (c *SVG) Text(x, y float64, text string, t TextStyle) {
	if !validText(x, y, t) || transparentText(t.Colour) {
		return
	}
	text = cleanText(text)
	c.body.WriteString("<text")
	c.numAttr("x", x)
	c.numAttr("y", y)
	c.numAttr("font-size", t.Size)
	if t.Bold {
		c.body.WriteString(` font-weight="bold"`)
	}
	switch t.Anchor {
	case AnchorMiddle:
		c.body.WriteString(` text-anchor="middle"`)
	case AnchorEnd:
		c.body.WriteString(` text-anchor="end"`)
	}
	if t.Colour != nil {
		c.paint("fill", t.Colour)
	}
	if a := math.Mod(t.Angle, 360); a != 0 {
		c.num = append(c.num[:0], "rotate("...)
		c.num = appendNum(c.num, a)
		c.num = append(c.num, ' ')
		c.num = appendNum(c.num, x)
		c.num = append(c.num, ' ')
		c.num = appendNum(c.num, y)
		c.num = append(c.num, ')')
		c.body.WriteString(` transform="`)
		c.body.Write(c.num)
		c.body.WriteByte('"')
	}
	if strings.HasPrefix(text, " ") || strings.HasSuffix(text, " ") || strings.Contains(text, "  ") {
		c.body.WriteString(` xml:space="preserve"`)
	}
	c.body.WriteByte('>')
	xmlEscape(&c.body, text)
	c.body.WriteString("</text>\n")
}

// Image writes an <image> element holding img as a base64 PNG data URI,
// stretched over the rectangle and drawn without smoothing (see Canvas).
func (c *SVG) Image(x, y, w, h float64, img image.Image) {
	if img == nil || img.Bounds().Empty() || !(finite(x) && finite(y) && w > 0 && h > 0 && finite(x+w) && finite(y+h)) {
		return
	}
	var buf bytes.Buffer
	if err := png.Encode(&buf, img); err != nil {
		return // image/png fails only on sizes that Bounds().Empty() excludes
	}
	c.images = true
	c.body.WriteString("<image")
	c.numAttr("x", x)
	c.numAttr("y", y)
	c.numAttr("width", w)
	c.numAttr("height", h)
	c.body.WriteString(` preserveAspectRatio="none" style="image-rendering:pixelated" xlink:href="data:image/png;base64,`)
	enc := base64.NewEncoder(base64.StdEncoding, &c.body)
	enc.Write(buf.Bytes())
	enc.Close()
	c.body.WriteString(`"/>` + "\n")
}

// Bytes returns the document, closing any group left open.
func (c *SVG) Bytes() []byte {
	var out bytes.Buffer
	out.WriteString(`<svg xmlns="http://www.w3.org/2000/svg"`)
	if c.images {
		out.WriteString(` xmlns:xlink="http://www.w3.org/1999/xlink"`)
	}
	n := appendNum(nil, c.w)
	out.WriteString(` width="` + string(n) + c.unit + `"`)
	n = appendNum(nil, c.h)
	out.WriteString(` height="` + string(n) + c.unit + `"`)
	n = append(appendNum([]byte("0 0 "), c.w), ' ')
	n = appendNum(n, c.h)
	out.WriteString(` viewBox="` + string(n) + `"`)
	out.WriteString(` font-family="sans-serif" stroke-miterlimit="10"`)
	if c.title != "" {
		out.WriteString(` role="img" aria-label="`)
		xmlEscape(&out, c.title)
		out.WriteString(`"><title>`)
		xmlEscape(&out, c.title)
		out.WriteString("</title>\n")
	} else {
		out.WriteString(">\n")
	}
	out.Write(c.body.Bytes())
	for range c.depth {
		out.WriteString("</g>\n")
	}
	out.WriteString("</svg>\n")
	return out.Bytes()
}

// xmlEscape writes s with the five XML special characters escaped, so it is
// safe in character data and in double-quoted attributes.
func xmlEscape(b *bytes.Buffer, s string) {
	for _, r := range s {
		switch r {
		case '<':
			b.WriteString("&lt;")
		case '>':
			b.WriteString("&gt;")
		case '&':
			b.WriteString("&amp;")
		case '"':
			b.WriteString("&quot;")
		case '\'':
			b.WriteString("&apos;")
		default:
			b.WriteRune(r)
		}
	}
}
