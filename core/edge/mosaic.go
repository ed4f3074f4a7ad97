package edge

import (
	"fmt"
	"math"

	"sagitta/core/plane"
)

// Measuring on a colour filter array mosaic, without demosaicing.
//
// A raw photo holds one colour per photosite. Each colour plane is a set of
// samples of the same edge spread function, only sparser: the red sites of
// a 2x2 pattern lie on a lattice of pitch 2 px, the two greens together on
// a quincunx (a checkerboard). The slanted-edge projection does not need a
// dense grid: every site is projected onto the fitted edge normal at its own
// sub-pixel distance (the photo's pixel coordinates of its centre), and the
// refined estimator, which keeps the samples at the phases where they fall
// instead of filling bins, takes them as they come. Each site still
// integrates light over its own photosite (one photo pixel), so the
// expected MTF is the lens times the pixel aperture's sinc, in cycles per
// photo pixel along the normal, whatever the plane's spacing; the spacing
// sets only where aliasing begins (see PlaneNyquist).
//
// Frequencies are therefore always cycles per photo pixel (the sensor's
// photosite pitch), the same unit as for a dense photo, so a raw result
// and a JPEG of the same lens share one axis.

// Sites selects the photosites of one plane of a mosaic.
type Sites struct {
	// Keep reports whether pixel (x, y) of the mosaic belongs to the plane.
	Keep func(x, y int) bool
	// Period is the pattern's repeat in px along each axis (2 for a 2x2
	// pattern): a site's neighbour of the same plane along a pixel axis.
	Period int
}

// PlaneNyquist returns the Nyquist frequency, in cycles per photo pixel
// along an edge normal at normalDeg, of the sampling lattice of a plane of
// a 2x2 pattern: a red or blue plane (pitch 2 px on both axes; the
// alias-free band is the square |fx|, |fy| <= 1/4) gives
// 0.25 / max(|cos t|, |sin t|); the green quincunx (lattice vectors (1, 1)
// and (1, -1); its reciprocal lattice (1/2, 1/2), (1/2, -1/2) bounds the
// alias-free band by the diamond |fx| + |fy| <= 1/2) gives
// 0.5 / (|cos t| + |sin t|). (Lattice sampling: D. E. Dudgeon and
// R. M. Mersereau, Multidimensional Digital Signal Processing, 1984,
// ch. 1.4.)
func PlaneNyquist(quincunx bool, normalDeg float64) float64 {
	s, c := math.Sincos(normalDeg * math.Pi / 180)
	c, s = math.Abs(c), math.Abs(s)
	if quincunx {
		return 0.5 / (c + s)
	}
	return 0.25 / math.Max(c, s)
}

// MeasureSites measures the edge in region r of the mosaic p using only the
// photosites sites selects, with the refined estimator (the ISO procedure
// bins on the dense pixel grid and is not defined for a sparse plane; a
// request for it is measured refined and the Method field says so).
// Coordinates and frequencies are in photo pixels. It panics if sites has
// no Keep function or a Period below 1 (a programmer error).
func MeasureSites(p *plane.Plane, sites Sites, r Region, opt Options) (*Measurement, error) {
	if r.HalfLen < 5 || r.HalfWidth < 4 {
		return nil, fmt.Errorf("edge: region too small (%.0f x %.0f px)", 2*r.HalfLen, 2*r.HalfWidth)
	}
	if sites.Keep == nil || sites.Period < 1 {
		panic("edge: MeasureSites needs a site selector and a period >= 1")
	}
	s := gatherSites(p, r, sites.Keep)
	fit, ok := fitEdge(s, r.HalfLen, r.HalfWidth)
	if !ok || fit.Step == 0 {
		return nil, ErrNoEdge
	}
	flipped := orient(&fit, &s)
	m := &Measurement{Method: Refined.String()}
	geometry(m, r, fit, s, flipped)
	freq := opt.grid()
	nDark, nLight := pairNoiseSites(p, r, fit, flipped, coreWidth(fit), sites)
	// The mosaic's noise shape is not estimated: white noise is assumed
	// (the zero noiseShape), as the sites of one plane are not neighbours.
	if err := measureRefined(m, fit, s, freq, nDark, nLight, noiseShape{}); err != nil {
		return nil, err
	}
	assess(m, s, fit, nDark, nLight)
	return m, nil
}

