package draw

import (
	"bytes"
	"compress/zlib"
	"fmt"
	"image"
	"image/color"
	"math"
	"strconv"
	"strings"
)

// PDF is a Canvas that writes a PDF 1.7 file (ISO 32000-1) with one or more
// pages of the same size, using the standard library only.
//
// Each page's MediaBox is the page size in points (1 pt = 1/72 in, so A4,
// 210 x 297 mm, is [0 0 595.2756 841.8898]) and its content stream starts
// with the CTM [k 0 0 -k 0 H] with k = 72/25.4 pt/mm and H the page height in
// points, so the drawing calls are in millimetres with y down. Paths become
// m/l/c/h with f, f*, S, B or B*; colours are DeviceRGB (rg/RG); text uses
// the standard Helvetica and Helvetica-Bold fonts (Type1, WinAnsiEncoding,
// not embedded); images become Flate-compressed 8-bit DeviceGray or
// DeviceRGB image XObjects, with a DeviceGray soft mask when they have
// transparency. Content streams are Flate-compressed and the output is
// deterministic: it has no date and depends only on the drawing calls.
//
// Text is placed with the Go font metrics of TextWidth: an anchored label is
// shifted by TextWidth (or half of it), and Helvetica's own glyph widths,
// which differ from the Go fonts' by a few per cent, set where the string
// actually ends.
type PDF struct {
	wMM, hMM float64
	pages    []*bytes.Buffer
	cur      *bytes.Buffer
	st       pdfState
	images   []pdfImage
	alphas   [][2]uint8 // ExtGState i+1 sets ca = alphas[i][0], CA = alphas[i][1] (/255)
	font     [2]bool    // Helvetica, Helvetica-Bold used
	num      []byte
}

// pdfState tracks the graphics state of the current page so that only
// changes are written. Its zero value is the PDF initial state (ISO 32000-1
// §8.4.1): black, solid, butt caps, miter joins, opaque; the line width is
// written before the first stroke of a page.
type pdfState struct {
	fill, stroke [3]uint8 // DeviceRGB colours
	width        float64  // line width in user units, valid if widthSet
	widthSet     bool
	dash         string // operand of the d operator, "" for solid
	cap          Cap
	join         Join
	alpha        [2]uint8 // 255 minus the fill and stroke alpha (0: opaque)
}

// pdfImage is a compressed image XObject.
type pdfImage struct {
	w, h  int
	gray  bool
	data  []byte // Flate-compressed samples
	smask []byte // Flate-compressed alpha samples, or nil
}

// minPagePt and maxPagePt are the smallest and largest page sides, in points, that PDF
// readers must support (ISO 32000-1 Annex C, Table C.1; from memory).
const minPagePt, maxPagePt = 3, 14400

// NewPDF returns a PDF with one empty page of wMM x hMM millimetres. Pages
// whose sides are outside 3 to 14400 pt (about 1.06 mm to 5.08 m) return an
// ArgumentError.
func NewPDF(wMM, hMM float64) (*PDF, error) {
	if !(wMM*PtPerMM >= minPagePt && hMM*PtPerMM >= minPagePt && wMM*PtPerMM <= maxPagePt && hMM*PtPerMM <= maxPagePt) {
		return nil, ArgumentError("PDF page " + fmtFloat(wMM) + " x " + fmtFloat(hMM) + " mm is outside 3..14400 pt")
	}
	c := &PDF{wMM: wMM, hMM: hMM}
	c.NewPage()
	return c, nil
}

// NewPage starts a new page of the same size; later drawing calls go to it.
func (c *PDF) NewPage() {
	c.cur = new(bytes.Buffer)
	c.pages = append(c.pages, c.cur)
	c.st = pdfState{}
	// The CTM: millimetres, y down, origin at the top-left corner.
	fmt.Fprintf(c.cur, "%s 0 0 -%s 0 %s cm\n", strconv.FormatFloat(PtPerMM, 'f', 10, 64),
		strconv.FormatFloat(PtPerMM, 'f', 10, 64), appendNum(nil, c.hMM*PtPerMM))
}

// Pages returns the number of pages.
func (c *PDF) Pages() int { return len(c.pages) }

