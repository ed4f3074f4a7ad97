package sine

import (
	"math"
	"slices"

	"sagitta/core/internal/coarse"
	"sagitta/core/plane"
)

// Detection works on a reduced copy of the photo (box average of k x k
// blocks, about FindOptions.CoarsePx across):
//
//  1. Texture: the band-passed image d = c - boxmean(c) over a window of
//     2 texRad + 1 coarse px; its local rms s = sqrt(boxmean(d^2)); and the
//     local density of zero crossings of d between horizontal and vertical
//     neighbours, counting only crossings steeper than 0.3 s so that noise
//     on flat paper beside an edge does not count. A sine pattern of period
//     P coarse px has 2/P to 2.8/P crossings per pixel; a single edge has
//     about 1/(2 texRad + 1). Pixels with density >= minCrossings and
//     s >= minTexContrast times the local mean are textured.
//  2. Blobs: 8-connected components of textured pixels, large enough for
//     the smallest star or grating wanted.
//  3. Shape of the isophotes in each blob (centre.go): parallel lines (the
//     smaller eigenvalue of the gradient structure tensor below
//     gratingRatio times the larger, and most gradient energy within 15
//     degrees of one direction) make a grating; lines that meet in one
//     point inside the blob (a robust least-squares meeting point through
//     which most of the gradient energy's isophotes pass, and about which
//     the same angular harmonic dominates two circles) make a star.
//     Everything else (text, clusters of small shapes) is dropped.
//
// Candidates are checked and measured at full resolution by MeasureStar and
// MeasureGrating, which reject what is not a clean sine pattern.

const (
	texRad         = 6    // half window of the texture measures, coarse px
	minCrossings   = 0.25 // zero crossings per coarse pixel (both directions)
	minTexContrast = 0.04 // local rms of the band-passed image / local mean
	stepFactor     = 0.3  // a crossing counts when the step across it exceeds this times the local rms
	gratingRatio   = 0.15 // eigenvalue ratio below which isophotes count as parallel
	gratingCoher   = 0.6  // share of gradient energy within 15 degrees of the main direction
	starInliers    = 0.45 // share of gradient energy whose isophote passes the centre (within 14.5 degrees)
	pyramidLevels  = 4
)

// FindOptions tunes Find. The zero value uses the defaults.
type FindOptions struct {
	CoarsePx    int     // longer side of the reduced image, px (default 1500)
	MinRadiusPx float64 // smallest star radius, and half the smallest grating side, to report, px (default 24)
	// Views, when not nil, are reductions of the photo shared with the
	// other searches (the same reduction is made once).
	Views *coarse.Views
}

func (o FindOptions) withDefaults() FindOptions {
	if o.CoarsePx <= 0 {
		o.CoarsePx = 1500
	}
	if !(o.MinRadiusPx > 0) {
		o.MinRadiusPx = 24
	}
	return o
}

// Kind says what a Candidate is.
type Kind int

// The kinds of sine pattern.
const (
	KindStar Kind = iota
	KindGrating
)

// String names the kind as in the JSON contract.
func (k Kind) String() string {
	if k == KindGrating {
		return "grating"
	}
	return "star"
}

// Candidate is a sine pattern found in a photo, not yet measured.
type Candidate struct {
	Kind Kind
	// X, Y is the star's centre or the grating's middle, px.
	X, Y float64
	// RadiusPx is the star's approximate outer radius, or half the
	// grating's diagonal, px.
	RadiusPx float64
	// Corners is the grating's approximate rectangle, px (gratings only).
	Corners [4][2]float64
	// DirectionDeg is the grating's direction of modulation, degrees in
	// [0, 180) (gratings only).
	DirectionDeg float64
}

// Find returns the sinusoidal stars and sine gratings that p seems to hold.
// The search runs on pyramidLevels levels of a pyramid (reductions by k,
// 2k, 4k, 8k), because the texture test sees periods of about 2.5 to 8 px
// at each level: fine gratings and the inner part of stars show at the
// first, coarse gratings at the others. Candidates found on several levels are
// reported once.
func Find(p *plane.Plane, opt FindOptions) []Candidate {
	opt = opt.withDefaults()
	// The first level is at least CoarsePx across (the reduction rounds
	// down): rounding up could leave the outer rim of a small star finer
	// than the texture test sees at every level.
	k := max(1, max(p.W, p.H)/opt.CoarsePx)
	c := coarse.Of(opt.Views, p).Shrink(k)
	ws := newWorkspace(c.W * c.H)
	var out []Candidate
	for level := 0; level < pyramidLevels; level++ {
		if level > 0 {
			c = coarse.Shrink(c, 2)
			k *= 2
		}
		if c.W < 4*texRad || c.H < 4*texRad {
			break
		}
		for _, cand := range findLevel(ws, c, float64(k), opt.MinRadiusPx) {
			if !duplicate(out, cand) {
				out = append(out, cand)
			}
		}
	}
	return out
}

