// Package fringe measures lateral chromatic aberration (colour fringes)
// across the frame from the edges of one photo: how far the red and the
// blue image of each edge lie from the green one along the radius from the
// optical centre, against image height.
//
// Method: the displacement idea of ISO 19084:2015 (Photography - Digital
// cameras - Chromatic displacement measurements): the same edge is located
// in each colour channel and the channels' positions are compared. Here the
// positions come from core/edge (Measurement.ChannelOffset: each channel's
// offset along the edge normal from one fitted geometry). A lens whose
// magnification differs by wavelength moves the red and blue images along
// the radius, so only edges whose normal lies close to the radius (within
// MaxAngleDeg) carry the displacement well; an edge along the radius
// (normal across it) hardly moves, and is left out. The displacement along
// the radius is the offset along the normal divided by the cosine of the
// angle between normal and radius.
//
// Each pair (R-G, B-G) gets a smooth curve through the origin, an odd
// polynomial in the normalised height u = h / corner height,
// d(u) = a1 u + a3 u^3 (a1 alone with few edges or a short range):
// lateral colour of a lens symmetric about its axis is odd in the field
// (its third-order term is linear in height, the next cubic; W. J. Smith,
// Modern Optical Engineering, 4th ed. (2008), ch. 3 and 10, from memory),
// fitted by least squares after one pass that drops outliers beyond 4
// robust standard deviations, with its standard error band from the
// parameters' covariance. The largest value of either curve over the
// measured heights, and where, gives the verdict in words with thresholds
// of our choosing: below 0.5 px fringes are barely visible, 0.5 to 1.5 px
// visible at 100 % on high-contrast edges, above 1.5 px strong (common
// practice: about one pixel at the corner is where people start to notice
// them).
package fringe

import (
	"fmt"
	"math"
	"slices"

	"sagitta/core/note"
)

// Thresholds of the verdict, px of displacement (see the package doc).
const (
	BarelyPx = 0.5
	StrongPx = 1.5
)

// MaxAngleDeg is the largest angle between an edge's normal and the radius
// for the edge to be used: cos 20 deg = 0.94, so an edge keeps at least
// 94 % of the radial displacement along its normal (the same 20 degrees
// that make a record "tangential" in core/field).
const MaxAngleDeg = 20

// MinEdges is the fewest usable edges for a curve.
const MinEdges = 5

// minHeightFrac: edges nearer the optical centre than this fraction of the
// corner height have no well-defined radius and are left out.
const minHeightFrac = 0.03

// Edge is one measured edge with its colour channels' offsets.
type Edge struct {
	ID        int     // the record's id, for tables
	XPx, YPx  float64 // a point on the edge, px
	NormalDeg float64 // the edge normal, degrees from +x towards +y
	// RG and BG are the red and blue edges' offsets from the green one
	// along the normal (px, positive in the normal's direction), with
	// their standard errors.
	RG, BG     float64
	RGSE, BGSE float64
}

// Frame places edges in the field: the optical centre (px), the pixel
// pitch (um) and the height of the frame's farthest corner (mm).
type Frame struct {
	CentreX, CentreY float64
	PitchUM          float64
	CornerMM         float64
}

// Point is a used edge: its image height and angle to the radius, and the
// red and blue displacements from green along the radius (px, positive
// outwards), with standard errors.
type Point struct {
	ID             int
	HeightMM       float64
	AngleDeg       float64
	RG, BG         float64
	RGSE, BGSE     float64
	OutlierRG      bool // left out of the R-G curve's fit
	OutlierBG      bool // left out of the B-G curve's fit
	XPx, YPx       float64
	NormalDeg      float64
	RadialCosine   float64 // cosine of the angle between normal and radius (signed)
	heightFraction float64
}

// Curve is one pair's smooth displacement against image height.
type Curve struct {
	Pair string // "R-G" or "B-G"
	// Coef are the polynomial's coefficients, px, of u and u^3 (u the
	// height over the corner height); one value when the cubic was not
	// fitted.
	Coef     []float64
	HeightMM []float64 // 0 to the largest measured height
	Px       []float64 // the curve, px (positive: the channel lies farther out than green)
	SEPx     []float64 // its standard error, px
	// MaxPx is the curve's value of largest magnitude over the measured
	// heights (signed), at MaxAtMM, with its standard error.
	MaxPx, MaxAtMM, MaxSEPx float64
	// ResidualPx is the rms of the used points about the curve; Used and
	// Outliers count the points fitted and those left out.
	ResidualPx     float64
	Used, Outliers int
}

// Result is the lateral colour of one photo.
type Result struct {
	Points []Point
	Curves []Curve // R-G, then B-G; empty with too few edges
	// Used counts the edges close enough to radial; Across those left out
	// because their normal is more than MaxAngleDeg from the radius;
	// Central those too near the centre.
	Used, Across, Central int
	// MaxPx is the largest |displacement| of either curve (px, signed), in
	// um at the pixel pitch, for Pair at MaxAtMM; HMaxMM the largest
	// measured height.
	MaxPx, MaxUM, MaxAtMM float64
	Pair                  string
	HMaxMM                float64
	// Code and Text are the verdict (note.CABarely, CAVisible, CAStrong,
	// or CAFewEdges); Selection says which edges were used and why;
	// Caution what can mislead.
	Code      note.Code
	Text      string
	Selection string
	Caution   string
}

