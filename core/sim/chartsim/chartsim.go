// Package chartsim photographs Sagitta's printed chart with the simulated
// camera (core/sim/simcam): it places a chart Design in front of a pinhole
// camera and turns its targets into a simcam Scene, for tests, benchmarks
// and demo photos of the chart.
//
// By default the simulated chart is an ideal print: the squares and marks
// have sharp edges, and the stars keep their full modulation right to the
// centre. Print.DPI and Print.ChartMM make it a print as core/chart prints
// it (see Print), with the frame's corner marks just outside the frame: the stars fade to grey where a cycle spans fewer than
// chart.PrintLimitDots printer dots, the gratings carry their dots' own
// attenuation, and every part is blurred by the print (PrintedLens). The
// rulers and text below the chart frame are left out.
//
// Camera model: the pinhole camera of R. Hartley and A. Zisserman, Multiple
// View Geometry in Computer Vision, 2nd ed. (2003), section 6.1: a chart
// point (X, Y, 0) in chart units maps to K (R (X, Y, 0) + t), K =
// [[f, 0, cx], [0, f, cy], [0, 0, 1]], so the chart-to-image homography is
// K [r1 r2 t] (their section 8.1.1), with r1, r2 the first two columns of
// the rotation R.
package chartsim

import (
	"math"

	"sagitta/core/chart"
	"sagitta/core/plan"
	"sagitta/core/sim/simcam"
)

// View is a camera looking at the chart.
type View struct {
	W, H int // image size, px
	// Fill is the chart frame's size in the photo relative to the largest
	// that fits in the frame (1: the chart frame exactly fills the frame
	// along its limiting side; 0 means 1).
	Fill float64
	// RollDeg turns the chart in the image (about the optical axis, from +x
	// towards +y); YawDeg turns the chart about its vertical axis (its
	// right side moves away from the camera for positive values); PitchDeg
	// about its horizontal axis (its bottom moves away for positive values).
	RollDeg, YawDeg, PitchDeg float64
	// FocalPx is the focal length in px; 0 means an orthographic view (an
	// affine map: tilts foreshorten but give no keystone).
	FocalPx float64
	// ShiftX, ShiftY move the chart's centre from the image centre, px.
	ShiftX, ShiftY float64
}

// Homography returns the map from chart units of design d to image px.
func (v View) Homography(d *chart.Design) chart.Homography {
	fill := v.Fill
	if fill == 0 {
		fill = 1
	}
	scale := fill * math.Min(float64(v.W)/d.W, float64(v.H)/d.H) // px per chart unit at the centre
	cx, cy := float64(v.W)/2+v.ShiftX, float64(v.H)/2+v.ShiftY
	// R = Rz(roll) Ry(yaw) Rx(pitch), columns r1, r2.
	sr, cr := math.Sincos(v.RollDeg * math.Pi / 180)
	sy, cyw := math.Sincos(v.YawDeg * math.Pi / 180)
	sp, cp := math.Sincos(v.PitchDeg * math.Pi / 180)
	rz := [3][3]float64{{cr, -sr, 0}, {sr, cr, 0}, {0, 0, 1}}
	ry := [3][3]float64{{cyw, 0, -sy}, {0, 1, 0}, {sy, 0, cyw}}
	rx := [3][3]float64{{1, 0, 0}, {0, cp, -sp}, {0, sp, cp}}
	r := mul3(rz, mul3(ry, rx))
	if v.FocalPx <= 0 {
		return chart.Homography{
			scale * r[0][0], scale * r[0][1], cx,
			scale * r[1][0], scale * r[1][1], cy,
			0, 0, 1,
		}
	}
	f := v.FocalPx
	z := f / scale // distance in chart units
	// K [r1 r2 t] with t = (0, 0, z).
	return chart.Homography{
		f*r[0][0] + cx*r[2][0], f*r[0][1] + cx*r[2][1], cx * z,
		f*r[1][0] + cy*r[2][0], f*r[1][1] + cy*r[2][1], cy * z,
		r[2][0], r[2][1], z,
	}
}

