package chart

import (
	"fmt"
	"math"
	"strings"
)

// aspects are the chart shapes on offer: name, long side over short side,
// and the number of grid cells along the long side (the short side always
// has 7). The cell count is the odd number that keeps cells nearest square.
var aspects = []struct {
	name  string
	ratio float64
	cells int
}{
	{"3:2", 3.0 / 2, 11},
	{"4:3", 4.0 / 3, 9},
	{"16:9", 16.0 / 9, 13},
	{"1:1", 1, 7},
}

// shortCells is the number of grid cells along the chart's short side.
const shortCells = 7

// Code identifies a chart design: its aspect ratio and orientation. The
// analyser reads it from the marks and rebuilds the same Design.
type Code struct {
	Aspect   string `json:"aspect"`   // "3:2", "4:3", "16:9" or "1:1"
	Portrait bool   `json:"portrait"` // the chart is taller than wide
	// Sheets is 2 or 3 for a chart drawn across 2 x 2 or 3 x 3 sheets
	// (tiling.go), 0 for one sheet.
	Sheets int `json:"sheets,omitempty"`
}

// String is the chart code printed on the sheet, e.g. "S1-3:2-L" (design
// version 1, 3:2, landscape), "S1-16:9-P", or "S1-3:2-L-2x2" for a chart
// across 2 x 2 sheets.
func (c Code) String() string {
	o := "L"
	if c.Portrait {
		o = "P"
	}
	s := "S1-" + c.Aspect + "-" + o
	if c.Sheets > 1 {
		s += fmt.Sprintf("-%dx%d", c.Sheets, c.Sheets)
	}
	return s
}

// value numbers the code 0..7 for the marks: aspect index times 2, plus 1
// for portrait. It returns -1 for an unknown aspect.
func (c Code) value() int {
	for i, a := range aspects {
		if a.name == c.Aspect {
			v := 2 * i
			if c.Portrait {
				v++
			}
			return v
		}
	}
	return -1
}

// ParseCode reads a chart code as String writes it ("S1-3:2-L"). It
// returns an OptionError for any other text.
func ParseCode(s string) (Code, error) {
	sheets := 0
	for _, n := range []int{2, 3} {
		if t, ok := strings.CutSuffix(s, fmt.Sprintf("-%dx%d", n, n)); ok {
			s, sheets = t, n
		}
	}
	c, err := parseCode(s)
	c.Sheets = sheets
	return c, err
}

func parseCode(s string) (Code, error) {
	rest, ok := strings.CutPrefix(s, "S1-")
	if !ok || len(rest) < 3 || rest[len(rest)-2] != '-' {
		return Code{}, optErr("%q is not a chart code (like S1-3:2-L)", s)
	}
	c := Code{Aspect: rest[:len(rest)-2]}
	switch rest[len(rest)-1] {
	case 'L':
	case 'P':
		c.Portrait = true
	default:
		return Code{}, optErr("%q is not a chart code (like S1-3:2-L)", s)
	}
	if c.value() < 0 {
		return Code{}, optErr("%q is not a chart code: unknown aspect ratio %q", s, c.Aspect)
	}
	return c, nil
}

// codeOf is the inverse of Code.value.
func codeOf(v int) Code { return Code{Aspect: aspects[v/2].name, Portrait: v%2 == 1} }

// gridFor returns the grid of a design: 7 cells along the short side (9 on
// a chart across 3 x 3 sheets, so that every sheet holds at least 3 rows
// and marks of its own on inner grid corners) and along the long side the
// aspect's count, or for 9 rows the odd count nearest square cells. The
// stars (0.27 of a cell instead of 0.37) and the grating blocks and step
// wedge (0.55 instead of 0.72) shrink on the finer grid so that the
// clearances of the package doc still hold in chart units
// (design_test.go).
func gridFor(c Code, a int) (long, short int, sq, star, grat float64) {
	if c.Sheets != 3 {
		return aspects[a].cells, shortCells, squareOfCell, starOfCell, gratingOfCell
	}
	r := aspects[a].ratio
	long = 2*int(math.Round((9*r-1)/2)) + 1
	return long, 9, 0.50, 0.27, 0.55
}

// Design is the chart's layout in chart units: the chart's short side is 1,
// the origin is the chart's centre, x grows to the right and y down, angles
// are degrees from +x towards +y. The chart frame, the area the camera's
// frame should cover, is [-W/2, W/2] x [-H/2, H/2]. A Design does not depend
// on the sheet: the analyser rebuilds it from the Code alone.
//
// The frame is divided into a grid of Cols x Rows cells (7 along the short
// side). The centre cell holds a sine star, four more stars sit at about half
// the field towards the corners, the cells just above and below the centre
// hold sine gratings (2 x 2 patches each), and every other cell holds one
// dark square. The eight
// marks sit on grid corners, clear of every cell's target.
type Design struct {
	Code       Code
	W, H       float64 // frame size, chart units
	Cols, Rows int     // grid cells
	Squares    []Square
	Stars      []Star
	Gratings   []Grating
	Marks      []Mark
	Wedge      Wedge
	// Sheets are the pieces of a chart across several sheets (tiling.go),
	// in reading order; nil for one sheet.
	Sheets []Sheet
}

