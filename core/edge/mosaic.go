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
	s.dists(fit) // computed once for the estimator and the checks
	m := &Measurement{Method: Refined.String(), fit: fit, flipped: flipped, region: r}
	geometry(m, r, fit, s, flipped)
	freq := opt.grid()
	// Noise from pairs of a site and the next one of its own colour one
	// pattern period away (noise.go's pairNoise on the plane).
	nDark, nLight := pairNoiseAt(p, r, fit, flipped, coreWidth(fit), sites.Period, sites.Keep)
	// The mosaic's noise shape is not estimated: white noise is assumed
	// (the zero noiseShape), as the sites of one plane are not neighbours.
	if err := measureRefined(m, fit, s, freq, nDark, nLight, noiseShape{}); err != nil {
		return nil, err
	}
	assess(m, s, fit, nDark, nLight)
	return m, nil
}