// findLevel runs the texture test and the classification on one reduced
// image, k full-resolution px per pixel, and returns candidates in
// full-resolution coordinates.
func findLevel(ws *workspace, c *plane.Plane, fk, minRadiusPx float64) []Candidate {
	mask := textureMask(ws, c)
	labels, comps := components(ws, mask, c.W, c.H)
	minR := math.Max(minRadiusPx/fk, 2*texRad/2)
	var out []Candidate
	for ci, comp := range comps {
		if float64(comp.n) < 0.25*math.Pi*minR*minR {
			continue
		}
		id := int32(ci + 1)
		keep := func(x, y int) bool { return labels[y*c.W+x] == id }
		if cand, ok := classify(c, comp, keep, minR); ok {
			cand.X *= fk
			cand.Y *= fk
			cand.RadiusPx *= fk
			for i := range cand.Corners {
				cand.Corners[i][0] *= fk
				cand.Corners[i][1] *= fk
			}
			out = append(out, cand)
		}
	}
	return out
}

// duplicate reports whether c is a pattern already in list: a star whose
// centre lies within half the other's radius, or a grating whose middle
// lies inside the other's rectangle.
func duplicate(list []Candidate, c Candidate) bool {
	for _, o := range list {
		if o.Kind != c.Kind {
			continue
		}
		if c.Kind == KindStar && math.Hypot(o.X-c.X, o.Y-c.Y) < 0.5*math.Max(o.RadiusPx, c.RadiusPx) {
			return true
		}
		if c.Kind == KindGrating && (inside(o.Corners, c.X, c.Y) || inside(c.Corners, o.X, o.Y)) {
			return true
		}
	}
	return false
}

// inside reports whether (x, y) lies inside the convex quadrilateral q.
func inside(q [4][2]float64, x, y float64) bool {
	sign := 0.0
	for i := range 4 {
		a, b := q[i], q[(i+1)%4]
		cr := (b[0]-a[0])*(y-a[1]) - (b[1]-a[1])*(x-a[0])
		if cr != 0 {
			if sign != 0 && cr*sign < 0 {
				return false
			}
			sign = cr
		}
	}
	return true
}

// boxMean writes into dst the mean of src over the (2 rad + 1)^2 window
// about each pixel, clipped to the image (the mean of the pixels inside).
// tmp must have the same length as src; dst may alias neither.
func boxMean(dst, src, tmp []float32, w, h, rad int) {
	for y := range h {
		row := src[y*w : (y+1)*w]
		out := tmp[y*w : (y+1)*w]
		var s float64
		for x := 0; x < min(rad, w); x++ {
			s += float64(row[x])
		}
		// The same sums in the same order; the middle, where the window
		// lies wholly inside the row, without the tests at the ends.
		mid0, mid1 := rad+1, w-rad
		if mid1 <= mid0 {
			mid0, mid1 = w, w
		}
		for x := 0; x < mid0; x++ {
			boxStep(row, out, &s, x, w, rad)
		}
		full := float64(2*rad + 1)
		for x := mid0; x < mid1; x++ {
			s += float64(row[x+rad])
			s -= float64(row[x-rad-1])
			out[x] = float32(s / full)
		}
		for x := mid1; x < w; x++ {
			boxStep(row, out, &s, x, w, rad)
		}
	}
	col := make([]float64, w)
	for y := 0; y < min(rad, h); y++ {
		for x := range w {
			col[x] += float64(tmp[y*w+x])
		}
	}
	for y := range h {
		if y+rad < h {
			for x, v := range tmp[(y+rad)*w : (y+rad+1)*w] {
				col[x] += float64(v)
			}
		}
		if y-rad-1 >= 0 {
			for x, v := range tmp[(y-rad-1)*w : (y-rad)*w] {
				col[x] -= float64(v)
			}
		}
		n := float64(min(y+rad, h-1) - max(y-rad, 0) + 1)
		for x := range w {
			dst[y*w+x] = float32(col[x] / n)
		}
	}
}

// boxStep moves the running sum s of boxMean's row pass to x, near an end of
// the row, and writes the mean there.
func boxStep(row, out []float32, s *float64, x, w, rad int) {
	if x+rad < w {
		*s += float64(row[x+rad])
	}
	if x-rad-1 >= 0 {
		*s -= float64(row[x-rad-1])
	}
	n := min(x+rad, w-1) - max(x-rad, 0) + 1
	out[x] = float32(*s / float64(n))
}

// workspace holds the buffers of the texture test, reused on every level
// of the pyramid (each level is a quarter of the one before).
type workspace struct {
	mean, tmp, d, buf, s2 []float32
	mask                  []bool
	labels                []int32
}

