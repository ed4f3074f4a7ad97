package edge

import (
	"math"

	"sagitta/core/plane"
)

// Region is an oriented rectangle around one straight edge segment: the
// part of the image a measurement reads. Coordinates follow core/plane
// (continuous px, x right, y down, pixel centres at half-integers).
type Region struct {
	X, Y      float64 // centre of the segment, px
	AngleDeg  float64 // direction of the edge line, degrees from +x towards +y
	HalfLen   float64 // half length along the edge, px
	HalfWidth float64 // half width across the edge, px
}

// axes returns the unit vector along the edge (t) and across it (n).
func (r Region) axes() (tx, ty, nx, ny float64) {
	s, c := math.Sincos(r.AngleDeg * math.Pi / 180)
	return c, s, -s, c
}

// Corners returns the four corners of the region in image coordinates,
// in drawing order.
func (r Region) Corners() [4][2]float64 {
	tx, ty, nx, ny := r.axes()
	var out [4][2]float64
	for i, sg := range [4][2]float64{{-1, -1}, {1, -1}, {1, 1}, {-1, 1}} {
		out[i] = [2]float64{
			r.X + sg[0]*r.HalfLen*tx + sg[1]*r.HalfWidth*nx,
			r.Y + sg[0]*r.HalfLen*ty + sg[1]*r.HalfWidth*ny,
		}
	}
	return out
}

// box returns the pixels (inclusive ranges) of a w x h plane whose centres
// may lie inside the region: its bounding box.
func (r Region) box(w, h int) (x0, x1, y0, y1 int) {
	tx, ty, nx, ny := r.axes()
	ex := math.Abs(r.HalfLen*tx) + math.Abs(r.HalfWidth*nx)
	ey := math.Abs(r.HalfLen*ty) + math.Abs(r.HalfWidth*ny)
	x0 = max(int(math.Floor(r.X-ex-0.5)), 0)
	x1 = min(int(math.Ceil(r.X+ex-0.5)), w-1)
	y0 = max(int(math.Floor(r.Y-ey-0.5)), 0)
	y1 = min(int(math.Ceil(r.Y+ey-0.5)), h-1)
	return
}

// samples holds the pixels of a region in the region's own frame: u along
// the edge, w across it (both px, origin at the region centre), and v the
// linear pixel value.
type samples struct {
	u, w, v []float64
	// d caches each sample's distance from the fitted edge (see dists).
	d []float64
	// at is each sample's pixel in the region's bounding box (r.box) of
	// bw x bh px from (bx0, by0): (y - by0)*bw + x - bx0. Only gatherSites
	// fills it.
	at               []int32
	bx0, by0, bw, bh int
	// sc, if not nil, is the measurement's scratch the slices come from.
	sc *scratch
}

// buf returns the slice of the samples' scratch that field picks, or nil
// without a scratch (the callee then allocates).
func (s *samples) buf(field func(*scratch) *[]float64) *[]float64 {
	if s.sc == nil {
		return nil
	}
	return field(s.sc)
}

// plateauSides returns each pixel's side of the fitted edge over the
// samples' bounding box with a column and a row of zeros added (a grid of
// (bw + 1) x (bh + 1)): -1 on the dark plateau (distance below -core),
// +1 on the light one (above core), 0 within the edge's core or outside
// the region. It reads the distances of dists, so the noise estimates
// classify the pixels exactly as the estimator does, and with no distance
// computed again.
func (s *samples) plateauSides(core float64) []int8 {
	gw := s.bw + 1
	var grid []int8
	if s.sc != nil {
		grid = take(s.sc.sides, gw*(s.bh+1))[:gw*(s.bh+1)]
		clear(grid)
		s.sc.sides = grid
	} else {
		grid = make([]int8, gw*(s.bh+1))
	}
	for i, d := range s.d {
		var k int8
		switch {
		case d < -core:
			k = -1
		case d > core:
			k = 1
		default:
			continue
		}
		a := int(s.at[i])
		grid[a/s.bw*gw+a%s.bw] = k
	}
	return grid
}

// dists returns each sample's distance from the fitted edge f
// (lineFit.dist). The estimator, the quality checks and the sharpening
// check all read it for the one final fit of a measurement, so it is
// computed once, by the first of them, and shared (read-only) after. Call it
// only with that final fit, after orient.
func (s *samples) dists(f lineFit) []float64 {
	if len(s.d) == len(s.v) && s.d != nil {
		return s.d
	}
	if s.sc != nil {
		s.d = take(s.sc.d, len(s.v))[:len(s.v)]
		s.sc.d = s.d
	} else {
		s.d = make([]float64, len(s.v))
	}
	for i := range s.d {
		s.d[i] = f.dist(s.u[i], s.w[i])
	}
	return s.d
}

// gather collects every pixel whose centre lies inside the region and inside
// the plane. It allocates once, sized from the region's area.
func gather(p *plane.Plane, r Region) samples { return gatherInto(p, r, nil, nil) }

// gatherSites is gather over the photosites keep selects (nil: every
// pixel), for one plane of a colour mosaic (mosaic.go).
func gatherSites(p *plane.Plane, r Region, keep func(x, y int) bool) samples {
	return gatherInto(p, r, keep, nil)
}

// gatherInto is gatherSites into the slices of sc (nil: new ones), which
// keeps the (possibly grown) slices for the next region.
func gatherInto(p *plane.Plane, r Region, keep func(x, y int) bool, sc *scratch) samples {
	tx, ty, nx, ny := r.axes()
	x0, x1, y0, y1 := r.box(p.W, p.H)
	n := int(4*r.HalfLen*r.HalfWidth) + 16
	if sc == nil {
		sc = &scratch{}
	}
	sc.flat = flatCache{}
	s := samples{u: take(sc.u, n), w: take(sc.w, n), v: take(sc.v, n), at: take(sc.at, n),
		bx0: x0, by0: y0, bw: max(x1-x0+1, 0), bh: max(y1-y0+1, 0), sc: sc}
	defer func() { sc.u, sc.w, sc.v, sc.at = s.u, s.w, s.v, s.at }()
	for y := y0; y <= y1; y++ {
		dy := float64(y) + 0.5 - r.Y
		row := p.Pix[y*p.W : (y+1)*p.W]
		for x := x0; x <= x1; x++ {
			if keep != nil && !keep(x, y) {
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
			s.at = append(s.at, int32((y-y0)*s.bw+x-x0))
		}
	}
	return s
}