// Wedge is the chart's step wedge: WedgeCols x WedgeRows grey patches of
// known reflectance relative to the paper in the cell left of the centre,
// for fitting the photo's tone curve (core/analyze, tone.go). Patch k (in
// reading order) holds Steps[k]; patches touch, so only their middles are
// read.
type Wedge struct {
	X, Y, W, H float64 // the block's centre and size, chart units
	Steps      []float64
}

// Wedge layout: a block as wide as a grating block (0.72 of the cell), 4 x 3 patches, 12
// reflectances evenly spaced in log from WedgeHi to WedgeLo. The darkest is
// above the few per cent black ink reflects on matte paper (from memory),
// so a printer reaches every step; the lightest is below the paper.
const (
	WedgeCols = 4
	WedgeRows = 3
	WedgeHi   = 0.9
	WedgeLo   = 0.06
)

// Patch returns patch k's centre and size, chart units.
func (w Wedge) Patch(k int) (x, y, pw, ph float64) {
	pw, ph = w.W/WedgeCols, w.H/WedgeRows
	i, j := k%WedgeCols, k/WedgeCols
	return w.X - w.W/2 + (float64(i)+0.5)*pw, w.Y - w.H/2 + (float64(j)+0.5)*ph, pw, ph
}

// wedgeSteps returns the designed reflectances.
func wedgeSteps() []float64 {
	n := WedgeCols * WedgeRows
	out := make([]float64, n)
	for k := range out {
		out[k] = WedgeHi * math.Pow(WedgeLo/WedgeHi, float64(k)/float64(n-1))
	}
	return out
}

// Square is a dark square target. Its four edges are numbered 1 to 4: edge 1
// is the one whose outward normal points most nearly away from the chart
// centre (a tangential edge), then clockwise on the page (increasing angle):
// 2 and 4 run along the radius (sagittal), 3 faces the centre (tangential).
type Square struct {
	ID     string
	X, Y   float64 // centre, chart units
	Side   float64 // side length, chart units
	RotDeg float64 // direction of edge 1's outward normal, degrees
}

// Star is a sinusoidal Siemens star: at radius r <= Radius and angle phi,
// reflectance = mean + amplitude * cos(Cycles * phi), phi measured from +x
// towards +y about (X, Y). At radius r its frequency is Cycles / (2 pi r)
// cycles per chart unit.
type Star struct {
	ID     string
	X, Y   float64 // centre, chart units
	Radius float64 // chart units
	Cycles int
}

// Grating is a sine grating filling an axis-aligned rectangle of W x H chart
// units centred on (X, Y): reflectance = mean + amplitude * cos(2 pi
// FreqPerUnit * d), d the distance from the centre along the direction of
// modulation DirDeg (0: along x, vertical bars; 90: along y, horizontal bars).
// Reference gratings are the low-frequency patches that give the print's own
// modulation.
type Grating struct {
	ID          string
	X, Y, W, H  float64
	FreqPerUnit float64 // cycles per chart unit (per chart short side)
	DirDeg      float64
	Reference   bool
}

// Mark is one of the chart's eight recognition marks (see mark.go): a dark
// disc inside a ring of 16 sectors that spells Word, which encodes the chart
// Code and the mark's Index.
type Mark struct {
	Index int
	X, Y  float64 // centre, chart units
	R     float64 // outer radius of the code ring, chart units
	Word  uint16
	Sheet int // the sheet it is printed on (Design.Sheets), 0 on one sheet
}

// Sizes in chart units or in fractions of a grid cell.
const (
	squareOfCell  = 0.52 // square side / smaller cell side
	starOfCell    = 0.37 // star radius / smaller cell side
	gratingOfCell = 0.72 // grating block size / cell size
	gratingGap    = 0.02 // gap between the patches of a grating block, chart units
	// MarkR is the radius of a mark's code ring, chart units.
	MarkR = 0.03
	// StarCycles is the number of sine cycles around every star.
	StarCycles = 72
)

