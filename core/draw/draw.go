// Package draw is Sagitta's small vector-drawing interface, Canvas, with three
// writers that turn the same drawing calls into an SVG document, a PDF file
// and an anti-aliased raster image. Plots and the printable test chart draw
// through it, so one drawing function yields every output format.
//
// # Coordinates
//
// User units are chosen when a canvas is created: millimetres for pages that
// must be physically exact (charts), pixels for plots. The origin is the
// top-left corner of the page, x grows to the right and y grows down. Angles
// are in degrees measured from +x towards +y (clockwise on the page). Every
// writer maps a user coordinate to the same place: an edge at 37 mm lands at
// 37 mm in the SVG (viewBox in millimetres, width and height carrying the
// unit), in the PDF (a CTM of 72/25.4 pt per mm, ISO 32000-1 §8.3.2.3: 1 pt =
// 1/72 in) and in the raster (pxPerUnit = dpi/25.4 pixels per millimetre, with
// exact area coverage of the rasteriser).
//
// # Standards
//
//   - SVG 1.1, https://www.w3.org/TR/SVG11/ (paths, text, image, title).
//   - PDF, ISO 32000-1:2008 (PDF 1.7); https://opensource.adobe.com/dokuwiki/_media/pdf/pdfreference1.7old.pdf
//     mirrors its content. Text uses the standard Helvetica font with
//     WinAnsiEncoding (Annex D).
//   - PNG, ISO/IEC 15948:2004 §11.3.5.3 (pHYs); https://www.w3.org/TR/png/.
//   - Raster coverage: the area/coverage accumulation of
//     github.com/golang/freetype/raster (the FreeType "smooth" algorithm).
//
// # Text
//
// TextWidth is the one text metric for layout. It sums the advance widths of
// the Go Regular or Go Bold font (golang.org/x/image/font/gofont), without
// kerning. The raster writer draws those very fonts, so its text matches
// TextWidth exactly. The PDF writer uses the standard Helvetica fonts and
// places anchored text with TextWidth; measured with poppler's Helvetica
// metrics, Helvetica lines run 0 to 2 % shorter than TextWidth (digits are
// equal), so a centred PDF label can sit up to 1 % of its length off centre.
// The SVG names the generic family sans-serif and lets the viewer resolve
// anchors (text-anchor) with whatever font it picks, whose width may differ
// more.
package draw

import (
	"image"
	"image/color"
	"math"
	"strconv"
)

// Canvas receives drawing calls in user units (see the package doc). The
// three writers, *SVG, *PDF and *Raster, implement it; drawing code should
// depend on Canvas only.
//
// Non-finite coordinates never panic: a subpath with a point that is NaN,
// infinite or farther than MaxCoord from the origin is dropped by every
// writer, as is text or an image placed at such a point.
type Canvas interface {
	// Path fills and/or strokes p with style s. The fill is painted first,
	// then the stroke on top.
	Path(p *Path, s Style)
	// Text draws a single line of text with its baseline through y; the
	// anchor says whether x is the start, middle or end of the line.
	Text(x, y float64, text string, t TextStyle)
	// Image draws img stretched over the rectangle with top-left corner
	// (x, y) and size w x h in user units. Pixels are not interpolated
	// (nearest neighbour in every writer), so a chart can place a pattern
	// rasterised at the printer's resolution one sample per device pixel.
	Image(x, y, w, h float64, img image.Image)
}

// MaxCoord is the largest absolute coordinate, in user units, that a writer
// accepts; subpaths reaching beyond it are dropped (they lie far off any page).
const MaxCoord = 1e9

// MMPerInch is the number of millimetres in one inch (exact by definition).
const MMPerInch = 25.4

// PtPerMM is the number of PDF points in one millimetre: 1 pt = 1/72 in
// (ISO 32000-1 §8.3.2.3), so 72/25.4 = 2.834645669... pt/mm.
const PtPerMM = 72 / MMPerInch

// Cap is the shape drawn at the open ends of a stroked subpath and of each
// dash (ISO 32000-1 §8.4.3.3; SVG stroke-linecap).
type Cap uint8

// Line caps. The zero value is CapButt, the PDF and SVG default.
const (
	CapButt   Cap = iota // the stroke ends square at the end point
	CapRound             // a half disc of diameter Width beyond the end point
	CapSquare            // a half square of side Width beyond the end point
)

// Join is the shape drawn where two segments of a stroke meet
// (ISO 32000-1 §8.4.3.4; SVG stroke-linejoin).
type Join uint8

// Line joins. The zero value is JoinMiter, the PDF and SVG default; a miter
// longer than MiterLimit times the line width becomes a bevel.
const (
	JoinMiter Join = iota
	JoinRound
	JoinBevel
)

// MiterLimit is the miter limit used by every writer: the ratio of miter
// length to line width, 1/sin(phi/2) for segments meeting at angle phi,
// above which a miter join is drawn as a bevel. 10 is the PDF default
// (ISO 32000-1 §8.4.3.5); the SVG writer sets stroke-miterlimit to match.
const MiterLimit = 10