// nums writes the numbers separated by spaces, then op and a newline.
func (c *PDF) nums(op string, vs ...float64) {
	c.num = c.num[:0]
	for _, v := range vs {
		c.num = appendNum(c.num, v)
		c.num = append(c.num, ' ')
	}
	c.num = append(c.num, op...)
	c.num = append(c.num, '\n')
	c.cur.Write(c.num)
}

// alpha8 quantises a colour's alpha to 8 bits.
func alpha8(col color.Color) uint8 {
	_, _, _, a := rgba8(col)
	return uint8(math.Round(a * 255))
}

// setAlpha selects the ExtGState with fill alpha fa and stroke alpha sa.
func (c *PDF) setAlpha(fa, sa uint8) {
	want := [2]uint8{255 - fa, 255 - sa} // stored as 0 = opaque
	if c.st.alpha == want {
		return
	}
	c.st.alpha = want
	k := [2]uint8{fa, sa}
	i := 0
	for i < len(c.alphas) && c.alphas[i] != k {
		i++
	}
	if i == len(c.alphas) {
		c.alphas = append(c.alphas, k)
	}
	fmt.Fprintf(c.cur, "/GS%d gs\n", i+1)
}

// setColour sets the fill (op "rg") or stroke (op "RG") colour.
func (c *PDF) setColour(col color.Color, stroke bool) {
	r, g, b, _ := rgba8(col)
	v := [3]uint8{r, g, b}
	cur, op := &c.st.fill, "rg"
	if stroke {
		cur, op = &c.st.stroke, "RG"
	}
	if *cur == v {
		return
	}
	*cur = v
	c.nums(op, float64(r)/255, float64(g)/255, float64(b)/255)
}

// Path writes the path and its painting operator (see Canvas).
func (c *PDF) Path(p *Path, s Style) {
	fill, stroke := s.fills(), s.strokes()
	if !fill && !stroke {
		return
	}
	var fa, sa uint8 = 255, 255
	if fill {
		c.setColour(s.Fill, false)
		fa = alpha8(s.Fill)
	}
	if stroke {
		c.setColour(s.Stroke, true)
		sa = alpha8(s.Stroke)
		if !c.st.widthSet || c.st.width != s.Width {
			c.st.width, c.st.widthSet = s.Width, true
			c.nums("w", s.Width)
		}
		dash := ""
		if d := dashPattern(s.Dash); d != nil {
			b := []byte{'['}
			for i, v := range d {
				if i > 0 {
					b = append(b, ' ')
				}
				b = appendNum(b, v)
			}
			dash = string(append(b, "] 0"...))
		}
		if dash != c.st.dash {
			c.st.dash = dash
			if dash == "" {
				dash = "[] 0"
			}
			c.cur.WriteString(dash + " d\n")
		}
		if s.Cap != c.st.cap {
			c.st.cap = s.Cap
			fmt.Fprintf(c.cur, "%d J\n", s.Cap)
		}
		if s.Join != c.st.join {
			c.st.join = s.Join
			fmt.Fprintf(c.cur, "%d j\n", s.Join)
		}
	}
	c.setAlpha(fa, sa)
	n := c.cur.Len()
	p.walk(func(v verb, xy []float64) {
		switch v {
		case moveTo:
			c.nums("m", xy...)
		case lineTo:
			c.nums("l", xy...)
		case cubicTo:
			c.nums("c", xy...)
		case closeP:
			c.cur.WriteString("h\n")
		}
	})
	if c.cur.Len() == n {
		return
	}
	op := "S"
	switch {
	case fill && stroke:
		op = "B"
	case fill:
		op = "f"
	}
	if fill && s.EvenOdd {
		op += "*"
	}
	c.cur.WriteString(op + "\n")
}

// Text writes a Helvetica text object (see Canvas and the type doc).
func (c *PDF) Text(x, y float64, text string, t TextStyle) {
	if !validText(x, y, t) || transparentText(t.Colour) {
		return
	}
	text = cleanText(text)
	col := t.Colour
	if col == nil {
		col = color.Black
	}
	c.setColour(col, false)
	c.setAlpha(alpha8(col), 255-c.st.alpha[1])
	f := 1
	if t.Bold {
		f = 2
	}
	c.font[f-1] = true
	// Text space: glyph x along (cos, sin), glyph y (up) along (sin, -cos)
	// in the y-down user space; the anchor shift moves back along x.
	sin, cos := math.Sincos(t.Angle * math.Pi / 180)
	d := anchorShift(t.Anchor, TextWidth(text, t))
	fmt.Fprintf(c.cur, "BT /F%d ", f)
	c.nums("Tf", t.Size)
	c.nums("Tm", cos, sin, sin, -cos, x-d*cos, y-d*sin)
	c.num = append(c.num[:0], '(')
	for _, b := range toWinAnsi(nil, text) {
		if b == '(' || b == ')' || b == '\\' {
			c.num = append(c.num, '\\')
		}
		c.num = append(c.num, b)
	}
	c.num = append(c.num, ") Tj ET\n"...)
	c.cur.Write(c.num)
}