// Caution is shown with every result.
const Caution = "Colour fringes are measured from where each edge lies in red, green and blue: focus and a chart that is not flat barely change them, but colour blur in depth (longitudinal chromatic aberration) is not measured, JPEG colour stored at half resolution and in-camera demosaicking blur them, and in-camera or raw-converter corrections remove them. Warranty or repair questions belong with the maker's service."

// Analyse places the edges in the frame, keeps those whose normal is close
// to the radius and fits a curve per pair. It never fails: with too few
// usable edges the result says so (CAFewEdges) and holds no curves.
func Analyse(edges []Edge, fr Frame) *Result {
	res := &Result{Points: []Point{}, Curves: []Curve{}, Caution: Caution}
	for _, e := range edges {
		dx, dy := e.XPx-fr.CentreX, e.YPx-fr.CentreY
		rpx := math.Hypot(dx, dy)
		hmm := rpx * fr.PitchUM / 1000
		if fr.CornerMM <= 0 || hmm < minHeightFrac*fr.CornerMM {
			res.Central++
			continue
		}
		s, c := math.Sincos(e.NormalDeg * math.Pi / 180)
		cosA := (c*dx + s*dy) / rpx // normal . radial unit vector
		ang := math.Acos(math.Min(math.Abs(cosA), 1)) * 180 / math.Pi
		if ang > MaxAngleDeg || !finite(e.RG) || !finite(e.BG) {
			res.Across++
			continue
		}
		res.Points = append(res.Points, Point{
			ID: e.ID, HeightMM: hmm, AngleDeg: ang,
			RG: e.RG / cosA, BG: e.BG / cosA,
			RGSE: e.RGSE / math.Abs(cosA), BGSE: e.BGSE / math.Abs(cosA),
			XPx: e.XPx, YPx: e.YPx, NormalDeg: e.NormalDeg, RadialCosine: cosA,
			heightFraction: hmm / fr.CornerMM,
		})
		res.HMaxMM = math.Max(res.HMaxMM, hmm)
	}
	slices.SortStableFunc(res.Points, func(a, b Point) int {
		switch {
		case a.HeightMM < b.HeightMM:
			return -1
		case a.HeightMM > b.HeightMM:
			return 1
		}
		return 0
	})
	res.Used = len(res.Points)
	res.Selection = fmt.Sprintf("%d edges with their normal within %d° of the radius used; %d along the radius (normal across it) and %d at the centre left out: colour fringes move an edge along the radius", res.Used, MaxAngleDeg, res.Across, res.Central)
	if res.Used < MinEdges {
		res.Code = note.CAFewEdges
		res.Text = fmt.Sprintf("Colour fringes not measured: %d edges with their normal along the radius, at least %d needed", res.Used, MinEdges)
		return res
	}
	for _, pair := range []string{"R-G", "B-G"} {
		res.Curves = append(res.Curves, fitCurve(res, pair, fr))
	}
	for _, c := range res.Curves {
		if math.Abs(c.MaxPx) >= math.Abs(res.MaxPx) {
			res.MaxPx, res.MaxAtMM, res.Pair = c.MaxPx, c.MaxAtMM, c.Pair
		}
	}
	res.MaxUM = res.MaxPx * fr.PitchUM
	res.Code, res.Text = verdict(res, fr)
	return res
}

// fitCurve fits one pair's curve through the origin and marks outliers
// on the points.
func fitCurve(res *Result, pair string, fr Frame) Curve {
	val := func(p *Point) float64 {
		if pair == "R-G" {
			return p.RG
		}
		return p.BG
	}
	mark := func(p *Point, out bool) {
		if pair == "R-G" {
			p.OutlierRG = out
		} else {
			p.OutlierBG = out
		}
	}
	// The cubic term needs edges spread over the field.
	terms := 1
	if len(res.Points) >= 8 && res.HMaxMM >= 0.5*fr.CornerMM {
		terms = 2
	}
	use := make([]bool, len(res.Points))
	for i := range use {
		use[i] = true
	}
	coef, cov, rms, n := lsq(res.Points, use, val, terms)
	// One pass against outliers: beyond 4 robust standard deviations
	// (1.4826 x the median absolute residual; Hampel's rule, common
	// practice) and 0.05 px.
	abs := make([]float64, 0, len(res.Points))
	for i := range res.Points {
		abs = append(abs, math.Abs(val(&res.Points[i])-poly(coef, res.Points[i].heightFraction)))
	}
	med := median(abs)
	lim := math.Max(4*1.4826*med, 0.05)
	drop := 0
	for i := range res.Points {
		out := abs[i] > lim
		use[i] = !out
		mark(&res.Points[i], out)
		if out {
			drop++
		}
	}
	if drop > 0 && len(res.Points)-drop >= MinEdges {
		coef, cov, rms, n = lsq(res.Points, use, val, terms)
	} else if drop > 0 {
		drop = 0
		for i := range res.Points {
			use[i] = true
			mark(&res.Points[i], false)
		}
	}
	c := Curve{Pair: pair, Coef: coef, ResidualPx: rms, Used: n, Outliers: drop}
	const samples = 40
	best := -1.0
	for k := 0; k <= samples; k++ {
		h := res.HMaxMM * float64(k) / samples
		u := h / fr.CornerMM
		v := poly(coef, u)
		g := basis(u, terms)
		var q float64
		for a := range terms {
			for b := range terms {
				q += g[a] * cov[a][b] * g[b]
			}
		}
		se := math.Sqrt(math.Max(q, 0))
		c.HeightMM = append(c.HeightMM, h)
		c.Px = append(c.Px, v)
		c.SEPx = append(c.SEPx, se)
		if math.Abs(v) > best {
			best, c.MaxPx, c.MaxAtMM, c.MaxSEPx = math.Abs(v), v, h, se
		}
	}
	return c
}

