// Package field places measurements in the lens's image field: image height
// from the optical centre, and the sagittal / tangential classification of
// each measurement, then summarises them over the frame.
//
// Optics convention (meridional plane; see e.g. W. J. Smith, Modern Optical
// Engineering, 4th ed., ch. 3): the tangential plane contains the optical
// axis and the image point, so the tangential direction runs along the
// radius from the optical centre. The tangential MTF describes detail that
// varies along the radius (for an edge: the edge line lies across the radius,
// its normal is radial); the sagittal MTF describes detail that varies
// across the radius (the edge line lies along the radius).
package field

import (
	"fmt"
	"math"
)

// Orientation of a measurement relative to the radius through it.
type Orientation string

// The three orientations a measurement can have.
const (
	Sagittal   Orientation = "sagittal"
	Tangential Orientation = "tangential"
	Mixed      Orientation = "mixed"
)

// ToleranceDeg is how far the direction of measurement may turn from the
// radius (tangential) or from the perpendicular to it (sagittal) and still
// count as that orientation. 20 degrees either way keeps charts that are
// not perfectly aligned usable; the MTF of a lens with astigmatism changes
// with direction as cos^2 and sin^2 of the angle, so 20 degrees mixes in at
// most sin^2(20) = 12 % of the other orientation.
const ToleranceDeg = 20

// Geometry maps pixel positions onto the sensor.
type Geometry struct {
	CentreX, CentreY float64 // optical centre, px (continuous coordinates)
	PitchUM          float64 // pixel pitch, micrometres
	Width, Height    int     // image size, px
}

// NewGeometry returns the geometry of a w x h image with the optical centre
// at the image centre (w/2, h/2).
func NewGeometry(w, h int, pitchUM float64) Geometry {
	return Geometry{CentreX: float64(w) / 2, CentreY: float64(h) / 2, PitchUM: pitchUM, Width: w, Height: h}
}

// HeightMM returns the image height of the point (x, y) px: its distance
// from the optical centre on the sensor, in millimetres.
func (g Geometry) HeightMM(x, y float64) float64 {
	return math.Hypot(x-g.CentreX, y-g.CentreY) * g.PitchUM / 1000
}

// CornerMM returns the largest image height in the frame: the distance from
// the optical centre to the farthest image corner, in millimetres. For a
// 36 x 24 mm sensor with a centred axis it is sqrt(18^2 + 12^2) = 21.63 mm.
func (g Geometry) CornerMM() float64 {
	var r float64
	for _, c := range [4][2]float64{{0, 0}, {float64(g.Width), 0}, {0, float64(g.Height)}, {float64(g.Width), float64(g.Height)}} {
		r = math.Max(r, g.HeightMM(c[0], c[1]))
	}
	return r
}

// Classify returns the orientation of a measurement at (x, y) px whose
// direction of measurement (the edge normal, or the direction in which a
// pattern's contrast varies) is dirDeg, and the angle in degrees (0..90)
// between that direction and the radius. At the optical centre itself the
// radius has no direction and the result is Mixed.
func (g Geometry) Classify(x, y, dirDeg float64) (Orientation, float64) {
	rx, ry := x-g.CentreX, y-g.CentreY
	if math.Hypot(rx, ry) < 1e-9 {
		return Mixed, math.NaN()
	}
	radial := math.Atan2(ry, rx) * 180 / math.Pi
	d := math.Mod(math.Abs(dirDeg-radial), 180)
	if d > 90 {
		d = 180 - d
	}
	switch {
	case d <= ToleranceDeg:
		return Tangential, d
	case d >= 90-ToleranceDeg:
		return Sagittal, d
	}
	return Mixed, d
}

// Validate reports a clear error for an unusable geometry.
func (g Geometry) Validate() error {
	if !(g.PitchUM > 0) || g.PitchUM > 100 {
		return fmt.Errorf("field: pixel pitch %g um is outside (0, 100]", g.PitchUM)
	}
	if g.Width <= 0 || g.Height <= 0 {
		return fmt.Errorf("field: image size %dx%d is empty", g.Width, g.Height)
	}
	return nil
}
