package plot

import (
	"math"
	"strings"

	"sagitta/core/draw"
)

// wrapLines breaks each text into lines no wider than w px at style ts,
// at spaces (a single word wider than w stays whole).
func wrapLines(texts []string, w float64, ts draw.TextStyle) []string {
	var out []string
	for _, t := range texts {
		line := ""
		for _, word := range strings.Fields(t) {
			try := word
			if line != "" {
				try = line + " " + word
			}
			if line != "" && textWidth(try, ts) > w {
				out = append(out, line)
				line = word
				continue
			}
			line = try
		}
		if line != "" {
			out = append(out, line)
		}
	}
	return out
}

// legendWidth is the width of the legend column, px (0 without a legend).
func (f *Figure) legendWidth() float64 {
	if len(f.Legend) == 0 {
		return 0
	}
	w := 0.0
	for _, e := range f.Legend {
		ts := draw.TextStyle{Size: legendSize, Bold: e.Heading}
		lw := textWidth(e.Label, ts)
		if !e.Heading {
			lw += sampleLen + 8
		}
		w = math.Max(w, lw)
	}
	return math.Max(minLegend, math.Min(maxLegend, w+2*legendPad))
}

// entryWidth is the width of a legend entry laid out in a row, px.
func entryWidth(e LegendEntry) float64 {
	w := textWidth(e.Label, draw.TextStyle{Size: legendSize, Bold: e.Heading})
	if !e.Heading {
		w += sampleLen + 8
	}
	return w + 22
}

// legendRows returns the number of rows the legend takes below the panels
// of a figure w px wide.
func (f *Figure) legendRows(w float64) float64 {
	rows, x := 1.0, 0.0
	for _, e := range f.Legend {
		ew := entryWidth(e)
		if x > 0 && x+ew > w-2*legendPad-16 {
			rows++
			x = 0
		}
		x += ew
	}
	return rows
}

// renderLegendRows draws the legend entries left to right in rows inside b.
func (f *Figure) renderLegendRows(c draw.Canvas, b box) {
	x0 := b.x0 + 16
	x, y := x0, b.y0+legendRow-2
	for _, e := range f.Legend {
		ew := entryWidth(e)
		if x > x0 && x+ew > b.x1-legendPad {
			x, y = x0, y+legendRow
		}
		f.renderEntry(c, x, y, e)
		x += ew
	}
}

// renderEntry draws one legend entry with its baseline at y, starting at x.
func (f *Figure) renderEntry(c draw.Canvas, x, y float64, e LegendEntry) {
	if e.Heading {
		c.Text(x, y, e.Label, draw.TextStyle{Size: legendSize, Bold: true, Colour: InkColour})
		return
	}
	mid := y - 4
	var p draw.Path
	if e.Swatch {
		p.Rect(x, mid-6, sampleLen, 12)
		c.Path(&p, draw.Style{Fill: e.Colour, Stroke: GridColour, Width: 0.5})
	}
	if e.Width > 0 {
		p.Reset()
		p.MoveTo(x, mid)
		p.LineTo(x+sampleLen, mid)
		st := draw.Style{Stroke: e.Colour, Width: e.Width, Dash: e.Dash}
		c.Path(&p, st)
	}
	if e.Marker != NoMarker {
		drawMarker(c, x+sampleLen/2, mid, e.Marker, 4, e.Colour, e.Open)
	}
	c.Text(x+sampleLen+8, y, e.Label, draw.TextStyle{Size: legendSize, Colour: InkColour})
}

// renderLegend draws the legend entries top to bottom inside b.
func (f *Figure) renderLegend(c draw.Canvas, b box) {
	x := b.x0 + legendPad
	y := b.y0 + 16
	for _, e := range f.Legend {
		if y > b.y1 {
			break
		}
		if e.Heading {
			if y > b.y0+16 {
				y += 4
			}
			c.Text(x, y, e.Label, draw.TextStyle{Size: legendSize, Bold: true, Colour: InkColour})
			y += legendRow
			continue
		}
		f.renderEntry(c, x, y, e)
		y += legendRow
	}
}