// gatherSites is gather restricted to the selected photosites.
func gatherSites(p *plane.Plane, r Region, keep func(x, y int) bool) samples {
	tx, ty, nx, ny := r.axes()
	ex := math.Abs(r.HalfLen*tx) + math.Abs(r.HalfWidth*nx)
	ey := math.Abs(r.HalfLen*ty) + math.Abs(r.HalfWidth*ny)
	x0 := max(int(math.Floor(r.X-ex-0.5)), 0)
	x1 := min(int(math.Ceil(r.X+ex-0.5)), p.W-1)
	y0 := max(int(math.Floor(r.Y-ey-0.5)), 0)
	y1 := min(int(math.Ceil(r.Y+ey-0.5)), p.H-1)
	n := int(2*r.HalfLen*r.HalfWidth) + 16
	s := samples{make([]float64, 0, n), make([]float64, 0, n), make([]float64, 0, n)}
	for y := y0; y <= y1; y++ {
		dy := float64(y) + 0.5 - r.Y
		row := p.Pix[y*p.W : (y+1)*p.W]
		for x := x0; x <= x1; x++ {
			if !keep(x, y) {
				continue
			}
			dx := float64(x) + 0.5 - r.X
			u := dx*tx + dy*ty
			w := dx*nx + dy*ny
			if math.Abs(u) > r.HalfLen || math.Abs(w) > r.HalfWidth {
				continue
			}
			s.u = append(s.u, u)
			s.w = append(s.w, w)
			s.v = append(s.v, float64(row[x]))
		}
	}
	return s
}

// pairNoiseSites is pairNoise (noise.go) on one plane of a mosaic: the
// pairs are a site and its neighbour of the same plane one pattern period
// away along the pixel axis nearer the edge line, so the two see nearly
// the same part of the profile and the same filter colour.
func pairNoiseSites(p *plane.Plane, r Region, f lineFit, flipped bool, core float64, sites Sites) (dark, light float64) {
	tx, ty, nx, ny := r.axes()
	if flipped {
		nx, ny = -nx, -ny
	}
	k := sites.Period
	sx, sy := k, 0
	if math.Abs(ty) > math.Abs(tx) {
		sx, sy = 0, k
	}
	var dd, dl []float64
	ex := math.Abs(r.HalfLen*tx) + math.Abs(r.HalfWidth*nx)
	ey := math.Abs(r.HalfLen*ty) + math.Abs(r.HalfWidth*ny)
	x0 := max(int(math.Floor(r.X-ex-0.5)), 0)
	x1 := min(int(math.Ceil(r.X+ex-0.5)), p.W-1-sx)
	y0 := max(int(math.Floor(r.Y-ey-0.5)), 0)
	y1 := min(int(math.Ceil(r.Y+ey-0.5)), p.H-1-sy)
	side := func(x, y int) float64 {
		dx, dy := float64(x)+0.5-r.X, float64(y)+0.5-r.Y
		u, w := dx*tx+dy*ty, dx*nx+dy*ny
		if math.Abs(u) > r.HalfLen || math.Abs(w) > r.HalfWidth {
			return 0
		}
		d := f.dist(u, w)
		switch {
		case d < -core:
			return -1
		case d > core:
			return 1
		}
		return 0
	}
	for y := y0; y <= y1; y++ {
		for x := x0; x <= x1; x++ {
			if !sites.Keep(x, y) {
				continue
			}
			s := side(x, y)
			if s == 0 || side(x+sx, y+sy) != s {
				continue
			}
			diff := math.Abs(float64(p.At(x, y) - p.At(x+sx, y+sy)))
			if s < 0 {
				dd = append(dd, diff)
			} else {
				dl = append(dl, diff)
			}
		}
	}
	return trimmedSigma(dd), trimmedSigma(dl)
}