// Style says how a Path is painted.
type Style struct {
	// Fill and Stroke are the paint colours; nil means no fill or no
	// stroke. Colours are sRGB; alpha below opaque is honoured.
	Fill, Stroke color.Color
	// Width is the stroke width in user units. A stroke is drawn only when
	// Stroke is not nil and Width > 0.
	Width float64
	// Dash lists alternating dash and gap lengths in user units, starting
	// with a dash, and restarts at every subpath (as in PDF and SVG). An odd
	// count is repeated once to make it even; nil, a negative length or an
	// all-zero list means a solid line.
	Dash []float64
	// Cap and Join shape the stroke's ends and corners.
	Cap  Cap
	Join Join
	// EvenOdd selects the even-odd fill rule; the default is non-zero
	// winding (ISO 32000-1 §8.5.3.3).
	EvenOdd bool
}

// Anchor says which point of a line of text lies at the given x.
type Anchor uint8

// Text anchors.
const (
	AnchorStart  Anchor = iota // x is the start (left end) of the text
	AnchorMiddle               // x is the middle of the text
	AnchorEnd                  // x is the end (right end) of the text
)

// TextStyle says how Text is drawn.
type TextStyle struct {
	// Size is the em size (the font size) in user units.
	Size float64
	// Colour is the text colour; nil means opaque black.
	Colour color.Color
	// Anchor places the text horizontally around x.
	Anchor Anchor
	// Bold selects the bold face.
	Bold bool
	// Angle rotates the baseline about the anchor point, in degrees from +x
	// towards +y; -90 gives a y-axis title that reads from bottom to top.
	Angle float64
}

// Grouper is implemented by canvases that can group drawing calls under an
// id and an accessible title (the SVG writer). Use BeginGroup and EndGroup,
// which do nothing on other canvases.
type Grouper interface {
	// Group opens a group; title, if not empty, becomes its accessible name.
	Group(id, title string)
	// End closes the innermost open group.
	End()
}

// BeginGroup opens a group on c if c is a Grouper, else does nothing.
func BeginGroup(c Canvas, id, title string) {
	if g, ok := c.(Grouper); ok {
		g.Group(id, title)
	}
}

// EndGroup closes the innermost group on c if c is a Grouper.
func EndGroup(c Canvas) {
	if g, ok := c.(Grouper); ok {
		g.End()
	}
}

// ArgumentError reports a size, resolution or unit that cannot make a valid
// page (for example a negative width or a raster too large to allocate).
type ArgumentError string

func (e ArgumentError) Error() string { return "draw: invalid argument: " + string(e) }

// UnsupportedError reports a valid request that this package does not
// implement (for example an SVG unit other than mm or px).
type UnsupportedError string

func (e UnsupportedError) Error() string { return "draw: unsupported: " + string(e) }

// checkPage validates a page size in user units.
func checkPage(w, h float64) error {
	if !(w > 0 && h > 0 && w <= MaxCoord && h <= MaxCoord) {
		return ArgumentError("page size " + fmtFloat(w) + " x " + fmtFloat(h) + " is not positive and finite")
	}
	return nil
}

// fmtFloat formats v for error messages.
func fmtFloat(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// finite reports whether v is a usable coordinate.
func finite(v float64) bool { return v >= -MaxCoord && v <= MaxCoord }

// appendNum appends v with at most four decimals, trailing zeros trimmed and
// no exponent ("12.5", "-0.0001", "3"); it is the number format of the SVG
// and PDF writers (0.1 um at millimetre user units).
func appendNum(b []byte, v float64) []byte {
	n := len(b)
	b = strconv.AppendFloat(b, v, 'f', 4, 64)
	for b[len(b)-1] == '0' {
		b = b[:len(b)-1]
	}
	if b[len(b)-1] == '.' {
		b = b[:len(b)-1]
	}
	if string(b[n:]) == "-0" {
		b = append(b[:n], '0')
	}
	return b
}

// rgba8 returns the non-premultiplied 8-bit sRGB components of c and its
// alpha in [0, 1]. A nil colour is opaque black.
func rgba8(c color.Color) (r, g, b uint8, a float64) {
	if c == nil {
		return 0, 0, 0, 1
	}
	n := color.NRGBAModel.Convert(c).(color.NRGBA)
	return n.R, n.G, n.B, float64(n.A) / 255
}

// transparent reports whether c paints nothing (nil or zero alpha).
func transparent(c color.Color) bool {
	if c == nil {
		return true
	}
	_, _, _, a := c.RGBA()
	return a == 0
}

// dashPattern returns the normalised dash array of s (even length, all
// lengths >= 0, positive sum) or nil for a solid line.
func dashPattern(d []float64) []float64 {
	if len(d) == 0 {
		return nil
	}
	sum := 0.0
	for _, v := range d {
		if !(v >= 0) || math.IsInf(v, 0) {
			return nil
		}
		sum += v
	}
	if !(sum > 0) || math.IsInf(sum, 0) {
		return nil
	}
	if len(d)%2 == 1 {
		out := make([]float64, 0, 2*len(d))
		return append(append(out, d...), d...)
	}
	return d
}

// strokes reports whether s draws a stroke.
func (s *Style) strokes() bool { return !transparent(s.Stroke) && s.Width > 0 && s.Width <= MaxCoord }

// fills reports whether s draws a fill.
func (s *Style) fills() bool { return !transparent(s.Fill) }