// GratingFreqs are the grating frequencies, cycles per chart short side, in
// the order of the patches of a block (left to right, top to bottom). The
// first is the low-frequency reference. When the chart fills the frame,
// cycles per chart short side are cycles per picture height; on a 24 mm
// tall sensor 96, 240, 360 and 720 are 4, 10, 15 and 30 lp/mm (10 and 30
// are the usual field frequencies, common practice). 480 (20 lp/mm) would
// be the rounder choice, but with the chart filling the frame it falls on
// the Nyquist frequency of the reduced copy, 1500 px across, in which
// core/sine looks for gratings, whatever the camera's resolution, and is
// never found there.
var GratingFreqs = []float64{96, 240, 360, 720}

// NewDesign builds the layout of code c. It returns an OptionError for an
// unknown aspect.
func NewDesign(c Code) (*Design, error) {
	v := c.value()
	if v < 0 {
		return nil, optErr("unknown aspect ratio %q (choose 3:2, 4:3, 16:9 or 1:1)", c.Aspect)
	}
	if c.Sheets != 0 && c.Sheets != 2 && c.Sheets != 3 {
		return nil, optErr("a chart goes across 2 x 2 or 3 x 3 sheets, not %d x %d", c.Sheets, c.Sheets)
	}
	if c.Sheets == 3 && c.Aspect == "1:1" {
		return nil, optErr("a 1:1 chart goes across 2 x 2 sheets at most: its middle sheets leave no room for their marks on 3 x 3")
	}
	a := aspects[v/2]
	long, short, squareOfCell, starOfCell, gratingOfCell := gridFor(c, v/2)
	d := &Design{Code: c, W: a.ratio, H: 1, Cols: long, Rows: short}
	if c.Portrait {
		d.W, d.H, d.Cols, d.Rows = 1, a.ratio, short, long
	}
	cw, ch := d.W/float64(d.Cols), d.H/float64(d.Rows)
	cell := math.Min(cw, ch)
	centre := func(i, j int) (float64, float64) {
		return -d.W/2 + (float64(i)+0.5)*cw, -d.H/2 + (float64(j)+0.5)*ch
	}
	corner := func(i, j int) (float64, float64) { return -d.W/2 + float64(i)*cw, -d.H/2 + float64(j)*ch }
	ic, jc := d.Cols/2, d.Rows/2

	// On a chart across 3 x 3 sheets the gratings and the step wedge sit
	// two cells from the centre instead of one, so that the middle sheet
	// keeps grid corners clear for its own marks (tiling.go).
	away := 1
	if c.Sheets == 3 {
		away = 2
	}
	// Stars: the centre and four cells towards the corners, at about 60 %
	// of the way to the edge but clear of the corner marks' cells.
	dc := min(max(int(math.Round(0.6*float64(ic))), 1), ic-2)
	dr := min(max(int(math.Round(0.6*float64(jc))), 1), jc-2)
	used := map[[2]int]bool{}
	starCells := [][2]int{{ic, jc}, {ic - dc, jc - dr}, {ic + dc, jc - dr}, {ic - dc, jc + dr}, {ic + dc, jc + dr}}
	for k, sc := range starCells {
		x, y := centre(sc[0], sc[1])
		d.Stars = append(d.Stars, Star{ID: fmt.Sprintf("star%d", k), X: x, Y: y, Radius: starOfCell * cell, Cycles: StarCycles})
		used[sc] = true
	}
	// Gratings: above the centre modulated along y (along the radius there:
	// tangential), below it along x (sagittal); each block is 2 x 2
	// separate patches, one per frequency, so that each is found and
	// measured on its own.
	for k, dir := range []float64{90, 0} {
		i, j := ic, jc-away+2*away*k
		used[[2]int{i, j}] = true
		x0, y0 := centre(i, j)
		pw := (gratingOfCell*cw - gratingGap) / 2
		ph := (gratingOfCell*ch - gratingGap) / 2
		axis := map[float64]string{0: "x", 90: "y"}[dir]
		for m, f := range GratingFreqs {
			sx, sy := float64(m%2)*2-1, float64(m/2)*2-1 // -1 or +1
			d.Gratings = append(d.Gratings, Grating{
				ID: fmt.Sprintf("grating-%s-%g", axis, f), FreqPerUnit: f, DirDeg: dir, Reference: m == 0,
				X: x0 + sx*(pw+gratingGap)/2, Y: y0 + sy*(ph+gratingGap)/2, W: pw, H: ph,
			})
		}
	}
	// The step wedge left of the centre: the part of the frame least
	// shaded by the lens's fall-off after the centre itself.
	{
		i, j := ic-away, jc
		used[[2]int{i, j}] = true
		x, y := centre(i, j)
		d.Wedge = Wedge{X: x, Y: y, W: gratingOfCell * cell, H: gratingOfCell * cell * WedgeRows / WedgeCols, Steps: wedgeSteps()}
	}
	// Squares in every other cell, reading order.
	for j := 0; j < d.Rows; j++ {
		for i := 0; i < d.Cols; i++ {
			if used[[2]int{i, j}] {
				continue
			}
			x, y := centre(i, j)
			d.Squares = append(d.Squares, Square{
				ID: fmt.Sprintf("sq%02d", len(d.Squares)+1), X: x, Y: y,
				Side: squareOfCell * cell, RotDeg: slantFor(math.Atan2(y, x) * 180 / math.Pi),
			})
		}
	}
	// Marks on grid corners: four near the frame's corners, four near the
	// middles of its sides (placed off-centre so that no two marks are
	// mirror images of each other's position).
	if c.Sheets > 1 {
		d.placeSheetMarks(v)
		return d, nil
	}
	at := [][2]int{
		{1, 1}, {d.Cols - 1, 1}, {d.Cols - 1, d.Rows - 1}, {1, d.Rows - 1},
		{ic, 1}, {d.Cols - 1, jc}, {ic + 1, d.Rows - 1}, {1, jc + 1},
	}
	for k, p := range at {
		x, y := corner(p[0], p[1])
		d.Marks = append(d.Marks, Mark{Index: k, X: x, Y: y, R: MarkR, Word: codebook[v*marksPerChart+k]})
	}
	return d, nil
}

