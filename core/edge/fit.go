package edge

import (
	"math"
	"slices"

	"sagitta/core/internal/rank"
)

// lineFit is the fitted edge in a region's frame: the edge passes through
// w = Rho + Alpha*u + Kappa*u*u (u, w in px, region frame), the image steps
// from Dark to Dark+Step as w increases across it (Step may be negative
// before orient is called), and Width is the standard deviation (px) of the
// logistic edge model the fit used (a logistic of width s has the slope
// of a normal CDF of standard deviation 1.6 s at its centre).
type lineFit struct {
	Rho, Alpha, Kappa float64
	Dark, Step, Width float64
	RMS               float64 // rms residual of the model fit (linear units)
}

// dist returns the signed distance (px) of (u, w) from the fitted edge,
// measured along the local normal, positive on the side the step rises to.
func (f *lineFit) dist(u, w float64) float64 {
	slope := f.Alpha + 2*f.Kappa*u
	return (w - f.Rho - f.Alpha*u - f.Kappa*u*u) / math.Sqrt(1+slope*slope)
}

// fitEdge locates the edge in the samples. It starts from the area-based
// edge position of 2 px strips along the edge (exact for any symmetric edge
// profile, and insensitive to noise because it integrates rather than
// differentiates), then refines all parameters at once by Levenberg-Marquardt
// on the model v = Dark + Step*L(d/Width), L the logistic, d the distance to the
// quadratic edge curve. The model's shape only serves to locate the edge: an
// asymmetric real profile biases Rho (a constant shift, harmless), not the
// angle or the curvature, because the profile is the same all along the edge.
func fitEdge(s samples, halfLen, halfWidth float64) (lineFit, bool) {
	n := len(s.v)
	if n < 32 {
		return lineFit{}, false
	}
	lo, hi := percentiles(s.v, 0.05, 0.95, s.buf(func(c *scratch) *[]float64 { return &c.sel }))
	if !(hi > lo) {
		return lineFit{}, false
	}
	// Which side is light: compare the mean of the two halves.
	var sNeg, sPos float64
	var cNeg, cPos int
	for i, w := range s.w {
		if w < 0 {
			sNeg += s.v[i]
			cNeg++
		} else {
			sPos += s.v[i]
			cPos++
		}
	}
	if cNeg == 0 || cPos == 0 {
		return lineFit{}, false
	}
	rising := sPos/float64(cPos) > sNeg/float64(cNeg)

	// Strip estimates of the edge position.
	const stripPx = 2.0
	nStrip := int(2*halfLen/stripPx) + 1
	// The strips share one array of sample indices, filled by a counting
	// sort in sample order, and each is then put in order of w.
	stripOf := func(i int) int { return int((s.u[i] + halfLen) / stripPx) }
	start := make([]int, nStrip+1)
	for i := range s.v {
		if k := stripOf(i); k >= 0 && k < nStrip {
			start[k+1]++
		}
	}
	for k := range nStrip {
		start[k+1] += start[k]
	}
	all := make([]int32, start[nStrip])
	next := slices.Clone(start[:nStrip])
	for i := range s.v {
		if k := stripOf(i); k >= 0 && k < nStrip {
			all[next[k]] = int32(i)
			next[k]++
		}
	}
	var tmp, count []int32
	var su, sw, suu, suw, cnt float64
	for k := range nStrip {
		st := all[start[k]:start[k+1]]
		if len(st) < 6 {
			continue
		}
		tmp, count = sortByKey(st, s.w, -halfWidth, halfWidth, tmp, count)
		// Integral of the normalised profile over the strip's w range.
		wa, wb := s.w[st[0]], s.w[st[len(st)-1]]
		var area float64
		for j := 1; j < len(st); j++ {
			a, b := st[j-1], st[j]
			q0 := (s.v[a] - lo) / (hi - lo)
			q1 := (s.v[b] - lo) / (hi - lo)
			area += 0.5 * (q0 + q1) * (s.w[b] - s.w[a])
		}
		var c float64
		if rising {
			c = wb - area
		} else {
			c = wa + area
		}
		if c <= wa || c >= wb {
			continue
		}
		u := -halfLen + (float64(k)+0.5)*stripPx
		su += u
		sw += c
		suu += u * u
		suw += u * c
		cnt++
	}
	if cnt < 3 {
		return lineFit{}, false
	}
	det := cnt*suu - su*su
	if det == 0 {
		return lineFit{}, false
	}
	alpha := (cnt*suw - su*sw) / det
	rho := (sw - alpha*su) / cnt
	f := lineFit{Rho: rho, Alpha: alpha, Dark: lo, Step: hi - lo, Width: 1}
	if !rising {
		f.Dark, f.Step = hi, lo-hi
	}
	// Fit within a band around the edge: pixels far out on the plateaus
	// carry almost nothing about the line's position and cost most of the
	// time. The band widens if the fitted profile turns out wide.
	band := math.Min(fitBandPx, halfWidth)
	for {
		sub := within(s, f, band, s.buf(func(c *scratch) *[]float64 { return &c.band }))
		if len(sub.v) < 32 {
			sub = s
		}
		if !levenberg(&f, sub, halfLen) {
			return lineFit{}, false
		}
		if 5*f.Width <= band || band >= halfWidth {
			break
		}
		band = math.Min(halfWidth, 2*band)
	}
	if math.Abs(f.Rho) > halfWidth || f.Width <= 0 {
		return lineFit{}, false
	}
	return f, true
}