func newWorkspace(n int) *workspace {
	return &workspace{
		mean: make([]float32, n), tmp: make([]float32, n), d: make([]float32, n),
		buf: make([]float32, n), s2: make([]float32, n), mask: make([]bool, n), labels: make([]int32, n),
	}
}

// textureMask marks the textured pixels of the reduced image c (see the
// comment at the top of this file). The mask lives in ws.
func textureMask(ws *workspace, c *plane.Plane) []bool {
	w, h := c.W, c.H
	n := w * h
	mean, tmp, d, buf, s2 := ws.mean[:n], ws.tmp[:n], ws.d[:n], ws.buf[:n], ws.s2[:n]
	boxMean(mean, c.Pix, tmp, w, h, texRad)
	for i := range d {
		d[i] = c.Pix[i] - mean[i]
		buf[i] = d[i] * d[i]
	}
	boxMean(s2, buf, tmp, w, h, texRad)
	// crossings into buf: a sign change with a step above stepFactor times
	// the local rms, compared in squares
	const f2 = stepFactor * stepFactor
	for y := range h {
		for x := range w {
			i := y*w + x
			var z float32
			thr2 := f2 * s2[i]
			if x+1 < w && d[i]*d[i+1] < 0 {
				if e := d[i] - d[i+1]; e*e > thr2 {
					z++
				}
			}
			if y+1 < h && d[i]*d[i+w] < 0 {
				if e := d[i] - d[i+w]; e*e > thr2 {
					z++
				}
			}
			buf[i] = z
		}
	}
	boxMean(d, buf, tmp, w, h, texRad) // d now holds the crossing density
	mask := ws.mask[:n]
	for i := range mask {
		m := mean[i]
		mask[i] = m > 0 && d[i] >= minCrossings && s2[i] >= minTexContrast*minTexContrast*m*m
	}
	return mask
}

// comp is a connected component: its pixel count and bounding box.
type comp struct {
	n              int
	x0, y0, x1, y1 int
}

// components labels the 8-connected components of mask (labels 1, 2, ...;
// 0 = background) and returns the label image (in ws) and the components.
func components(ws *workspace, mask []bool, w, h int) ([]int32, []comp) {
	labels := ws.labels[:len(mask)]
	clear(labels)
	var comps []comp
	var stack []int
	for i, m := range mask {
		if !m || labels[i] != 0 {
			continue
		}
		id := int32(len(comps) + 1)
		cp := comp{x0: i % w, y0: i / w, x1: i % w, y1: i / w}
		labels[i] = id
		stack = append(stack[:0], i)
		for len(stack) > 0 {
			j := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			x, y := j%w, j/w
			cp.n++
			cp.x0, cp.x1 = min(cp.x0, x), max(cp.x1, x)
			cp.y0, cp.y1 = min(cp.y0, y), max(cp.y1, y)
			for dy := -1; dy <= 1; dy++ {
				for dx := -1; dx <= 1; dx++ {
					xx, yy := x+dx, y+dy
					if xx < 0 || yy < 0 || xx >= w || yy >= h {
						continue
					}
					q := yy*w + xx
					if mask[q] && labels[q] == 0 {
						labels[q] = id
						stack = append(stack, q)
					}
				}
			}
		}
		comps = append(comps, cp)
	}
	return labels, comps
}

// maxListed is the largest blob whose pixels classify lists for its
// centre fits (16 bytes each).
const maxListed = 1 << 18

