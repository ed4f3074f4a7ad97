// Package plot describes Sagitta's plots once and renders each description
// twice through core/draw: as SVG for the page (with an accessible title on
// the picture and on each group) and as PNG for export (text drawn with
// freetype by draw's raster writer). A Figure carries its data table too,
// for screen readers and CSV export.
//
// Builders make the plots of the project: FieldCurves (MTF at the field
// frequencies against the distance from the optical centre), Compare
// (several photos' field curves, one colour per photo), Map (the MTF50 map:
// MTF50 interpolated over the frame), Astigmatism (sagittal minus
// tangential) and Target (one target's ESF, LSF and MTF, with Nyquist and
// the perfect-lens reference).
//
// The visual code is the project's own (see colour.go): field frequencies
// and orientations in small panels on the same axes (one row per
// frequency, one column per orientation), one colour per photo when photos
// are compared, one marker shape per kind of target in every plot, one line
// weight, dashes only for reference curves, and a sequential colour scale designed in OKLab (B. Ottosson, 2020,
// https://bottosson.github.io/posts/oklab/) for maps. Axis ticks use the
// "nice numbers" rule of P. S. Heckbert, "Nice numbers for graph labels",
// Graphics Gems (1990) 61-63.
package plot

import (
	"bytes"
	"image/color"
	"image/png"

	"sagitta/core/draw"
)

// Figure is a plot description: a title, one or more panels side by side,
// a legend, notes under the panels and the data table. Coordinates of the
// rendered picture are px, origin top left.
type Figure struct {
	// Title is shown at the top and names the picture for assistive
	// technology.
	Title string
	// Description is one or two sentences on what the plot shows; it
	// completes the accessible name of the SVG.
	Description string
	// Width and Height are the size in px (CSS px in the SVG, pixels at
	// scale 1 in the PNG); zero means DefaultWidth x DefaultHeight.
	Width, Height float64
	// Panels are drawn left to right, sharing the width equally, in rows
	// of Columns panels (0: all in one row) sharing the height equally.
	Panels  []*Panel
	Columns int
	// Legend lists the visual code of the figure, top to bottom in a
	// column at the right, or left to right under the panels when
	// LegendBelow is set (for wide panels such as maps).
	Legend      []LegendEntry
	LegendBelow bool
	// Notes are short lines printed under the panels (what a reference
	// curve is, what grey cells mean).
	Notes []string
	// Data is the table behind the plot.
	Data Table
}

// Default figure size, px.
const (
	DefaultWidth  = 780
	DefaultHeight = 500
)

// Panel is one plot area with two axes.
type Panel struct {
	// Title is printed above the plot area (may be empty).
	Title string
	// X and Y are the axes.
	X, Y Axis
	// EqualAspect keeps one unit of x as long as one unit of y (maps).
	EqualAspect bool
	// Heat is an optional heat-map layer under everything else.
	Heat *HeatMap
	// Bands are filled uncertainty bands, drawn under the lines.
	Bands []Band
	// Refs are reference lines (zero, Nyquist).
	Refs []RefLine
	// Series are lines and/or markers, drawn in order.
	Series []Series
	// Marks are single annotated points (the optical centre, a maximum).
	Marks []Mark
}

// Axis is a linear axis. Its title carries the unit, e.g. "distance from
// the optical centre (mm)".
type Axis struct {
	Title    string
	Min, Max float64
	// Reverse puts Min at the top (for a y axis) or at the right (for x);
	// maps use it so that the photo is not mirrored.
	Reverse bool
	// Ticks, if not nil, are the tick positions; otherwise nice ticks
	// (Heckbert 1990) are chosen inside [Min, Max].
	Ticks []float64
}

// Marker is the shape drawn at a data point.
type Marker uint8

// Marker shapes. Each keeps one meaning in every plot: a kind of target
// (circle edge, triangle star, diamond grating), a value read off a curve
// (square: MTF50, the largest gap) or the optical centre (cross).
const (
	NoMarker Marker = iota
	Circle
	Triangle
	Square
	Diamond
	Cross
)