// fitBandPx is the initial half-width of the band of pixels used to fit the
// edge model, px.
const fitBandPx = 12

// within returns the samples within band px (across the region) of the
// fitted line, in the array *buf (grown as needed) unless buf is nil.
func within(s samples, f lineFit, band float64, buf *[]float64) samples {
	in := func(i int) bool {
		return math.Abs(s.w[i]-f.Rho-f.Alpha*s.u[i]-f.Kappa*s.u[i]*s.u[i]) <= band
	}
	n := 0
	for i := range s.v {
		if in(i) {
			n++
		}
	}
	var cols []float64 // one array for the three columns
	if buf != nil {
		cols = take(*buf, 3*n)[:3*n]
		*buf = cols
	} else {
		cols = make([]float64, 3*n)
	}
	out := samples{u: cols[:0:n], w: cols[n : n : 2*n], v: cols[2*n : 2*n : 3*n]}
	for i := range s.v {
		if in(i) {
			out.u = append(out.u, s.u[i])
			out.w = append(out.w, s.w[i])
			out.v = append(out.v, s.v[i])
		}
	}
	return out
}

// levenberg refines the six model parameters by Levenberg-Marquardt
// (Marquardt 1963, SIAM J. Appl. Math. 11:431). The along-edge coordinate is
// scaled by halfLen so that the normal equations stay well conditioned.
func levenberg(f *lineFit, s samples, halfLen float64) bool {
	const np = 6
	// p: Dark, Step, Width, Rho, Alpha*L, Kappa*L^2
	p := [np]float64{f.Dark, f.Step, f.Width, f.Rho, f.Alpha * halfLen, f.Kappa * halfLen * halfLen}
	un := make([]float64, len(s.u))
	for i, u := range s.u {
		un[i] = u / halfLen
	}
	eval := func(p [np]float64, jtj *[np][np]float64, jtr *[np]float64) float64 {
		return normalEquations(p, un, s.w, s.v, jtj, jtr)
	}
	lambda := 1e-3
	var jtj, qtj [np][np]float64
	var jtr, qtr [np]float64
	c0 := eval(p, &jtj, &jtr)
	for iter := 0; iter < 60; iter++ {
		for a := 0; a < np; a++ {
			for b := a + 1; b < np; b++ {
				jtj[a][b] = jtj[b][a]
			}
		}
		improved := false
		for try := 0; try < 10; try++ {
			var m [np][np]float64
			for a := 0; a < np; a++ {
				m[a] = jtj[a]
				m[a][a] *= 1 + lambda
				if m[a][a] == 0 {
					m[a][a] = 1e-12
				}
			}
			dp, ok := solve(m, jtr)
			if !ok {
				lambda *= 10
				continue
			}
			var q [np]float64
			for a := range p {
				q[a] = p[a] + dp[a]
			}
			if q[2] <= 0.02 {
				q[2] = 0.02
			}
			// A step this small ends the fit if it lowers the cost, and
			// a step that does not is retried from the same normal
			// equations: either way only the cost at q is needed.
			smallStep := math.Abs(dp[3]) < 1e-4 && math.Abs(dp[4]) < 1e-4 && math.Abs(dp[5]) < 1e-4
			var c1 float64
			if smallStep {
				c1 = cost(q, un, s.w, s.v)
			} else {
				c1 = eval(q, &qtj, &qtr)
			}
			if c1 < c0 {
				small := smallStep || c0-c1 < 1e-10*c0
				p, c0 = q, c1
				if !smallStep {
					jtj, jtr = qtj, qtr
				}
				lambda = max(lambda/10, 1e-9)
				improved = true
				if small {
					iter = 1 << 30
				}
				break
			}
			lambda *= 10
		}
		if !improved {
			break
		}
	}
	*f = lineFit{Dark: p[0], Step: p[1], Width: p[2], Rho: p[3],
		Alpha: p[4] / halfLen, Kappa: p[5] / (halfLen * halfLen),
		RMS: math.Sqrt(c0 / float64(len(s.v)))}
	return !math.IsNaN(c0)
}