// classify decides whether a textured blob of the reduced image c is a
// star or a grating and returns its candidate in coarse coordinates.
func classify(c *plane.Plane, cp comp, keep func(x, y int) bool, minR float64) (Candidate, bool) {
	// Structure tensor and orientation histogram of the blob's gradients.
	var a sym2
	var sx, sy, sw float64
	const nBins = 36 // 5 degree bins over 180 degrees
	var hist [nBins]float64
	for y := max(cp.y0, 1); y <= min(cp.y1, c.H-2); y++ {
		for x := max(cp.x0, 1); x <= min(cp.x1, c.W-2); x++ {
			if !keep(x, y) {
				continue
			}
			gx := 0.5 * float64(c.Pix[y*c.W+x+1]-c.Pix[y*c.W+x-1])
			gy := 0.5 * float64(c.Pix[(y+1)*c.W+x]-c.Pix[(y-1)*c.W+x])
			g2 := gx*gx + gy*gy
			a[0] += gx * gx
			a[1] += gx * gy
			a[2] += gy * gy
			sx += g2 * (float64(x) + 0.5)
			sy += g2 * (float64(y) + 0.5)
			sw += g2
			ang := math.Atan2(gy, gx)
			if ang < 0 {
				ang += math.Pi
			}
			hist[int(ang/math.Pi*nBins)%nBins] += g2
		}
	}
	if sw == 0 {
		return Candidate{}, false
	}
	l1, l2, ang := a.eig()
	if l2 < gratingRatio*l1 {
		// Parallel lines: a grating if the orientations are coherent.
		main := int(math.Floor(math.Mod(ang+math.Pi, math.Pi)/math.Pi*nBins)) % nBins
		var near float64
		for d := -3; d <= 3; d++ {
			near += hist[(main+d+nBins)%nBins]
		}
		if near < gratingCoher*sw {
			return Candidate{}, false
		}
		return gratingBox(cp, keep, ang, minR)
	}
	// A meeting point: robust fit from the energy centroid. The blob's
	// pixels and gradients are listed once for the six passes (up to
	// maxListed pixels; a larger blob is scanned each time).
	cx, cy := sx/sw, sy/sw
	var pts []gradPt
	if cp.n <= maxListed {
		pts = gradPts(c, max(cp.x0, 1), max(cp.y0, 1), min(cp.x1, c.W-2), min(cp.y1, c.H-2), keep, make([]gradPt, 0, cp.n))
	}
	var res centreResult
	for _, tk := range []float64{0.7, 0.5, 0.35} {
		res = fitCentre(c, cx, cy, centreOpts{x0: cp.x0, y0: cp.y0, x1: cp.x1, y1: cp.y1,
			keep: keep, pts: pts, rMin: 2, tukey: tk, iters: 2})
		if !res.ok {
			return Candidate{}, false
		}
		cx, cy = res.x, res.y
	}
	if res.inlier < starInliers || cx < float64(cp.x0) || cx > float64(cp.x1+1) || cy < float64(cp.y0) || cy > float64(cp.y1+1) {
		return Candidate{}, false
	}
	// Radius: the 95th percentile of the blob's distances from the centre,
	// less the texture window's reach beyond the pattern.
	var dist []float64
	for y := cp.y0; y <= cp.y1; y++ {
		for x := cp.x0; x <= cp.x1; x++ {
			if keep(x, y) {
				dist = append(dist, math.Hypot(float64(x)+0.5-cx, float64(y)+0.5-cy))
			}
		}
	}
	slices.Sort(dist)
	r := dist[len(dist)*95/100] - texRad/2
	if r < minR {
		return Candidate{}, false
	}
	// The same angular harmonic must dominate two circles in the outer
	// part of the blob, where the pattern is coarsest at this level (text
	// and clusters of shapes have no such order).
	k1, d1, _ := circleHarmonic(c, cx, cy, 0.6*r, 0)
	k2, d2, _ := circleHarmonic(c, cx, cy, 0.9*r, 0)
	if k1 < minCycles || k1 != k2 || d1 < minDominance || d2 < minDominance {
		return Candidate{}, false
	}
	return Candidate{Kind: KindStar, X: cx, Y: cy, RadiusPx: r}, true
}

// gratingBox returns the grating candidate of a blob whose gradients lie
// along the angle ang (radians): the blob's bounding rectangle in the frame
// of that direction, less the texture window's reach beyond the pattern.
func gratingBox(cp comp, keep func(x, y int) bool, ang float64, minR float64) (Candidate, bool) {
	ux, uy := math.Cos(ang), math.Sin(ang)
	lo, hi := [2]float64{math.Inf(1), math.Inf(1)}, [2]float64{math.Inf(-1), math.Inf(-1)}
	for y := cp.y0; y <= cp.y1; y++ {
		for x := cp.x0; x <= cp.x1; x++ {
			if !keep(x, y) {
				continue
			}
			px, py := float64(x)+0.5, float64(y)+0.5
			u, v := px*ux+py*uy, -px*uy+py*ux
			lo[0], hi[0] = math.Min(lo[0], u), math.Max(hi[0], u)
			lo[1], hi[1] = math.Min(lo[1], v), math.Max(hi[1], v)
		}
	}
	const inset = texRad / 2
	for i := range 2 {
		lo[i] += inset
		hi[i] -= inset
		if hi[i]-lo[i] < minR {
			return Candidate{}, false
		}
	}
	var cand Candidate
	cand.Kind = KindGrating
	for i, q := range [4][2]float64{{lo[0], lo[1]}, {hi[0], lo[1]}, {hi[0], hi[1]}, {lo[0], hi[1]}} {
		cand.Corners[i] = [2]float64{q[0]*ux - q[1]*uy, q[0]*uy + q[1]*ux}
	}
	mu, mv := 0.5*(lo[0]+hi[0]), 0.5*(lo[1]+hi[1])
	cand.X, cand.Y = mu*ux-mv*uy, mu*uy+mv*ux
	cand.RadiusPx = 0.5 * math.Hypot(hi[0]-lo[0], hi[1]-lo[1])
	cand.DirectionDeg = math.Mod(ang*180/math.Pi+360, 180)
	return cand, true
}
