package chart

import (
	"fmt"
	"math"
	"strings"
)

// Options are the user's choices for a printed chart. The zero value is a
// valid request: an A4 sheet in landscape, 10 mm margins, 600 dpi, a 3:2
// chart at 4:1 contrast, no scale correction. Every field has a JSON name so
// the web page can pass the options through unchanged.
type Options struct {
	// Paper is the sheet: "A4" (default), "A3", "A3+", "A2", "Letter",
	// "Tabloid" or "custom" (then PaperMM gives the size). Case and spaces
	// do not matter.
	Paper string `json:"paper,omitempty"`
	// PaperMM is the width and height of a custom sheet in millimetres, in
	// either order (Orientation decides which side is horizontal).
	PaperMM [2]float64 `json:"paper_mm,omitempty"`
	// Orientation is "landscape" (default: the long side of the sheet is
	// horizontal and the chart is wider than tall) or "portrait" (the chart
	// is taller than wide, for a camera held upright).
	Orientation string `json:"orientation,omitempty"`
	// Aspect is the chart's width to height ratio, matching the camera's
	// sensor so the chart can fill the frame: "3:2" (default), "4:3",
	// "16:9" or "1:1" (in portrait the chart is 2:3, 3:4, 9:16).
	Aspect string `json:"aspect,omitempty"`
	// MarginMM is the blank border kept on every side of the sheet, mm
	// (0 means the default, 10 mm; at least 3 mm, which most printers
	// need).
	MarginMM float64 `json:"margin_mm,omitempty"`
	// DPI is the printer's resolution in dots per inch (0 means 600). It
	// sets the pixel size of the PNG and of the raster parts (sine stars
	// and gratings) in the PDF and SVG.
	DPI float64 `json:"dpi,omitempty"`
	// Contrast is "4:1" (default: dark parts reflect a quarter of the
	// paper's light, as the 2014 and later editions of ISO 12233 advise
	// for edges) or "high" (black ink on white).
	Contrast string `json:"contrast,omitempty"`
	// RulerMM is the length the user measured on a printout of the 100 mm
	// ruler, in mm; 0 means no correction. The chart is then drawn 100 /
	// RulerMM times larger (or smaller) in the file, so that the same
	// printer, at the same settings, prints the ruler at 100 mm.
	RulerMM float64 `json:"ruler_measured_mm,omitempty"`
	// Sheets is "" or "1x1" for a chart on one sheet, "2x2" or "3x3" for a
	// larger chart drawn across that many sheets of Paper, to be cut and
	// assembled on a wall (tiling.go, sheets.go).
	Sheets string `json:"sheets,omitempty"`
	// Sheet, for a chart across sheets, asks Render for one sheet only:
	// 1 to N x N in reading order (the sheet "row-column" is (row - 1) N +
	// column); 0 means every sheet.
	Sheet int `json:"sheet,omitempty"`
}

// Paper sizes in millimetres, portrait (width <= height). ISO 216 for the A
// series; ANSI/ASME Y14.1 for Letter (8.5 x 11 in) and Tabloid (11 x 17 in).
// A3+ (also sold as Super B) is a trade size; its 329 x 483 mm is from
// memory.
var papers = []struct {
	name string
	w, h float64
}{
	{"A4", 210, 297},
	{"A3", 297, 420},
	{"A3+", 329, 483},
	{"A2", 420, 594},
	{"Letter", 8.5 * 25.4, 11 * 25.4},
	{"Tabloid", 11 * 25.4, 17 * 25.4},
}

// PaperNames lists the named sheets Options.Paper accepts, besides "custom".
func PaperNames() []string {
	out := make([]string, len(papers))
	for i, p := range papers {
		out[i] = p.name
	}
	return out
}

// Limits of the options.
const (
	DefaultMarginMM = 10
	MinMarginMM     = 3
	DefaultDPI      = 600
	MinDPI          = 100
	MaxDPI          = 2880
	// MinRulerMM and MaxRulerMM bound the measured ruler length: a
	// printout more than 20 % off is a wrong setting (fit to page, a
	// different paper) to fix in the print dialogue, not a correction.
	MinRulerMM = 80
	MaxRulerMM = 120
	// MinPaperMM and MaxPaperMM bound a custom sheet's sides.
	MinPaperMM = 100
	MaxPaperMM = 2000
)

// OptionError reports an option that cannot make a chart, in plain words.
type OptionError string

func (e OptionError) Error() string { return "chart: " + string(e) }

