package chart

import (
	"archive/zip"
	"bytes"
	"errors"
	"fmt"
	"image/color"
	"strings"

	"sagitta/core/draw"
)

// Output formats accepted by Render.
const (
	FormatPDF = "pdf"
	FormatSVG = "svg"
	FormatPNG = "png"
)

// Render draws the chart for opt as a file in format "pdf", "svg" or "png"
// (case does not matter) and returns its bytes. Errors are in plain words:
// an OptionError for options that make no chart, a FormatError for an
// unknown format, and an OptionError when a PNG would be too large.
//
// A chart across several sheets (Options.Sheets) is one PDF with a page per
// sheet, or for SVG and PNG a ZIP archive holding one file per sheet, named
// as SheetFiles names them; Options.Sheet asks for one sheet's file.
func Render(opt Options, format string) ([]byte, error) {
	ls, err := NewSheets(opt)
	if err != nil {
		return nil, err
	}
	if opt.Sheet != 0 {
		if opt.Sheet < 0 || opt.Sheet > len(ls) {
			return nil, optErr("there is no sheet %d: the chart has %d", opt.Sheet, len(ls))
		}
		return ls[opt.Sheet-1].Render(format)
	}
	if len(ls) == 1 {
		return ls[0].Render(format)
	}
	if strings.EqualFold(strings.TrimPrefix(format, "."), FormatPDF) {
		c, err := draw.NewPDF(ls[0].PageW, ls[0].PageH)
		if err != nil {
			return nil, optErr("the sheet %g x %g mm cannot be a PDF page: %v", ls[0].PageW, ls[0].PageH, err)
		}
		for i, l := range ls {
			if i > 0 {
				c.NewPage()
			}
			l.Draw(c)
		}
		return c.Bytes(), nil
	}
	files, err := SheetFiles(ls, "chart", format)
	if err != nil {
		return nil, err
	}
	var buf bytes.Buffer
	z := zip.NewWriter(&buf)
	for _, f := range files {
		w, err := z.Create(f.Name)
		if err != nil {
			return nil, err
		}
		if _, err := w.Write(f.Bytes); err != nil {
			return nil, err
		}
	}
	if err := z.Close(); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// SheetFile is one sheet's file of a chart across several sheets.
type SheetFile struct {
	Name  string // base + "-" + the sheet's number + "." + format, e.g. "chart-1-2.svg"
	Bytes []byte
}

// SheetFiles renders each sheet's layout as its own file in format "svg",
// "png" or "pdf", named base-ROW-COLUMN.format.
func SheetFiles(ls []*Layout, base, format string) ([]SheetFile, error) {
	ext := strings.ToLower(strings.TrimPrefix(format, "."))
	out := make([]SheetFile, 0, len(ls))
	for _, l := range ls {
		b, err := l.Render(ext)
		if err != nil {
			return nil, err
		}
		name := base + "." + ext
		if l.Piece != nil {
			name = base + "-" + l.Piece.Name() + "." + ext
		}
		out = append(out, SheetFile{Name: name, Bytes: b})
	}
	return out, nil
}

// FormatError reports an output format Render does not write.
type FormatError string

func (e FormatError) Error() string {
	return "chart: unknown file format " + fmt.Sprintf("%q", string(e)) + " (choose pdf, svg or png)"
}

// Render draws the layout as a file in format "pdf", "svg" or "png".
//
//   - PDF: one page whose MediaBox is the sheet in points (ISO 32000-1, 1 pt
//     = 1/72 in), the squares, marks, rulers and corner marks as vector
//     paths, the sine patterns as 8-bit grey images at the printer's
//     resolution, the text in Helvetica.
//   - SVG: width and height in millimetres, the viewBox in millimetres,
//     the sine patterns as embedded PNG images.
//   - PNG: 8-bit grey, round(side mm x dpi / 25.4) pixels on each side
//     (draw.NewRaster's rounding: half away from zero), with a pHYs chunk
//     of round(dpi / 0.0254) pixels per metre (ISO/IEC 15948).
func (l *Layout) Render(format string) ([]byte, error) {
	switch strings.ToLower(strings.TrimPrefix(format, ".")) {
	case FormatPDF:
		c, err := draw.NewPDF(l.PageW, l.PageH)
		if err != nil {
			return nil, optErr("the sheet %g x %g mm cannot be a PDF page: %v", l.PageW, l.PageH, err)
		}
		l.Draw(c)
		return c.Bytes(), nil
	case FormatSVG:
		c, err := draw.NewSVG(l.PageW, l.PageH, "mm")
		if err != nil {
			return nil, optErr("the sheet %g x %g mm cannot be an SVG page: %v", l.PageW, l.PageH, err)
		}
		title := "Sagitta sharpness chart " + l.Design.Code.String()
		if l.Piece != nil {
			title += ", sheet " + l.Piece.Name()
		}
		c.SetTitle(title)
		l.Draw(c)
		return c.Bytes(), nil
	case FormatPNG:
		c, err := draw.NewRaster(l.PageW, l.PageH, l.DPI/draw.MMPerInch, color.GrayModel)
		if err != nil {
			var ae draw.ArgumentError
			if errors.As(err, &ae) {
				return nil, optErr("a PNG of %s at %g dpi is too large to make here: choose a lower resolution or the PDF", l.Paper, l.DPI)
			}
			return nil, err
		}
		l.Draw(c)
		var buf bytes.Buffer
		if err := draw.EncodePNG(&buf, c.Pixels(), l.DPI); err != nil {
			return nil, err
		}
		return buf.Bytes(), nil
	}
	return nil, FormatError(format)
}
