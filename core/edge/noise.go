package edge

import (
	"math"
	"sort"

	"sagitta/core/plane"
)

// pairNoise estimates the noise rms on each side of the edge from
// differences between pixels next to each other along the edge: two such
// pixels see almost the same part of the edge profile (their distances from
// the edge differ by sin(slant) px), so their difference is noise plus a
// tiny share of the profile's slope. The median absolute difference makes
// the estimate robust to stray detail: sigma = 1.4826 MAD / sqrt(2), the
// consistency factor of the MAD for a normal distribution (F. R. Hampel,
// JASA 69 (1974), p. 383). Only pixels farther than core px from the edge
// count, so the profile's steep part does not pass for noise; a profile
// with long, slowly falling tails (diffraction, flare) does not either,
// which a spread about a fitted line would mistake for noise.
func pairNoise(p *plane.Plane, r Region, f lineFit, flipped bool, core float64) (dark, light float64) {
	tx, ty, nx, ny := r.axes()
	if flipped {
		nx, ny = -nx, -ny
	}
	// Step to the neighbour along the pixel axis nearer the edge line.
	sx, sy := 1, 0
	if math.Abs(ty) > math.Abs(tx) {
		sx, sy = 0, 1
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
	return madSigma(dd), madSigma(dl)
}

// madSigma converts absolute pair differences into a noise rms.
func madSigma(d []float64) float64 {
	if len(d) < 8 {
		return 0
	}
	sort.Float64s(d)
	return 1.4826 * d[len(d)/2] / math.Sqrt2
}