func optErr(format string, a ...any) error { return OptionError(fmt.Sprintf(format, a...)) }

// settings are Options resolved to numbers.
type settings struct {
	paperName      string
	pageW, pageH   float64 // sheet as printed, mm (after orientation)
	portrait       bool
	aspect         int // index into aspects
	margin         float64
	dpi            float64
	highContrast   bool
	rulerMM, scale float64 // measured ruler (0 if none) and the file scale 100/rulerMM
	sheets         int     // 0 for one sheet, 2 or 3 for N x N sheets
}

// resolve checks the options and fills in the defaults.
func (o Options) resolve() (settings, error) {
	var s settings
	name := strings.ToLower(strings.ReplaceAll(strings.TrimSpace(o.Paper), " ", ""))
	var w, h float64
	switch name {
	case "":
		s.paperName, w, h = papers[0].name, papers[0].w, papers[0].h
	case "custom":
		w, h = math.Min(o.PaperMM[0], o.PaperMM[1]), math.Max(o.PaperMM[0], o.PaperMM[1])
		if !(w >= MinPaperMM && h <= MaxPaperMM) {
			return s, optErr("a custom sheet needs both sides between %d and %d mm (got %g x %g mm)", MinPaperMM, MaxPaperMM, o.PaperMM[0], o.PaperMM[1])
		}
		s.paperName = fmt.Sprintf("%s x %s mm", trim(o.PaperMM[0]), trim(o.PaperMM[1]))
	default:
		for _, p := range papers {
			if strings.ToLower(p.name) == name {
				s.paperName, w, h = p.name, p.w, p.h
			}
		}
		if s.paperName == "" {
			return s, optErr("unknown paper %q (choose %s, or custom with a size in mm)", o.Paper, strings.Join(PaperNames(), ", "))
		}
	}
	switch strings.ToLower(strings.TrimSpace(o.Orientation)) {
	case "", "landscape":
		s.pageW, s.pageH = h, w
	case "portrait":
		s.pageW, s.pageH, s.portrait = w, h, true
	default:
		return s, optErr("unknown orientation %q (choose landscape or portrait)", o.Orientation)
	}
	s.aspect = -1
	a := strings.TrimSpace(o.Aspect)
	if a == "" {
		a = aspects[0].name
	}
	for i, as := range aspects {
		if as.name == a {
			s.aspect = i
		}
	}
	if s.aspect < 0 {
		return s, optErr("unknown aspect ratio %q (choose 3:2, 4:3, 16:9 or 1:1)", o.Aspect)
	}
	s.margin = o.MarginMM
	if s.margin == 0 {
		s.margin = DefaultMarginMM
	}
	if !(s.margin >= MinMarginMM) || 4*s.margin >= math.Min(w, h) {
		return s, optErr("margin %g mm is too small (at least %d mm) or leaves no room on the sheet", o.MarginMM, MinMarginMM)
	}
	s.dpi = o.DPI
	if s.dpi == 0 {
		s.dpi = DefaultDPI
	}
	if !(s.dpi >= MinDPI && s.dpi <= MaxDPI) {
		return s, optErr("printer resolution %g dpi is outside %d to %d dpi", o.DPI, MinDPI, MaxDPI)
	}
	switch strings.ToLower(strings.TrimSpace(o.Contrast)) {
	case "", "4:1":
	case "high":
		s.highContrast = true
	default:
		return s, optErr("unknown contrast %q (choose 4:1 or high)", o.Contrast)
	}
	switch strings.ToLower(strings.ReplaceAll(strings.TrimSpace(o.Sheets), " ", "")) {
	case "", "1x1", "1":
	case "2x2", "2":
		s.sheets = 2
	case "3x3", "3":
		s.sheets = 3
	default:
		return s, optErr("unknown sheet count %q (choose 1x1, 2x2 or 3x3)", o.Sheets)
	}
	s.scale = 1
	if o.RulerMM != 0 {
		if !(o.RulerMM >= MinRulerMM && o.RulerMM <= MaxRulerMM) {
			return s, optErr("a measured ruler of %g mm is more than 20 %% off 100 mm: print at 100 %% (no fit to page) and measure again", o.RulerMM)
		}
		s.rulerMM, s.scale = o.RulerMM, 100/o.RulerMM
	}
	return s, nil
}

// trim formats a length without needless decimals.
func trim(v float64) string { return strings.TrimSuffix(fmt.Sprintf("%.1f", v), ".0") }