// EdgeMarker, StarMarker and GratingMarker are the shapes of the kinds of
// target; ReadingMarker marks a value read off a curve; CentreMarker marks
// the optical centre.
const (
	EdgeMarker    = Circle
	StarMarker    = Triangle
	GratingMarker = Diamond
	ReadingMarker = Square
	CentreMarker  = Cross
)

// TargetKinds lists the kinds of target in drawing order.
var TargetKinds = []string{"edge", "star", "grating"}

// KindMarker returns the marker shape for a target kind ("edge", "star",
// "grating").
func KindMarker(kind string) Marker {
	switch kind {
	case "star":
		return StarMarker
	case "grating":
		return GratingMarker
	}
	return EdgeMarker
}

// Series is a set of data points drawn as a line, as markers, or both.
// Points with a NaN coordinate break the line and draw no marker.
type Series struct {
	// Name is the accessible name of the series' group.
	Name string
	X, Y []float64
	// Colour of the line and markers.
	Colour color.NRGBA
	// Width is the line width, px; 0 draws no line.
	Width float64
	// Dash is the dash pattern, px (nil = solid).
	Dash []float64
	// Marker and MarkerSize (radius, px) of the points; Open draws a ring
	// instead of a filled shape.
	Marker     Marker
	MarkerSize float64
	Open       bool
}

// Band is a filled area between two curves over the same x.
type Band struct {
	Name      string
	X, Lo, Hi []float64
	Colour    color.NRGBA // usually translucent
}

// RefLine is a horizontal or vertical reference line with a label.
type RefLine struct {
	Vertical bool
	At       float64
	Label    string
	Colour   color.NRGBA
	Dash     []float64
	Width    float64
}

// Mark is one annotated point.
type Mark struct {
	X, Y   float64
	Marker Marker
	Size   float64
	Colour color.NRGBA
	Label  string
}

// HeatMap is a grid of values over a rectangle of data coordinates, painted
// with a colour scale, with a colour key beside the panel.
type HeatMap struct {
	// X0, X1, Y0, Y1 are the data coordinates of the grid's edges; row 0
	// lies at Y0, column 0 at X0.
	X0, X1, Y0, Y1 float64
	Cols, Rows     int
	// Values holds Rows*Cols values row by row (index r*Cols + c); NaN
	// cells are painted MaskColour.
	Values []float64
	// Min and Max map to the ends of Scale.
	Min, Max float64
	Scale    *Scale
	// KeyTitle names the quantity and unit on the colour key.
	KeyTitle string
}

// LegendEntry is one line of the legend: a sample of the drawing (a line,
// a marker, both, or a filled swatch) and its label.
type LegendEntry struct {
	Label  string
	Colour color.NRGBA
	Width  float64   // line sample width, px (0 = no line)
	Dash   []float64 // line sample dash
	Marker Marker
	Open   bool
	Swatch bool // a filled rectangle (bands, masked cells)
	// Heading makes the entry a bold heading with no sample.
	Heading bool
}

// SVG renders the figure as an SVG document (px units) whose root carries
// role="img" and the title and description as its accessible name.
func (f *Figure) SVG() []byte {
	w, h := f.size()
	c, err := draw.NewSVG(w, h, "px")
	if err != nil {
		panic("plot: " + err.Error()) // size() is always valid
	}
	name := f.Title
	if f.Description != "" {
		name += ". " + f.Description
	}
	c.SetTitle(name)
	f.render(c)
	return c.Bytes()
}

// PNG renders the figure as a PNG at scale pixels per px (2 for a sharp
// picture on high-density screens and in print). It returns an error when
// the scale is not positive or makes the image too large.
func (f *Figure) PNG(scale float64) ([]byte, error) {
	w, h := f.size()
	c, err := draw.NewRaster(w, h, scale, color.RGBAModel)
	if err != nil {
		return nil, err
	}
	f.render(c)
	var b bytes.Buffer
	if err := png.Encode(&b, c.Pixels()); err != nil {
		return nil, err
	}
	return b.Bytes(), nil
}

// Table returns the data behind the figure.
func (f *Figure) Table() Table { return f.Data }

func (f *Figure) size() (float64, float64) {
	w, h := f.Width, f.Height
	if !(w >= 100 && w <= 20000) {
		w = DefaultWidth
	}
	if !(h >= 100 && h <= 20000) {
		h = DefaultHeight
	}
	return w, h
}
