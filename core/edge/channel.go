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
// does. For several planes of the same pixels (red, green and blue), use
// one ChannelWindow for all of them.
func (m *Measurement) ChannelOffset(p *plane.Plane, ox, oy int, keep func(x, y int) bool) (offPx, sePx float64, err error) {
	return m.ChannelWindow(p.W, p.H, ox, oy, keep).Offset(p)
}

// ChannelWindow holds what ChannelOffset needs of the region's geometry
// alone, whatever the channel: which pixels lie within the window about
// the fitted edge, which of them on a plateau, their order by distance from
// the edge and their trapezoid weights. The planes of one crop share it, so
// each is read once and nothing is sorted again.
type ChannelWindow struct {
	err  error
	w, h int     // the size of the planes it reads
	b    float64 // the window's half-width, px
	// The samples within the window in row order: each one's pixel index
	// in the plane and its plateau (-1 dark, +1 light, 0 neither).
	pix  []int32
	side []int8
	// The samples' order by distance from the edge, each one's weight in
	// the trapezoid rule there, and the sum of the squared weights.
	ord    []int32
	weight []float64
	w2     float64
}

// ChannelWindow prepares ChannelOffset for planes of w x h pixels whose
// pixel (0, 0) is the photo's pixel (ox, oy); keep as for ChannelOffset.
func (m *Measurement) ChannelWindow(w, h, ox, oy int, keep func(x, y int) bool) *ChannelWindow {
	cw := &ChannelWindow{w: w, h: h}
	r := m.region
	r.X -= float64(ox)
	r.Y -= float64(oy)
	f := m.fit
	// The window: the profile's blur (a logistic of width s has a standard
	// deviation of 1.8 s) six times over plus 4 px for a softer channel,
	// within the region.
	b := math.Min(6*1.8*f.Width+4, r.HalfWidth-0.5)
	if b < 3 {
		cw.err = ErrNoEdge
		return cw
	}
	cw.b = b
	// The pixels whose centres lie inside the region (as gatherSites
	// takes them), their distances and plateaus.
	tx, ty, nx, ny := r.axes()
	if m.flipped {
		nx, ny = -nx, -ny
	}
	x0, x1, y0, y1 := r.box(w, h)
	// Room for the pixels of the window's band across the whole region
	// (2 b by 2 HalfLen, with some to spare).
	room := int(4*b*r.HalfLen) + 64
	cw.pix = make([]int32, 0, room)
	cw.side = make([]int8, 0, room)
	dist := make([]float64, 0, room)
	var nd, nl int
	// A pixel whose offset across the edge curve exceeds b times the
	// largest slope factor of lineFit.dist over the region lies outside
	// the window whatever its distance's rounding: it is passed over
	// without the distance's square root and division.
	smax := math.Abs(f.Alpha) + 2*math.Abs(f.Kappa)*r.HalfLen
	far := b * math.Sqrt(1+smax*smax) * (1 + 1e-9)
	for y := y0; y <= y1; y++ {
		dy := float64(y) + 0.5 - r.Y
		for x := x0; x <= x1; x++ {
			if keep != nil && !keep(x+ox, y+oy) {
				continue
			}
			dx := float64(x) + 0.5 - r.X
			u := dx*tx + dy*ty
			wv := dx*nx + dy*ny
			if math.Abs(u) > r.HalfLen || math.Abs(wv) > r.HalfWidth {
				continue
			}
			if math.Abs(wv-f.Rho-f.Alpha*u-f.Kappa*u*u) > far {
				continue
			}
			d := f.dist(u, wv)
			if math.Abs(d) > b {
				continue
			}
			// Plateaus: the outer third of the window on each side.
			var sd int8
			switch {
			case d < -2*b/3:
				sd = -1
				nd++
			case d > 2*b/3:
				sd = 1
				nl++
			}
			cw.pix = append(cw.pix, int32(y*w+x))
			cw.side = append(cw.side, sd)
			dist = append(dist, d)
		}
	}
	n := len(dist)
	if nd < 8 || nl < 8 || n < 32 {
		cw.err = ErrNoEdge
		return cw
	}
	cw.ord = make([]int32, n)
	for i := range cw.ord {
		cw.ord[i] = int32(i)
	}
	sortByKey(cw.ord, dist, -b, b, nil, nil)
	// Trapezoid rule over the samples, extended flat to the window's ends;
	// each sample's weight is half the span to its neighbours.
	cw.weight = make([]float64, n)
	for j, i := range cw.ord {
		lo, hi := -b, b
		if j > 0 {
			lo = 0.5 * (dist[cw.ord[j-1]] + dist[i])
		}
		if j < n-1 {
			hi = 0.5 * (dist[i] + dist[cw.ord[j+1]])
		}
		wt := hi - lo
		cw.weight[j] = wt
		cw.w2 += wt * wt
	}
	return cw
}

// Offset is ChannelOffset for the plane p, which must be of the window's
// size.
func (cw *ChannelWindow) Offset(p *plane.Plane) (offPx, sePx float64, err error) {
	if cw.err != nil {
		return 0, 0, cw.err
	}
	if p.W != cw.w || p.H != cw.h {
		return 0, 0, errors.New("edge: the colour plane is not of the size its window was made for")
	}
	b := cw.b
	var sd, sl, qd, ql float64
	var nd, nl int
	for k, i := range cw.pix {
		v := float64(p.Pix[i])
		switch cw.side[k] {
		case -1:
			sd += v
			qd += v * v
			nd++
		case 1:
			sl += v
			ql += v * v
			nl++
		}
	}
	dark, light := sd/float64(nd), sl/float64(nl)
	step := light - dark
	vd := math.Max(qd/float64(nd)-dark*dark, 0)
	vl := math.Max(ql/float64(nl)-light*light, 0)
	noise2 := 0.5 * (vd + vl)
	if !(step > 0) || step*step < 25*noise2 {
		return 0, 0, ErrNoChannelEdge
	}
	var area float64
	for j, i := range cw.ord {
		area += cw.weight[j] * (float64(p.Pix[cw.pix[i]]) - dark) / step
	}
	d0 := b - area
	// Its variance: the samples' noise through their weights, and the
	// plateau levels' errors (area depends on dark with weight (b + d0)
	// and on light with weight (b - d0), over the step).
	v := noise2*cw.w2 + vd/float64(nd)*(b+d0)*(b+d0) + vl/float64(nl)*(b-d0)*(b-d0)
	return d0, math.Sqrt(v) / step, nil
}