// Image embeds img as an image XObject drawn over the rectangle (see
// Canvas). Interpolation is off (the PDF default), so viewers show the
// samples as blocks.
func (c *PDF) Image(x, y, w, h float64, img image.Image) {
	if img == nil || img.Bounds().Empty() || !(finite(x) && finite(y) && w > 0 && h > 0 && finite(x+w) && finite(y+h)) {
		return
	}
	c.images = append(c.images, encodePDFImage(img))
	c.cur.WriteString("q\n")
	if c.st.alpha != [2]uint8{} {
		// Constant alpha would also apply to the image; draw it opaque.
		saved := c.st.alpha
		c.setAlpha(255, 255)
		defer func() { c.st.alpha = saved }()
	}
	// Image space maps the unit square onto the image with its first row
	// at the top (ISO 32000-1 §8.9.4); the y-down CTM needs -h.
	c.nums("cm", w, 0, 0, -h, x, y+h)
	fmt.Fprintf(c.cur, "/Im%d Do\nQ\n", len(c.images))
}

// encodePDFImage compresses the samples of img: DeviceGray when every pixel
// is grey, DeviceRGB otherwise, plus alpha samples when any pixel is not
// opaque. Colours are not premultiplied (as PDF soft masks expect).
func encodePDFImage(img image.Image) pdfImage {
	b := img.Bounds()
	out := pdfImage{w: b.Dx(), h: b.Dy(), gray: true}
	opaque := true
	if g, ok := img.(*image.Gray); ok {
		var buf bytes.Buffer
		z := zlib.NewWriter(&buf)
		for y := b.Min.Y; y < b.Max.Y; y++ {
			i := g.PixOffset(b.Min.X, y)
			z.Write(g.Pix[i : i+b.Dx()])
		}
		z.Close()
		out.data = buf.Bytes()
		return out
	}
	for y := b.Min.Y; y < b.Max.Y && (out.gray || opaque); y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			n := color.NRGBAModel.Convert(img.At(x, y)).(color.NRGBA)
			if n.R != n.G || n.G != n.B {
				out.gray = false
			}
			if n.A != 255 {
				opaque = false
			}
		}
	}
	var data, mask bytes.Buffer
	z, zm := zlib.NewWriter(&data), zlib.NewWriter(&mask)
	row := make([]byte, 0, 3*b.Dx())
	arow := make([]byte, 0, b.Dx())
	for y := b.Min.Y; y < b.Max.Y; y++ {
		row, arow = row[:0], arow[:0]
		for x := b.Min.X; x < b.Max.X; x++ {
			n := color.NRGBAModel.Convert(img.At(x, y)).(color.NRGBA)
			if out.gray {
				row = append(row, n.R)
			} else {
				row = append(row, n.R, n.G, n.B)
			}
			arow = append(arow, n.A)
		}
		z.Write(row)
		if !opaque {
			zm.Write(arow)
		}
	}
	z.Close()
	zm.Close()
	out.data = data.Bytes()
	if !opaque {
		out.smask = mask.Bytes()
	}
	return out
}

