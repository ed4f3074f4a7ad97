package simcam

import (
	"fmt"
	"math"
)

// Scene is a test target in image coordinates (px): a background level with
// polygons painted over it in order, and sinusoidal stars and gratings.
// Levels are linear light, 1 = full scale.
//
// Restriction: stars and gratings are added to the rendered polygons by
// linear superposition of (pattern - Background) over their own area, which
// is exact only when no polygon overlaps a pattern's disc or rectangle (nor
// comes within the lens's support of it with a different level underneath).
type Scene struct {
	Background float64   // linear level of the background, in [0, 1]
	Polygons   []Polygon // painted in order, later over earlier
	Stars      []Star    // sinusoidal Siemens stars
	Gratings   []Grating // sine gratings
}

// Polygon is a simple polygon (no self-intersections; any winding) with
// vertices in px, filled with a linear level.
type Polygon struct {
	Pts   [][2]float64
	Level float64
	// Rough marks a polygon that only stands in for a shape nobody
	// measures (a circle drawn with many short sides, say): near its
	// vertices the renderer skips the exact 2D corner treatment and uses
	// the nearest side's blurred half-plane, which is off there by the
	// corner's share of the blur but renders many times faster. Along its
	// sides, away from vertices, values stay exact.
	Rough bool
}

// Star is a sinusoidal Siemens star centred at (X, Y) px: for r <= Radius,
// level(r, phi) = Mean + Amplitude * cos(Cycles * phi + PhaseDeg), phi the
// angle from +x towards +y. At radius r its local frequency is
// Cycles / (2 pi r) cycles/pixel.
//
// FadePx models a printed star whose printer cannot resolve its centre:
// for r < FadePx the level is Mean, and the amplitude rises linearly from 0
// at FadePx to full at 1.25 FadePx (core/chart's starPattern prints its
// stars so). 0 keeps the full amplitude to the centre.
type Star struct {
	X, Y, Radius    float64
	Cycles          int
	Mean, Amplitude float64
	PhaseDeg        float64
	FadePx          float64
}

// Grating is a sine grating filling the rectangle Corners (vertices in
// order, any rotation): level = Mean + Amplitude * cos(2 pi FreqCyPx
// (x cos a + y sin a) + PhaseDeg), a = DirectionDeg, the direction in which
// the level varies.
type Grating struct {
	Corners                   [4][2]float64
	FreqCyPx, DirectionDeg    float64
	Mean, Amplitude, PhaseDeg float64
}

// Square returns a square of side side px centred at (cx, cy), rotated by
// rotDeg (from +x towards +y), filled with level.
func Square(cx, cy, side, rotDeg, level float64) Polygon {
	s, c := math.Sincos(rotDeg * math.Pi / 180)
	h := side / 2
	pts := make([][2]float64, 4)
	for i, q := range [4][2]float64{{-h, -h}, {h, -h}, {h, h}, {-h, h}} {
		pts[i] = [2]float64{cx + q[0]*c - q[1]*s, cy + q[0]*s + q[1]*c}
	}
	return Polygon{Pts: pts, Level: level}
}

// HalfPlaneScene returns a scene of one straight edge through the image
// centre (w/2, h/2). The edge line makes angleDeg with the vertical axis,
// turning from +y (down) towards -x: angleDeg = 0 is a vertical edge with the
// dark side on the left (x < w/2) and the light side on the right; a positive
// angle tilts the top of the line to the right (clockwise on screen, since y
// points down). In general the light side is the one the unit normal
// n = (cos angleDeg, sin angleDeg) points into, so the edge's normal is at
// angleDeg and the dark side is at angleDeg + 180. The dark side is a
// polygon far larger than the frame, so only this one edge is in view.
func HalfPlaneScene(w, h int, angleDeg, dark, light float64) Scene {
	cx, cy := float64(w)/2, float64(h)/2
	big := 4 * float64(w+h+16)
	s, c := math.Sincos(angleDeg * math.Pi / 180)
	nx, ny := c, s  // normal, towards the light side
	tx, ty := -s, c // along the edge line
	pts := [][2]float64{
		{cx + big*tx, cy + big*ty},
		{cx + big*tx - big*nx, cy + big*ty - big*ny},
		{cx - big*tx - big*nx, cy - big*ty - big*ny},
		{cx - big*tx, cy - big*ty},
	}
	return Scene{Background: light, Polygons: []Polygon{{Pts: pts, Level: dark}}}
}

