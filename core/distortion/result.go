package distortion

import (
	"fmt"
	"math"

	"sagitta/core/note"
)

// Verdict thresholds (Sagitta's choices): below NegligiblePct at every
// height from the centre to the corner, distortion is called negligible
// (a straight line along the long side then bows by well under a pixel row
// in a thousand); a moustache needs both signs beyond MoustachePct.
const (
	NegligiblePct = 0.3
	MoustachePct  = 0.1
	// ScatterPx (or ScatterFrac of the half-diagonal, the larger) is the
	// rms residual beyond which the targets scatter more than a flat,
	// accurately printed chart gives.
	ScatterPx   = 1.0
	ScatterFrac = 0.0005
	// ShortReach: targets stopping short of this share of the corner's
	// height leave the corner value extrapolated.
	ShortReach = 0.8
	// CurveSteps is the number of intervals of the reported curve.
	CurveSteps = 20
)

// Result is the reported distortion.
type Result struct {
	K1, K2 float64
	// HeightS and HeightMM are the curve's image heights, in half-diagonals
	// and mm, from the centre to the farthest corner; DisplacementPct the
	// radial displacement there, per cent of the ideal height.
	HeightS         []float64
	HeightMM        []float64
	DisplacementPct []float64
	// CornerPct and LongEdgePct are the displacement at the farthest
	// corner and at the far end of the long axis.
	CornerPct, LongEdgePct float64
	// Kind is "negligible", "barrel", "pincushion" or "moustache"; Text
	// says it in words and Code is its note code.
	Kind, Text, Code string
	RMSPx            float64
	N                int
	// Points are the targets: their measured radial displacement (NaN
	// near the centre, where it means nothing) and residual.
	Points   []PointResult
	Cautions []note.Note
}

// PointResult is one target's place on the curve.
type PointResult struct {
	HeightS, DisplacementPct, ResidualPx float64
	Used                                 bool
}

// minPointS is the height below which a point's own displacement is not
// reported: near the centre a tenth of a pixel is a large percentage.
const minPointS = 0.15

// Summarise turns a fit into the reported curve, verdict and cautions for
// frame fr with pixels of pitchUM. pts are the chart's targets behind a
// FitChart (none for FitLines). setupWarns says the chart's set-up checks
// warned (then the result is unreliable).
func Summarise(f *Fit, pts []Point, fr Frame, pitchUM float64, setupWarns bool) *Result {
	R := fr.HalfDiagPx()
	sc := fr.CornerS()
	out := &Result{K1: f.K1, K2: f.K2, RMSPx: f.RMSPx, N: f.N}
	lo, hi := 0.0, 0.0
	for i := 0; i <= CurveSteps; i++ {
		s := sc * float64(i) / CurveSteps
		d := f.DisplacementPct(s)
		out.HeightS = append(out.HeightS, s)
		out.HeightMM = append(out.HeightMM, s*R*pitchUM/1000)
		out.DisplacementPct = append(out.DisplacementPct, d)
		lo, hi = math.Min(lo, d), math.Max(hi, d)
	}
	out.CornerPct = f.DisplacementPct(sc)
	out.LongEdgePct = f.DisplacementPct(fr.LongEdgeS())
	switch {
	case math.Max(-lo, hi) < NegligiblePct:
		out.Kind, out.Code = "negligible", string(note.DistortionNegligible)
		out.Text = fmt.Sprintf("Distortion is negligible: straight lines stay straight within %.2f %% of their distance from the optical centre.", math.Max(-lo, hi))
	case -lo > MoustachePct && hi > MoustachePct:
		out.Kind, out.Code = "moustache", string(note.DistortionMoustache)
		out.Text = fmt.Sprintf("Moustache distortion: lines bow one way near the centre and the other way towards the corners (from %+.2f %% to %+.2f %%; %+.2f %% at the corner).", lo, hi, out.CornerPct)
	case -lo > hi:
		out.Kind, out.Code = "barrel", string(note.DistortionBarrel)
		out.Text = fmt.Sprintf("Barrel distortion: straight lines near the frame's edges bow outwards (%+.2f %% at the corner, %+.2f %% at the end of the long side).", out.CornerPct, out.LongEdgePct)
	default:
		out.Kind, out.Code = "pincushion", string(note.DistortionPincushion)
		out.Text = fmt.Sprintf("Pincushion distortion: straight lines near the frame's edges bow inwards (%+.2f %% at the corner, %+.2f %% at the end of the long side).", out.CornerPct, out.LongEdgePct)
	}
	for i, p := range pts {
		qx, qy := apply(f.H, p.ChartX, p.ChartY)
		qx, qy = (qx-fr.CentreX)/R, (qy-fr.CentreY)/R
		s := math.Hypot(qx, qy)
		px, py := (p.XPx-fr.CentreX)/R, (p.YPx-fr.CentreY)/R
		d := math.NaN()
		if s >= minPointS {
			d = 100 * ((px*qx+py*qy)/(s*s) - 1)
		}
		out.Points = append(out.Points, PointResult{HeightS: s, DisplacementPct: d, ResidualPx: f.ResidualsPx[i], Used: f.Used[i]})
	}
	if setupWarns {
		out.Cautions = append(out.Cautions, note.New(note.DistortionSetup,
			"The chart's set-up checks warn: a chart that is not flat and square to the camera bends its lines too, so this distortion is unreliable until they pass."))
	}
	if f.RMSPx > math.Max(ScatterPx, ScatterFrac*R) {
		out.Cautions = append(out.Cautions, note.New(note.DistortionScatter,
			fmt.Sprintf("The targets scatter by %.1f px about the fitted curve, more than a flat sheet gives: flatten the chart (a curled or wavy sheet bends lines like the lens).", f.RMSPx)))
	}
	if f.ReachS < ShortReach*sc {
		out.Cautions = append(out.Cautions, note.New(note.DistortionShortReach,
			fmt.Sprintf("The located targets reach only %.0f %% of the way to the corner: the corner value is extrapolated.", 100*f.ReachS/sc)))
	}
	return out
}