// Bytes returns the PDF file. Object numbers: 1 catalog, 2 page tree,
// 3 shared resources, 4 document information, then fonts, images (each
// followed by its soft mask) and, per page, the page and its content stream.
func (c *PDF) Bytes() []byte {
	var out bytes.Buffer
	var offsets []int
	obj := func(body string) int {
		offsets = append(offsets, out.Len())
		fmt.Fprintf(&out, "%d 0 obj\n%s\nendobj\n", len(offsets), body)
		return len(offsets)
	}
	stream := func(dict string, data []byte) int {
		offsets = append(offsets, out.Len())
		fmt.Fprintf(&out, "%d 0 obj\n<< %s /Length %d >>\nstream\n", len(offsets), dict, len(data))
		out.Write(data)
		out.WriteString("\nendstream\nendobj\n")
		return len(offsets)
	}
	// The header's second line marks the file as binary (§7.5.2).
	out.WriteString("%PDF-1.7\n%\xe2\xe3\xcf\xd3\n")

	// Numbers are known in advance: fonts, images, then pages.
	next := 5
	var fontRefs []string
	for i := range c.font {
		if c.font[i] {
			fontRefs = append(fontRefs, fmt.Sprintf("/F%d %d 0 R", i+1, next))
			next++
		}
	}
	var imRefs []string
	for i, im := range c.images {
		imRefs = append(imRefs, fmt.Sprintf("/Im%d %d 0 R", i+1, next))
		next++
		if im.smask != nil {
			next++
		}
	}
	var kids []string
	for i := range c.pages {
		kids = append(kids, fmt.Sprintf("%d 0 R", next+2*i))
	}
	mediaBox := "[0 0 " + string(appendNum(nil, c.wMM*PtPerMM)) + " " + string(appendNum(nil, c.hMM*PtPerMM)) + "]"

	obj("<< /Type /Catalog /Pages 2 0 R >>")
	obj(fmt.Sprintf("<< /Type /Pages /Kids [%s] /Count %d >>", strings.Join(kids, " "), len(c.pages)))
	res := "<< /ProcSet [/PDF /Text /ImageB /ImageC]"
	if len(fontRefs) > 0 {
		res += " /Font << " + strings.Join(fontRefs, " ") + " >>"
	}
	if len(imRefs) > 0 {
		res += " /XObject << " + strings.Join(imRefs, " ") + " >>"
	}
	if len(c.alphas) > 0 {
		res += " /ExtGState <<"
		for i, a := range c.alphas {
			res += fmt.Sprintf(" /GS%d << /Type /ExtGState /ca %s /CA %s >>", i+1,
				appendNum(nil, float64(a[0])/255), appendNum(nil, float64(a[1])/255))
		}
		res += " >>"
	}
	obj(res + " >>")
	obj("<< /Producer (Sagitta) >>")
	for i, name := range []string{"Helvetica", "Helvetica-Bold"} {
		if c.font[i] {
			obj("<< /Type /Font /Subtype /Type1 /BaseFont /" + name + " /Encoding /WinAnsiEncoding >>")
		}
	}
	for _, im := range c.images {
		cs := "/DeviceRGB"
		if im.gray {
			cs = "/DeviceGray"
		}
		dict := fmt.Sprintf("/Type /XObject /Subtype /Image /Width %d /Height %d /ColorSpace %s /BitsPerComponent 8 /Filter /FlateDecode", im.w, im.h, cs)
		if im.smask != nil {
			dict += fmt.Sprintf(" /SMask %d 0 R", len(offsets)+2)
		}
		stream(dict, im.data)
		if im.smask != nil {
			stream(fmt.Sprintf("/Type /XObject /Subtype /Image /Width %d /Height %d /ColorSpace /DeviceGray /BitsPerComponent 8 /Filter /FlateDecode", im.w, im.h), im.smask)
		}
	}
	for _, p := range c.pages {
		obj(fmt.Sprintf("<< /Type /Page /Parent 2 0 R /MediaBox %s /Resources 3 0 R /Contents %d 0 R >>", mediaBox, len(offsets)+2))
		var z bytes.Buffer
		zw := zlib.NewWriter(&z)
		zw.Write(p.Bytes())
		zw.Close()
		stream("/Filter /FlateDecode", z.Bytes())
	}

	// Cross-reference table: 20-byte entries (§7.5.4), then the trailer.
	xref := out.Len()
	fmt.Fprintf(&out, "xref\n0 %d\n0000000000 65535 f\r\n", len(offsets)+1)
	for _, o := range offsets {
		fmt.Fprintf(&out, "%010d 00000 n\r\n", o)
	}
	fmt.Fprintf(&out, "trailer\n<< /Size %d /Root 1 0 R /Info 4 0 R >>\nstartxref\n%d\n%%%%EOF\n", len(offsets)+1, xref)
	return out.Bytes()
}
