package chart

import (
	"errors"
	"math"
)

// Homography is a plane projective transformation, a 3 x 3 matrix in
// row-major order mapping (x, y, 1) to (x', y', w'), the point (x'/w',
// y'/w'). The chart's pose maps chart units to image pixels.
type Homography [9]float64

// Identity is the homography that changes nothing.
var Identity = Homography{1, 0, 0, 0, 1, 0, 0, 0, 1}

// Apply maps the point (x, y). Points on the line that maps to infinity
// come back as infinities.
func (h Homography) Apply(x, y float64) (float64, float64) {
	w := h[6]*x + h[7]*y + h[8]
	return (h[0]*x + h[1]*y + h[2]) / w, (h[3]*x + h[4]*y + h[5]) / w
}

// Mul returns the product h g: first g, then h.
func (h Homography) Mul(g Homography) Homography {
	var out Homography
	for i := range 3 {
		for j := range 3 {
			for k := range 3 {
				out[3*i+j] += h[3*i+k] * g[3*k+j]
			}
		}
	}
	return out
}

// Inverse returns the inverse (the adjugate over the determinant); ok is
// false for a singular matrix.
func (h Homography) Inverse() (Homography, bool) {
	a, b, c, d, e, f, g, k, m := h[0], h[1], h[2], h[3], h[4], h[5], h[6], h[7], h[8]
	co := Homography{
		e*m - f*k, c*k - b*m, b*f - c*e,
		f*g - d*m, a*m - c*g, c*d - a*f,
		d*k - e*g, b*g - a*k, a*e - b*d,
	}
	det := a*co[0] + b*co[3] + c*co[6]
	if det == 0 || math.IsNaN(det) || math.IsInf(det, 0) {
		return Homography{}, false
	}
	for i := range co {
		co[i] /= det
	}
	return co, true
}

// Jacobian returns the derivative of Apply at (x, y):
// [[dx'/dx, dx'/dy], [dy'/dx, dy'/dy]].
func (h Homography) Jacobian(x, y float64) [2][2]float64 {
	w := h[6]*x + h[7]*y + h[8]
	u := (h[0]*x + h[1]*y + h[2]) / w
	v := (h[3]*x + h[4]*y + h[5]) / w
	return [2][2]float64{
		{(h[0] - u*h[6]) / w, (h[1] - u*h[7]) / w},
		{(h[3] - v*h[6]) / w, (h[4] - v*h[7]) / w},
	}
}

// ErrDegenerate reports point sets that do not fix a transformation (too
// few points, or points on one line).
var ErrDegenerate = errors.New("chart: the points do not determine a transformation")

// FitHomography returns the homography that maps src[i] to dst[i] best in
// the least-squares sense of the direct linear transformation, with
// Hartley's normalisation (R. Hartley and A. Zisserman, Multiple View
// Geometry in Computer Vision, 2nd ed., 2003, algorithm 4.2): both point
// sets are moved to their centroid and scaled to a mean distance of sqrt(2)
// from it, the 2n equations
//
//	x' (g x + k y + 1) = a x + b y + c,  y' (g x + k y + 1) = d x + e y + f
//
// are solved for the eight unknowns with h33 = 1 (the chart's origin, its
// centre, is never mapped to infinity in a photo), and the normalisations
// are undone. Four points give the exact solution. Fewer than four points,
// or a set with three on one line, return ErrDegenerate.
func FitHomography(src, dst [][2]float64) (Homography, error) {
	n := len(src)
	if n < 4 || len(dst) != n {
		return Homography{}, ErrDegenerate
	}
	ts, ok1 := normaliser(src)
	td, ok2 := normaliser(dst)
	if !ok1 || !ok2 {
		return Homography{}, ErrDegenerate
	}
	var ata [8][8]float64
	var atb [8]float64
	for i := range n {
		x, y := ts.Apply(src[i][0], src[i][1])
		u, v := td.Apply(dst[i][0], dst[i][1])
		rows := [2][8]float64{
			{x, y, 1, 0, 0, 0, -u * x, -u * y},
			{0, 0, 0, x, y, 1, -v * x, -v * y},
		}
		rhs := [2]float64{u, v}
		for r := range 2 {
			for a := range 8 {
				atb[a] += rows[r][a] * rhs[r]
				for b := range 8 {
					ata[a][b] += rows[r][a] * rows[r][b]
				}
			}
		}
	}
	sol, ok := solve8(ata, atb)
	if !ok {
		return Homography{}, ErrDegenerate
	}
	hn := Homography{sol[0], sol[1], sol[2], sol[3], sol[4], sol[5], sol[6], sol[7], 1}
	tdi, _ := td.Inverse()
	h := tdi.Mul(hn).Mul(ts)
	if h[8] == 0 {
		return Homography{}, ErrDegenerate
	}
	for i := range h {
		h[i] /= h[8]
	}
	// Three collinear points among four leave the system singular in exact
	// arithmetic but not always in floating point: check the fit maps every
	// point where it should.
	for i := range n {
		x, y := h.Apply(src[i][0], src[i][1])
		if math.IsNaN(x) || math.IsInf(x, 0) || math.IsNaN(y) || math.IsInf(y, 0) {
			return Homography{}, ErrDegenerate
		}
	}
	return h, nil
}