// normalEquations returns the cost (sum of squared residuals) of the edge
// model at p over the samples (un = u / halfLen, w, v) and fills the normal
// equations' J^T J (lower triangle) and J^T r there, in one pass: the step
// levenberg accepts at one iteration is where the next linearises, so each
// exponential is taken once.
//
// The loop is modelGrad with the sums written out: the derivative by Dark
// is 1, so its products are plain sums, and the 27 running sums stay in
// locals rather than behind the pointers. It does the same operations in
// the same order as the general form, so it gives the same numbers (the
// test compares them bit for bit).
func normalEquations(p [6]float64, un, w, v []float64, jtj *[6][6]float64, jtr *[6]float64) float64 {
	var c float64
	var a00, a10, a11, a20, a21, a22, a30, a31, a32, a33 float64
	var a40, a41, a42, a43, a44, a50, a51, a52, a53, a54, a55 float64
	var b0, b1, b2, b3, b4, b5 float64
	un, w = un[:len(v)], w[:len(v)]
	for i := range v {
		u := un[i]
		e := p[3] + p[4]*u + p[5]*u*u
		z := (w[i] - e) / p[2]
		l := 1 / (1 + math.Exp(-z))
		k := p[1] * l * (1 - l) / p[2]
		g1, g2, g3, g4, g5 := l, -k*z, -k, -k*u, -k*u*u
		r := v[i] - (p[0] + p[1]*l)
		c += r * r
		b0 += r
		b1 += g1 * r
		b2 += g2 * r
		b3 += g3 * r
		b4 += g4 * r
		b5 += g5 * r
		a00++
		a10 += g1
		a11 += g1 * g1
		a20 += g2
		a21 += g2 * g1
		a22 += g2 * g2
		a30 += g3
		a31 += g3 * g1
		a32 += g3 * g2
		a33 += g3 * g3
		a40 += g4
		a41 += g4 * g1
		a42 += g4 * g2
		a43 += g4 * g3
		a44 += g4 * g4
		a50 += g5
		a51 += g5 * g1
		a52 += g5 * g2
		a53 += g5 * g3
		a54 += g5 * g4
		a55 += g5 * g5
	}
	*jtr = [6]float64{b0, b1, b2, b3, b4, b5}
	*jtj = [6][6]float64{
		{a00},
		{a10, a11},
		{a20, a21, a22},
		{a30, a31, a32, a33},
		{a40, a41, a42, a43, a44},
		{a50, a51, a52, a53, a54, a55},
	}
	return c
}

// cost returns the sum of squared residuals of the edge model at p, the
// same number normalEquations returns (the same operations in the same
// order), without the normal equations.
func cost(p [6]float64, un, w, v []float64) float64 {
	un, w = un[:len(v)], w[:len(v)]
	var c float64
	for i := range v {
		u := un[i]
		e := p[3] + p[4]*u + p[5]*u*u
		z := (w[i] - e) / p[2]
		l := 1 / (1 + math.Exp(-z))
		r := v[i] - (p[0] + p[1]*l)
		c += r * r
	}
	return c
}

// modelGrad evaluates v = Dark + Step*L(d/Width) with the logistic
// L(z) = 1/(1 + exp(-z)) and d = w - Rho - A*un - K*un^2 measured across
// the region (not along the true normal: the small slope factor is absorbed
// by Width, which only serves the fit), and stores the partial derivatives
// with respect to the six parameters in g. The logistic stands in for the
// profile's shape because it costs one exponential; any symmetric step
// locates the line equally well.
func modelGrad(p [6]float64, un, w float64, g *[6]float64) float64 {
	e := p[3] + p[4]*un + p[5]*un*un
	d := w - e
	z := d / p[2]
	l := 1 / (1 + math.Exp(-z))
	k := p[1] * l * (1 - l) / p[2]
	g[0] = 1
	g[1] = l
	g[2] = -k * z
	g[3] = -k
	g[4] = -k * un
	g[5] = -k * un * un
	return p[0] + p[1]*l
}

// solve solves the small symmetric system m x = b by Gaussian elimination
// with partial pivoting.
func solve(m [6][6]float64, b [6]float64) ([6]float64, bool) {
	const n = 6
	for c := 0; c < n; c++ {
		piv := c
		for r := c + 1; r < n; r++ {
			if math.Abs(m[r][c]) > math.Abs(m[piv][c]) {
				piv = r
			}
		}
		if m[piv][c] == 0 {
			return b, false
		}
		m[c], m[piv] = m[piv], m[c]
		b[c], b[piv] = b[piv], b[c]
		for r := c + 1; r < n; r++ {
			f := m[r][c] / m[c][c]
			for k := c; k < n; k++ {
				m[r][k] -= f * m[c][k]
			}
			b[r] -= f * b[c]
		}
	}
	var x [n]float64
	for r := n - 1; r >= 0; r-- {
		v := b[r]
		for k := r + 1; k < n; k++ {
			v -= m[r][k] * x[k]
		}
		x[r] = v / m[r][r]
	}
	for _, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return x, false
		}
	}
	return x, true
}

// percentiles returns the p- and q-quantiles (0..1) of v without modifying
// it, selecting in a copy in *buf (grown as needed) unless buf is nil.
func percentiles(v []float64, p, q float64, buf *[]float64) (float64, float64) {
	var c []float64
	if buf != nil {
		c = append((*buf)[:0], v...)
		*buf = c
	} else {
		c = append([]float64(nil), v...)
	}
	at := func(q float64) float64 { return rank.Select(c, int(q*float64(len(c)-1))) }
	return at(p), at(q)
}