// Field returns the distance of (x, y) chart units from the chart centre as a
// fraction of the half diagonal: 0 at the centre, 1 in the frame's corners.
func (d *Design) Field(x, y float64) float64 {
	return math.Hypot(x, y) / math.Hypot(d.W/2, d.H/2)
}

// Corners returns the square's corners in chart units, in order of
// increasing angle about its centre, starting with the corner between edges
// 4 and 1; edge k runs from corner k-1 to corner k (mod 4).
func (q Square) Corners() [4][2]float64 {
	var out [4][2]float64
	h := q.Side / math.Sqrt2
	for k := range 4 {
		a := (q.RotDeg - 45 + 90*float64(k)) * math.Pi / 180
		out[k] = [2]float64{q.X + h*math.Cos(a), q.Y + h*math.Sin(a)}
	}
	return out
}

// EdgeNormalDeg returns the direction of the outward normal of edge k (1..4),
// degrees.
func (q Square) EdgeNormalDeg(k int) float64 { return q.RotDeg + 90*float64(k-1) }

// Slants: a square's edges make the same angle with the pixel axes of a
// camera held square to the chart. Angles whose tangent is a ratio of small
// integers p/q (q <= 5) are "critical": the edge's sub-pixel phases repeat
// after q rows and fill the oversampled profile unevenly (ISO 12233:2017,
// edge-based SFR annex; common practice). Slants below 5 degrees sample the
// phases slowly along short edges; about 5 degrees is the usual choice
// (common practice).
const (
	minSlantDeg       = 5
	criticalMarginDeg = 1.5
)

// safeSlant reports whether slant s (degrees, 0..45) is usable.
func safeSlant(s float64) bool {
	if s < minSlantDeg-1e-9 {
		return false
	}
	for q := 1; q <= 5; q++ {
		for p := 0; p <= q; p++ {
			if math.Abs(s-math.Atan2(float64(p), float64(q))*180/math.Pi) < criticalMarginDeg {
				return false
			}
		}
	}
	return true
}

// safeRotations are the rotations (modulo 90 degrees, every 0.25 degree)
// whose slant from the pixel axes is safe.
var safeRotations = func() []float64 {
	var out []float64
	for k := 0; k < 360; k++ {
		c := float64(k) * 0.25
		if safeSlant(math.Min(c, 90-c)) {
			out = append(out, c)
		}
	}
	return out
}()

// slantFor returns the square rotation for a square whose centre lies in
// direction radDeg from the chart centre: the rotation nearest radDeg
// (modulo 90) whose slant from the pixel axes is safe. The square's edges
// then run along and across the radius to within 5 degrees (the most is on
// the axes, where the whole 5 degree slant is the difference; elsewhere it
// is under 3 degrees), well inside the 20 degree tolerance of the sagittal
// and tangential classes (core/field).
func slantFor(radDeg float64) float64 {
	t := math.Mod(math.Mod(radDeg, 90)+90, 90) // 0..90
	best, bestD := 0.0, math.Inf(1)
	for _, c := range safeRotations {
		dd := math.Abs(c - t)
		dd = math.Min(dd, 90-dd)
		if dd < bestD-1e-12 {
			best, bestD = c, dd
		}
	}
	delta := best - t
	if delta > 45 {
		delta -= 90
	} else if delta < -45 {
		delta += 90
	}
	r := radDeg + delta
	return math.Mod(math.Mod(r, 360)+360, 360)
}