// FitAffine returns the affine map (a homography with a last row 0 0 1)
// that maps src[i] to dst[i] in the least-squares sense; three points not
// on a line give the exact map.
func FitAffine(src, dst [][2]float64) (Homography, error) {
	n := len(src)
	if n < 3 || len(dst) != n {
		return Homography{}, ErrDegenerate
	}
	var m [3][3]float64
	var bx, by [3]float64
	for i := range n {
		r := [3]float64{src[i][0], src[i][1], 1}
		for a := range 3 {
			bx[a] += r[a] * dst[i][0]
			by[a] += r[a] * dst[i][1]
			for b := range 3 {
				m[a][b] += r[a] * r[b]
			}
		}
	}
	mi, ok := Homography{m[0][0], m[0][1], m[0][2], m[1][0], m[1][1], m[1][2], m[2][0], m[2][1], m[2][2]}.Inverse()
	if !ok || math.Abs(mi[0])+math.Abs(mi[4]) > 1e12 {
		return Homography{}, ErrDegenerate
	}
	var h Homography
	for a := range 3 {
		for b := range 3 {
			h[a] += mi[3*a+b] * bx[b]
			h[3+a] += mi[3*a+b] * by[b]
		}
	}
	h[8] = 1
	return h, nil
}

// normaliser returns the similarity that moves pts to their centroid and
// scales their mean distance from it to sqrt(2).
func normaliser(pts [][2]float64) (Homography, bool) {
	var cx, cy float64
	for _, p := range pts {
		cx += p[0]
		cy += p[1]
	}
	n := float64(len(pts))
	cx, cy = cx/n, cy/n
	var d float64
	for _, p := range pts {
		d += math.Hypot(p[0]-cx, p[1]-cy)
	}
	d /= n
	if !(d > 0) || math.IsInf(d, 0) {
		return Homography{}, false
	}
	s := math.Sqrt2 / d
	return Homography{s, 0, -s * cx, 0, s, -s * cy, 0, 0, 1}, true
}

// solve8 solves a x = b by Gaussian elimination with partial pivoting; ok
// is false when a pivot vanishes against the matrix's scale.
func solve8(a [8][8]float64, b [8]float64) ([8]float64, bool) {
	var scale float64
	for i := range 8 {
		for j := range 8 {
			scale = math.Max(scale, math.Abs(a[i][j]))
		}
	}
	if !(scale > 0) {
		return b, false
	}
	for c := range 8 {
		p := c
		for r := c + 1; r < 8; r++ {
			if math.Abs(a[r][c]) > math.Abs(a[p][c]) {
				p = r
			}
		}
		if math.Abs(a[p][c]) < 1e-12*scale {
			return b, false
		}
		a[c], a[p] = a[p], a[c]
		b[c], b[p] = b[p], b[c]
		for r := c + 1; r < 8; r++ {
			f := a[r][c] / a[c][c]
			for k := c; k < 8; k++ {
				a[r][k] -= f * a[c][k]
			}
			b[r] -= f * b[c]
		}
	}
	var x [8]float64
	for r := 7; r >= 0; r-- {
		s := b[r]
		for k := r + 1; k < 8; k++ {
			s -= a[r][k] * x[k]
		}
		x[r] = s / a[r][r]
	}
	return x, true
}
