package edge

import (
	"errors"
	"math"

	"sagitta/core/plane"
)

// Where an edge lies in each colour channel. Lateral chromatic aberration
// (a magnification that differs by wavelength) moves the image of an edge
// by a different amount in red, green and blue; the displacement between
// channels is what ISO 19084:2015 (Photography - Digital cameras -
// Chromatic displacement measurements) measures. A measured edge already
// holds its fitted line (fit.go: position, angle, curvature, width, from
// every pixel of the region); a channel's image of the same edge is parallel
// to it, so its fit keeps the angle and the curvature and finds only its
// own offset along the normal, its plateaus and its width: four parameters
// instead of six, on the pixels of the same band, so the offsets of the
// three channels are measured from one geometry and cost little.

// ErrNoChannelEdge is returned by ChannelOffset when the channel shows no
// step at the edge (a colour that does not see the target's contrast).
var ErrNoChannelEdge = errors.New("edge: the colour channel shows no edge where the luminance has one")

// ChannelOffset returns where the edge of m lies in another plane of the
// same photo: the distance (px) along m's normal (NormalDeg, positive
// towards the light side) from m's fitted edge to the channel's, and its
// standard error from the fit's residuals (the Gauss-Newton covariance,
// white noise assumed: the error of correlated noise, as after demosaicking
// or JPEG chroma upsampling, is larger). p is the channel's plane, a crop
// whose pixel (0, 0) is the photo's pixel (ox, oy); keep, if not nil,
// selects the photosites of one plane of a raw mosaic (in the photo's
// pixel coordinates), as MeasureSites does.
func (m *Measurement) ChannelOffset(p *plane.Plane, ox, oy int, keep func(x, y int) bool) (offPx, sePx float64, err error) {
	r := m.region
	r.X -= float64(ox)
	r.Y -= float64(oy)
	var k func(x, y int) bool
	if keep != nil {
		k = func(x, y int) bool { return keep(x+ox, y+oy) }
	}
	s := gatherSites(p, r, k)
	if m.flipped {
		for i := range s.w {
			s.w[i] = -s.w[i]
		}
	}
	f := m.fit
	band := math.Min(halfWidthFor(f), r.HalfWidth)
	sub := within(s, f, band)
	if len(sub.v) < 32 {
		return 0, 0, ErrNoEdge
	}
	// Start from the channel's own plateaus: the levels on either side of
	// the luminance edge, beyond twice its width.
	var sd, sl float64
	var nd, nl int
	for i := range sub.v {
		d := f.dist(sub.u[i], sub.w[i])
		switch {
		case d < -2*f.Width-1:
			sd += sub.v[i]
			nd++
		case d > 2*f.Width+1:
			sl += sub.v[i]
			nl++
		}
	}
	if nd < 8 || nl < 8 {
		return 0, 0, ErrNoEdge
	}
	f.Dark, f.Step = sd/float64(nd), sl/float64(nl)-sd/float64(nd)
	if !(math.Abs(f.Step) > 0) {
		return 0, 0, ErrNoChannelEdge
	}
	if !levenberg(&f, sub, r.HalfLen, 4) || !(f.Step > 0) {
		return 0, 0, ErrNoChannelEdge
	}
	// Standard error of Rho: sigma^2 (J'J)^-1 at the solution, the four
	// free parameters only.
	var jtj [6][6]float64
	p6 := [6]float64{f.Dark, f.Step, f.Width, f.Rho, f.Alpha * r.HalfLen, f.Kappa * r.HalfLen * r.HalfLen}
	var g [6]float64
	for i := range sub.v {
		modelGrad(p6, sub.u[i]/r.HalfLen, sub.w[i], &g)
		for a := range 4 {
			for b := range 4 {
				jtj[a][b] += g[a] * g[b]
			}
		}
	}
	jtj[4][4], jtj[5][5] = 1, 1
	col, ok := solve(jtj, [6]float64{3: 1})
	if !ok || !(col[3] > 0) {
		return 0, 0, ErrNoChannelEdge
	}
	dof := float64(max(len(sub.v)-4, 1))
	sigma2 := f.RMS * f.RMS * float64(len(sub.v)) / dof
	// Rho is measured across the region; the normal is tilted by Alpha.
	scale := 1 / math.Sqrt(1+m.fit.Alpha*m.fit.Alpha)
	return (f.Rho - m.fit.Rho) * scale, math.Sqrt(sigma2*col[3]) * scale, nil
}

// halfWidthFor is the half-width (px) of the band around the luminance
// edge that a channel's fit reads: the luminance fit's band (fitBandPx, or
// wider for a wide edge).
func halfWidthFor(f lineFit) float64 { return math.Max(fitBandPx, 5*f.Width) }