func apply(h [9]float64, x, y float64) (float64, float64) {
	w := h[6]*x + h[7]*y + h[8]
	return (h[0]*x + h[1]*y + h[2]) / w, (h[3]*x + h[4]*y + h[5]) / w
}

// Line is a measured straight edge: a point on it and the direction of its
// normal.
type Line struct {
	X, Y, NormalDeg float64
}

// SquareCentre returns the centre of a square (or any quadrilateral) from
// its four sides' lines, in order around it: the corners are the
// intersections of neighbouring sides, the centre the intersection of the
// diagonals, which a homography maps onto the image of the square's centre
// (projective maps keep incidence: R. Hartley and A. Zisserman, Multiple
// View Geometry in Computer Vision, 2nd ed. (2003), section 2.3). ok is
// false when two neighbouring sides are nearly parallel.
func SquareCentre(sides [4]Line) (x, y float64, ok bool) {
	var c [4][2]float64
	for k := range 4 {
		a, b := sides[k], sides[(k+1)%4]
		p, q, good := intersect(a, b)
		if !good {
			return 0, 0, false
		}
		c[k] = [2]float64{p, q}
	}
	// Diagonals c0-c2 and c1-c3.
	d1x, d1y := c[2][0]-c[0][0], c[2][1]-c[0][1]
	d2x, d2y := c[3][0]-c[1][0], c[3][1]-c[1][1]
	den := d1x*d2y - d1y*d2x
	if math.Abs(den) < 1e-9*(d1x*d1x+d1y*d1y) {
		return 0, 0, false
	}
	t := ((c[1][0]-c[0][0])*d2y - (c[1][1]-c[0][1])*d2x) / den
	return c[0][0] + t*d1x, c[0][1] + t*d1y, true
}

// intersect returns the crossing of two lines; ok is false when they are
// within 20 degrees of parallel.
func intersect(a, b Line) (float64, float64, bool) {
	sa, ca := math.Sincos(a.NormalDeg * math.Pi / 180)
	sb, cb := math.Sincos(b.NormalDeg * math.Pi / 180)
	det := ca*sb - sa*cb
	if math.Abs(det) < math.Sin(20*math.Pi/180) {
		return 0, 0, false
	}
	ra := ca*a.X + sa*a.Y
	rb := cb*b.X + sb*b.Y
	return (ra*sb - rb*sa) / det, (ca*rb - cb*ra) / det, true
}