func mul3(a, b [3][3]float64) [3][3]float64 {
	var out [3][3]float64
	for i := range 3 {
		for j := range 3 {
			for k := range 3 {
				out[i][j] += a[i][k] * b[k][j]
			}
		}
	}
	return out
}

// Print describes the printed sheet's reflectances, linear, relative to a
// perfect white: the photo's level of a part is Paper times its
// reflectance relative to the paper.
type Print struct {
	Paper float64 // linear level of the paper in the photo (0 means 0.8)
	// Dark is the squares' reflectance relative to the paper (0 means 0.25,
	// the 4:1 chart); Ink is that of black ink, used by the marks (0 means
	// 0.04, from memory: black ink on matte paper reflects a few per cent).
	Dark, Ink float64
	// DPI is the printer's resolution and ChartMM the printed chart's
	// short side (mm, as the sheet's text block states it): together the
	// printer dots per chart unit. 0 (either) means an ideal print.
	DPI, ChartMM float64
	// InkSpreadUM is the ink's spread on paper (standard deviation, um; 0
	// means core/plan's "plain" paper value, from memory).
	InkSpreadUM float64
}

// DotsPerUnit returns the printer dots per chart unit, or 0 for an ideal
// print.
func (p Print) DotsPerUnit() float64 {
	if p.DPI <= 0 || p.ChartMM <= 0 {
		return 0
	}
	return p.DPI / 25.4 * p.ChartMM
}

// BlurUnits returns the print's blur, a Gaussian's standard deviation in
// chart units: core/plan's print model, the dot's box (variance p^2/12) and
// the ink's spread added as variances. 0 for an ideal print.
func (p Print) BlurUnits() float64 {
	dpu := p.DotsPerUnit()
	if dpu == 0 {
		return 0
	}
	spread := p.InkSpreadUM
	if spread == 0 {
		spread, _ = plan.InkSpreadUM("plain")
	}
	s := spread / 1000 / p.ChartMM // chart units
	dot := 1 / dpu
	return math.Sqrt(dot*dot/12 + s*s)
}

// PrintedLens returns lens l followed by the print's blur seen through
// homography h: an isotropic Gaussian of BlurUnits times the view's scale
// at the chart's centre (px per chart unit), the same for edges and sine
// patterns. The print's blur comes before the lens, but blurs cascade in
// any order (Goodman ch. 2), so simcam.TrueMTF of the returned lens is
// the truth of a printed chart: lens x print x pixel. A perspective view
// changes the scale across the chart; the blur is taken at its centre.
// l must be a simcam.Fixed or simcam.FieldLens (nil is the ideal lens).
func PrintedLens(l simcam.Lens, h chart.Homography, pr Print) simcam.Lens {
	sc, _ := similarity(h, 0, 0)
	sigma := pr.BlurUnits() * sc
	if sigma == 0 {
		return l
	}
	g := simcam.Gaussian{Sigma1: sigma, Sigma2: sigma}
	switch q := l.(type) {
	case nil:
		return simcam.Fixed{PSF: g}
	case simcam.Fixed:
		if q.PSF == nil {
			return simcam.Fixed{PSF: g}
		}
		return simcam.Fixed{PSF: simcam.Cascade{q.PSF, g}}
	case simcam.FieldLens:
		q.ExtraSigmaPx = math.Hypot(q.ExtraSigmaPx, sigma)
		return q
	}
	panic("chartsim: PrintedLens needs a simcam.Fixed or simcam.FieldLens")
}

// PrintLimitCyPx returns the highest frequency (cycles/px along the
// pattern) a star of the print holds at full modulation, seen at scale
// pxPerUnit: a cycle spans chart.PrintLimitDots * chart.StarFadeEnd dots
// there. +Inf for an ideal print.
func (p Print) PrintLimitCyPx(pxPerUnit float64) float64 {
	dpu := p.DotsPerUnit()
	if dpu == 0 {
		return math.Inf(1)
	}
	return dpu / pxPerUnit / (chart.PrintLimitDots * chart.StarFadeEnd)
}