// Validate reports whether the scene is well formed: finite numbers, at
// least 3 vertices per polygon, positive star radius and cycles, a
// rectangular grating with a positive frequency. The error is an
// *InvalidError.
func (s Scene) Validate() error {
	if !finite(s.Background) {
		return invalidf("background level %v is not finite", s.Background)
	}
	for i, p := range s.Polygons {
		if len(p.Pts) < 3 {
			return invalidf("polygon %d has %d vertices, need at least 3", i, len(p.Pts))
		}
		if !finite(p.Level) {
			return invalidf("polygon %d level %v is not finite", i, p.Level)
		}
		for _, q := range p.Pts {
			if !finite(q[0]) || !finite(q[1]) {
				return invalidf("polygon %d has a non-finite vertex", i)
			}
		}
		if math.Abs(polyArea(p.Pts)) == 0 {
			return invalidf("polygon %d has zero area", i)
		}
	}
	for i, st := range s.Stars {
		if !finite(st.X) || !finite(st.Y) || !finite(st.Mean) || !finite(st.Amplitude) || !finite(st.PhaseDeg) {
			return invalidf("star %d has a non-finite parameter", i)
		}
		if !(st.Radius > 0) || st.Radius > 1e5 {
			return invalidf("star %d radius %v px out of range (0, 1e5]", i, st.Radius)
		}
		if st.Cycles < 1 {
			return invalidf("star %d has %d cycles, need at least 1", i, st.Cycles)
		}
		if !finite(st.FadePx) || st.FadePx < 0 || st.FadePx > st.Radius {
			return invalidf("star %d fade radius %v px out of range [0, radius]", i, st.FadePx)
		}
	}
	for i, g := range s.Gratings {
		if !finite(g.FreqCyPx) || g.FreqCyPx < 0 || !finite(g.DirectionDeg) || !finite(g.Mean) || !finite(g.Amplitude) || !finite(g.PhaseDeg) {
			return invalidf("grating %d has an invalid parameter", i)
		}
		if !isRectangle(g.Corners) {
			return invalidf("grating %d corners do not form a rectangle", i)
		}
	}
	return nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// isRectangle reports whether c are the corners of a non-degenerate
// rectangle in order (to 1e-6 relative).
func isRectangle(c [4][2]float64) bool {
	for _, q := range c {
		if !finite(q[0]) || !finite(q[1]) {
			return false
		}
	}
	size := 0.0
	for i := range 4 {
		a, b := c[i], c[(i+1)%4]
		size = math.Max(size, math.Hypot(b[0]-a[0], b[1]-a[1]))
	}
	if size == 0 {
		return false
	}
	for i := range 4 {
		a, b, d := c[i], c[(i+1)%4], c[(i+3)%4]
		ux, uy := b[0]-a[0], b[1]-a[1]
		vx, vy := d[0]-a[0], d[1]-a[1]
		if math.Hypot(ux, uy) < 1e-9*size || math.Hypot(vx, vy) < 1e-9*size {
			return false
		}
		if math.Abs(ux*vx+uy*vy) > 1e-6*size*size {
			return false
		}
	}
	return true
}

// InvalidError reports a scene or camera description that cannot be
// rendered.
type InvalidError string

func (e InvalidError) Error() string { return "simcam: invalid input: " + string(e) }

// UnsupportedError reports a valid request this package does not implement.
type UnsupportedError string

func (e UnsupportedError) Error() string { return "simcam: unsupported: " + string(e) }

func invalidf(format string, a ...any) error {
	return InvalidError(fmt.Sprintf(format, a...))
}