// basis returns u and u^3 (the first terms of them).
func basis(u float64, terms int) [2]float64 {
	if terms == 1 {
		return [2]float64{u, 0}
	}
	return [2]float64{u, u * u * u}
}

func poly(coef []float64, u float64) float64 {
	g := basis(u, len(coef))
	var v float64
	for i, c := range coef {
		v += c * g[i]
	}
	return v
}

// lsq fits the odd polynomial by ordinary least squares to the points in
// use and returns its coefficients, their covariance (residual variance x
// (X'X)^-1), the rms residual and the number of points.
func lsq(pts []Point, use []bool, val func(*Point) float64, terms int) ([]float64, [2][2]float64, float64, int) {
	var xtx [2][2]float64
	var xty [2]float64
	n := 0
	for i := range pts {
		if !use[i] {
			continue
		}
		g := basis(pts[i].heightFraction, terms)
		y := val(&pts[i])
		for a := range terms {
			xty[a] += g[a] * y
			for b := range terms {
				xtx[a][b] += g[a] * g[b]
			}
		}
		n++
	}
	var inv [2][2]float64
	if terms == 1 {
		inv[0][0] = 1 / xtx[0][0]
	} else {
		det := xtx[0][0]*xtx[1][1] - xtx[0][1]*xtx[1][0]
		inv = [2][2]float64{{xtx[1][1] / det, -xtx[0][1] / det}, {-xtx[1][0] / det, xtx[0][0] / det}}
	}
	coef := make([]float64, terms)
	for a := range terms {
		for b := range terms {
			coef[a] += inv[a][b] * xty[b]
		}
	}
	var ss float64
	for i := range pts {
		if use[i] {
			r := val(&pts[i]) - poly(coef, pts[i].heightFraction)
			ss += r * r
		}
	}
	s2 := ss / float64(max(n-terms, 1))
	var cov [2][2]float64
	for a := range terms {
		for b := range terms {
			cov[a][b] = s2 * inv[a][b]
		}
	}
	return coef, cov, math.Sqrt(ss / float64(max(n, 1))), n
}

func median(v []float64) float64 {
	c := slices.Clone(v)
	slices.Sort(c)
	if len(c) == 0 {
		return 0
	}
	if len(c)%2 == 1 {
		return c[len(c)/2]
	}
	return (c[len(c)/2-1] + c[len(c)/2]) / 2
}

// verdict words the largest displacement.
func verdict(res *Result, fr Frame) (note.Code, string) {
	m := math.Abs(res.MaxPx)
	side := "farther out than"
	if res.MaxPx < 0 {
		side = "nearer the centre than"
	}
	colour := map[string]string{"R-G": "red", "B-G": "blue"}[res.Pair]
	num := fmt.Sprintf("%s lies %.2f px (%.1f µm) %s green at %.1f mm from the optical centre", colour, m, m*fr.PitchUM, side, res.MaxAtMM)
	if m < 0.005 {
		num = "red, green and blue edges lie together (within 0.01 px) across the measured field"
	}
	reach := ""
	if res.HMaxMM < 0.8*fr.CornerMM {
		reach = fmt.Sprintf("; edges reach only %.1f of the corner's %.1f mm", res.HMaxMM, fr.CornerMM)
	}
	switch {
	case m < BarelyPx:
		return note.CABarely, fmt.Sprintf("Colour fringes barely visible (under %.1f px): %s%s", BarelyPx, num, reach)
	case m <= StrongPx:
		return note.CAVisible, fmt.Sprintf("Colour fringes visible at 100 %% (%.1f to %.1f px): %s%s", BarelyPx, StrongPx, num, reach)
	}
	return note.CAStrong, fmt.Sprintf("Strong colour fringes (over %.1f px): %s%s", StrongPx, num, reach)
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