func (p Print) withDefaults() Print {
	if p.Paper == 0 {
		p.Paper = 0.8
	}
	if p.Dark == 0 {
		p.Dark = 0.25
	}
	if p.Ink == 0 {
		p.Ink = 0.04
	}
	return p
}

// arcTolPx is the largest distance, px, between a mark's circles and the
// polygons that stand for them in the scene.
const arcTolPx = 0.05

// Scene returns the chart of design d seen through homography h as a
// simcam Scene: squares and marks as polygons mapped exactly (a homography
// maps straight lines to straight lines; circles are mapped as polygons
// within arcTolPx of them), stars and gratings as simcam patterns placed with the
// homography's local similarity at their centre (exact for a view without
// perspective; within the perspective's change of scale across one target
// otherwise).
func Scene(d *chart.Design, h chart.Homography, pr Print) simcam.Scene {
	return scene(d, h, pr, func(x, y float64) bool { return true })
}

// scene is Scene drawing the frame's corner marks at the frame corners
// (x, y) for which corner is true.
func scene(d *chart.Design, h chart.Homography, pr Print, corner func(x, y float64) bool) simcam.Scene {
	pr = pr.withDefaults()
	s := simcam.Scene{Background: pr.Paper}
	mp := func(x, y float64) [2]float64 {
		u, v := h.Apply(x, y)
		return [2]float64{u, v}
	}
	for _, q := range d.Squares {
		cs := q.Corners()
		pts := make([][2]float64, 4)
		for i, c := range cs {
			pts[i] = mp(c[0], c[1])
		}
		s.Polygons = append(s.Polygons, simcam.Polygon{Pts: pts, Level: pr.Paper * pr.Dark})
	}
	// The step wedge: patches of their designed reflectance (a printer that
	// honours sRGB prints them so: core/chart's paint.go).
	for k, r := range d.Wedge.Steps {
		x, y, pw, ph := d.Wedge.Patch(k)
		s.Polygons = append(s.Polygons, simcam.Polygon{Pts: [][2]float64{
			mp(x-pw/2, y-ph/2), mp(x+pw/2, y-ph/2), mp(x+pw/2, y+ph/2), mp(x-pw/2, y+ph/2)}, Level: pr.Paper * r})
	}
	ink := pr.Paper * pr.Ink
	if pr.ChartMM > 0 {
		// The frame's corner marks (chart's layout): two arms of black
		// ink meeting outside each corner.
		mm := 1 / pr.ChartMM // chart units per mm
		off := (chart.CornerOffMM + chart.CornerWidthMM/2) * mm
		hw, arm := chart.CornerWidthMM/2*mm, chart.CornerMarkMM*mm
		rect := func(x0, y0, x1, y1 float64) simcam.Polygon {
			return simcam.Polygon{Pts: [][2]float64{mp(x0, y0), mp(x1, y0), mp(x1, y1), mp(x0, y1)}, Level: ink}
		}
		for _, sg := range [4][2]float64{{-1, -1}, {1, -1}, {1, 1}, {-1, 1}} {
			if !corner(sg[0]*d.W/2, sg[1]*d.H/2) {
				continue
			}
			vx, vy := sg[0]*(d.W/2+off), sg[1]*(d.H/2+off)
			s.Polygons = append(s.Polygons,
				rect(math.Min(vx, vx-sg[0]*arm), vy-hw, math.Max(vx, vx-sg[0]*arm), vy+hw),
				rect(vx-hw, math.Min(vy, vy-sg[1]*arm), vx+hw, math.Max(vy, vy-sg[1]*arm)))
		}
	}
	for _, m := range d.Marks {
		sc, _ := similarity(h, m.X, m.Y)
		// Arc step with a chord sagitta of arcTolPx at the ring's outer
		// radius: r (1 - cos(step/2)) = tol.
		step := 2 * math.Acos(1-arcTolPx/(chart.RingOutOfR*m.R*sc)) * 180 / math.Pi
		arc := func(r, a0, a1 float64, rev bool) [][2]float64 {
			n := max(2, int(math.Ceil((a1-a0)/step)))
			pts := make([][2]float64, 0, n+1)
			for i := 0; i <= n; i++ {
				k := i
				if rev {
					k = n - i
				}
				a := (a0 + (a1-a0)*float64(k)/float64(n)) * math.Pi / 180
				pts = append(pts, mp(m.X+r*math.Cos(a), m.Y+r*math.Sin(a)))
			}
			return pts
		}
		disc := arc(chart.DiscOfR*m.R, 0, 360, false)
		s.Polygons = append(s.Polygons, simcam.Polygon{Pts: disc[:len(disc)-1], Level: ink, Rough: true})
		for _, run := range m.DarkRuns() {
			pts := append(arc(chart.RingOutOfR*m.R, run[0], run[1], false), arc(chart.RingInOfR*m.R, run[0], run[1], true)...)
			s.Polygons = append(s.Polygons, simcam.Polygon{Pts: pts, Level: ink, Rough: true})
		}
	}
	mean, amp := pr.Paper*(1+pr.Dark)/2, pr.Paper*(1-pr.Dark)/2
	dpu := pr.DotsPerUnit()
	for _, st := range d.Stars {
		c := mp(st.X, st.Y)
		sc, rot := similarity(h, st.X, st.Y)
		fade := 0.0
		if dpu > 0 {
			// chart's starPattern: no modulation inside the radius where a
			// cycle spans PrintLimitDots dots.
			fade = chart.PrintLimitDots * float64(st.Cycles) / dpu / (2 * math.Pi) * sc
		}
		s.Stars = append(s.Stars, simcam.Star{X: c[0], Y: c[1], Radius: st.Radius * sc, Cycles: st.Cycles,
			Mean: mean, Amplitude: amp, PhaseDeg: -float64(st.Cycles) * rot, FadePx: fade})
	}
	for _, g := range d.Gratings {
		c := mp(g.X, g.Y)
		sc, rot := similarity(h, g.X, g.Y)
		sr, cr := math.Sincos(rot * math.Pi / 180)
		var corners [4][2]float64
		for i, q := range [4][2]float64{{-1, -1}, {1, -1}, {1, 1}, {-1, 1}} {
			dx, dy := q[0]*g.W/2*sc, q[1]*g.H/2*sc
			corners[i] = [2]float64{c[0] + dx*cr - dy*sr, c[1] + dx*sr + dy*cr}
		}
		dir := g.DirDeg + rot
		f := g.FreqPerUnit / sc
		sd, cd := math.Sincos(dir * math.Pi / 180)
		phase := -360 * f * (c[0]*cd + c[1]*sd)
		ga := amp
		if dpu > 0 {
			// chart's gratingPattern: each dot holds the sine's mean over
			// the dot, sinc(f p) times its amplitude.
			ga *= sinc(g.FreqPerUnit / dpu)
		}
		s.Gratings = append(s.Gratings, simcam.Grating{Corners: corners, FreqCyPx: f, DirectionDeg: dir,
			Mean: mean, Amplitude: ga, PhaseDeg: math.Mod(phase, 360)})
	}
	return s
}

func sinc(x float64) float64 {
	if x == 0 {
		return 1
	}
	return math.Sin(math.Pi*x) / (math.Pi * x)
}

// similarity returns the scale (px per chart unit, the square root of the
// Jacobian's determinant) and rotation (degrees) of h at (x, y).
func similarity(h chart.Homography, x, y float64) (float64, float64) {
	j := h.Jacobian(x, y)
	det := j[0][0]*j[1][1] - j[0][1]*j[1][0]
	// The rotation of the nearest similarity: atan2 of (J10 - J01, J00 + J11).
	return math.Sqrt(math.Abs(det)), math.Atan2(j[1][0]-j[0][1], j[0][0]+j[1][1]) * 180 / math.Pi
}
