package edge

import (
	"cmp"
	"errors"
	"math"
	"slices"

	"sagitta/core/plane"
)

// Where an edge lies in each colour channel. Lateral chromatic aberration
// (a magnification that differs by wavelength) moves the image of an edge
// by a different amount in red, green and blue; the displacement between
// channels is what ISO 19084:2015 (Photography - Digital cameras -
// Chromatic displacement measurements) measures. A measured edge already
// holds its fitted line (fit.go: position, angle and curvature from every
// pixel of the region); a channel's image of the same edge is parallel to
// it, so each channel needs only its offset along the normal.
//
// The offset is the area-based edge position: with the channel's profile
// q(d) normalised to 0 on the dark and 1 on the light plateau, d the
// distance from the luminance edge along its local normal, an edge at d0
// has integral over [-B, B] of q(d) dd = B - d0 for any profile symmetric
// about d0 (the same rule as the strip estimates of fitEdge). Unlike a fit
// of a model profile it is linear in the signal: a channel made of a sharp
// part and a blurred part (JPEG's full-resolution luminance plus its
// half-resolution colour difference, say) lies at the weighted mean of the
// two parts' positions, as its light does, where a model fit would follow
// the sharp part. The samples are taken where they fall (sorted by d,
// trapezoid rule), so no bins are filled.

// ErrNoChannelEdge is returned by ChannelOffset when the channel shows no
// step at the edge (a colour that does not see the target's contrast).
var ErrNoChannelEdge = errors.New("edge: the colour channel shows no edge where the luminance has one")

// ChannelOffset returns where the edge of m lies in another plane of the
// same photo: the distance (px) along m's normal (NormalDeg, positive
// towards the light side) from m's fitted edge to the channel's, and its
// standard error from the plateaus' noise (white noise assumed: after
// demosaicking or JPEG colour upsampling the noise is correlated and the
// error larger). p is the channel's plane, a crop whose pixel (0, 0) is the
// photo's pixel (ox, oy); keep, if not nil, selects the photosites of one
// plane of a raw mosaic (in the photo's pixel coordinates), as MeasureSites
// does.
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
	// The window: the profile's blur (a logistic of width s has a standard
	// deviation of 1.8 s) six times over plus 4 px for a softer channel,
	// within the region.
	b := math.Min(6*1.8*f.Width+4, r.HalfWidth-0.5)
	if b < 3 {
		return 0, 0, ErrNoEdge
	}
	type pt struct{ d, v float64 }
	pts := make([]pt, 0, len(s.v))
	var sd, sl, qd, ql float64
	var nd, nl int
	for i := range s.v {
		d := f.dist(s.u[i], s.w[i])
		if math.Abs(d) > b {
			continue
		}
		v := s.v[i]
		pts = append(pts, pt{d, v})
		// Plateaus: the outer third of the window on each side.
		switch {
		case d < -2*b/3:
			sd += v
			qd += v * v
			nd++
		case d > 2*b/3:
			sl += v
			ql += v * v
			nl++
		}
	}
	if nd < 8 || nl < 8 || len(pts) < 32 {
		return 0, 0, ErrNoEdge
	}
	dark, light := sd/float64(nd), sl/float64(nl)
	step := light - dark
	vd := math.Max(qd/float64(nd)-dark*dark, 0)
	vl := math.Max(ql/float64(nl)-light*light, 0)
	noise2 := 0.5 * (vd + vl)
	if !(step > 0) || step*step < 25*noise2 {
		return 0, 0, ErrNoChannelEdge
	}
	slices.SortFunc(pts, func(a, b pt) int { return cmp.Compare(a.d, b.d) })
	// Trapezoid rule over the samples, extended flat to the window's ends;
	// each sample's weight is half the span to its neighbours.
	var area, w2 float64
	n := len(pts)
	for i := range pts {
		lo, hi := -b, b
		if i > 0 {
			lo = 0.5 * (pts[i-1].d + pts[i].d)
		}
		if i < n-1 {
			hi = 0.5 * (pts[i].d + pts[i+1].d)
		}
		w := hi - lo
		area += w * (pts[i].v - dark) / step
		w2 += w * w
	}
	d0 := b - area
	// Its variance: the samples' noise through their weights, and the
	// plateau levels' errors (area depends on dark with weight (b + d0)
	// and on light with weight (b - d0), over the step).
	v := noise2*w2 + vd/float64(nd)*(b+d0)*(b+d0) + vl/float64(nl)*(b-d0)*(b-d0)
	return d0, math.Sqrt(v) / step, nil
}
