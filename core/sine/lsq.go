package sine

import "math"

// harmonic accumulates the normal equations of the linear least-squares fit
// v = a + b cos(t) + c sin(t) over samples (t, v): the fit of one sinusoid
// of known phase argument t to pixel values v.
type harmonic struct {
	n                 float64
	sc, ss, scc, scs  float64 // sums of cos, sin, cos^2, cos sin
	sss               float64 // sum of sin^2
	sv, svc, svs, svv float64 // sums of v, v cos, v sin, v^2
}

// add adds one sample with cos(t) = c, sin(t) = s.
func (h *harmonic) add(c, s, v float64) {
	h.n++
	h.sc += c
	h.ss += s
	h.scc += c * c
	h.scs += c * s
	h.sss += s * s
	h.sv += v
	h.svc += v * c
	h.svs += v * s
	h.svv += v * v
}

// merge adds the sums of o.
func (h *harmonic) merge(o *harmonic) {
	h.n += o.n
	h.sc += o.sc
	h.ss += o.ss
	h.scc += o.scc
	h.scs += o.scs
	h.sss += o.sss
	h.sv += o.sv
	h.svc += o.svc
	h.svs += o.svs
	h.svv += o.svv
}

// fit is the solution of a harmonic fit.
type fit struct {
	a, b, c  float64 // v = a + b cos t + c sin t
	varB     float64 // variance of b from the residual noise
	varC     float64 // variance of c
	sigma    float64 // residual rms
	n        float64 // samples
	ok       bool
	amp, mod float64 // noise-corrected amplitude sqrt(b^2+c^2-varB-varC) and amp/a
}

// solve returns the least-squares fit; ok is false when the cell has fewer
// than 6 samples or the basis is degenerate on them.
func (h *harmonic) solve() fit {
	if h.n < 6 {
		return fit{}
	}
	// X'X (symmetric 3x3) and X'v.
	m := [3][3]float64{
		{h.n, h.sc, h.ss},
		{h.sc, h.scc, h.scs},
		{h.ss, h.scs, h.sss},
	}
	rhs := [3]float64{h.sv, h.svc, h.svs}
	inv, ok := inv3(m)
	if !ok {
		return fit{}
	}
	var beta [3]float64
	for i := range 3 {
		for j := range 3 {
			beta[i] += inv[i][j] * rhs[j]
		}
	}
	rss := h.svv - (beta[0]*rhs[0] + beta[1]*rhs[1] + beta[2]*rhs[2])
	dof := h.n - 3
	s2 := math.Max(rss, 0) / math.Max(dof, 1)
	f := fit{a: beta[0], b: beta[1], c: beta[2], varB: s2 * inv[1][1], varC: s2 * inv[2][2],
		sigma: math.Sqrt(s2), n: h.n, ok: true}
	a2 := f.b*f.b + f.c*f.c - f.varB - f.varC
	f.amp = math.Sqrt(math.Max(a2, 0))
	if f.a > 0 {
		f.mod = f.amp / f.a
	}
	return f
}

// inv3 inverts a symmetric positive definite 3x3 matrix; ok is false when
// it is (numerically) singular.
func inv3(m [3][3]float64) ([3][3]float64, bool) {
	var r [3][3]float64
	r[0][0] = m[1][1]*m[2][2] - m[1][2]*m[2][1]
	r[0][1] = m[0][2]*m[2][1] - m[0][1]*m[2][2]
	r[0][2] = m[0][1]*m[1][2] - m[0][2]*m[1][1]
	r[1][0] = m[1][2]*m[2][0] - m[1][0]*m[2][2]
	r[1][1] = m[0][0]*m[2][2] - m[0][2]*m[2][0]
	r[1][2] = m[0][2]*m[1][0] - m[0][0]*m[1][2]
	r[2][0] = m[1][0]*m[2][1] - m[1][1]*m[2][0]
	r[2][1] = m[0][1]*m[2][0] - m[0][0]*m[2][1]
	r[2][2] = m[0][0]*m[1][1] - m[0][1]*m[1][0]
	det := m[0][0]*r[0][0] + m[0][1]*r[1][0] + m[0][2]*r[2][0]
	scale := m[0][0] * m[1][1] * m[2][2]
	if !(det > 1e-12*scale) || scale <= 0 {
		return r, false
	}
	for i := range 3 {
		for j := range 3 {
			r[i][j] /= det
		}
	}
	return r, true
}

// sym2 is a symmetric 2x2 matrix {xx, xy, yy}.
type sym2 [3]float64

// inv returns the inverse and false when the matrix is singular.
func (s sym2) inv() (sym2, bool) {
	det := s[0]*s[2] - s[1]*s[1]
	if !(det > 1e-14*(s[0]*s[2])) || s[0] <= 0 {
		return sym2{}, false
	}
	return sym2{s[2] / det, -s[1] / det, s[0] / det}, true
}

// mul returns s v.
func (s sym2) mul(x, y float64) (float64, float64) {
	return s[0]*x + s[1]*y, s[1]*x + s[2]*y
}

// eig returns the eigenvalues l1 >= l2 and the angle (radians) of the
// first eigenvector.
func (s sym2) eig() (l1, l2, ang float64) {
	tr := s[0] + s[2]
	d := math.Hypot((s[0]-s[2])/2, s[1])
	return tr/2 + d, tr/2 - d, 0.5 * math.Atan2(2*s[1], s[0]-s[2])
}

// normalEq3 accumulates the normal equations of a three-term linear
// least-squares fit.
type normalEq3 struct {
	a [3][3]float64
	b [3]float64
}

func (e *normalEq3) add(x [3]float64, v float64) {
	for i := range 3 {
		for j := range 3 {
			e.a[i][j] += x[i] * x[j]
		}
		e.b[i] += x[i] * v
	}
}

// solve returns the coefficients; ok is false when the basis is degenerate.
func (e *normalEq3) solve() ([3]float64, bool) {
	var out [3]float64
	inv, ok := inv3(e.a)
	if !ok {
		return out, false
	}
	for i := range 3 {
		for j := range 3 {
			out[i] += inv[i][j] * e.b[j]
		}
	}
	return out, true
}
