package edge

import "math"

// The refined estimator, Sagitta's own. It keeps the physics of the e-SFR
// method (the MTF is the normalised Fourier transform of the derivative of
// the edge spread function, sampled at sub-pixel phases along a slanted
// edge) and changes four steps of the published procedure:
//
//  1. Edge geometry from a model fit of the whole region rather than from
//     per-line centroids: position, slope and curvature of the edge are
//     fitted jointly to every pixel (fit.go), and each pixel is projected
//     onto the true local normal, so any edge angle works and noise in
//     single lines does not shake the line.
//  2. No fixed 4x bins: the profile is kept at the phases where the pixels
//     actually fall (merged only within 1/64 px), and the transform is the
//     Fourier-Stieltjes sum over consecutive samples,
//     X(f) = sum_i w(m_i) (v[i+1] - v[i]) exp(-2 pi i f m_i), m_i the
//     midpoint of the two samples. This needs no bin filling (which is what
//     fails at critical angles), no derivative filter and no correction for
//     one. For sample gaps h the sum equals the true transform times
//     sinc(f h); that small factor is divided out using the gap
//     distribution's effective spacing (PhasePx).
//  3. A noise-aware window: flat over the measured extent of the line spread
//     function, with raised-cosine tapers, instead of a Hamming window over
//     the whole region. The flat part is widened while the profile still
//     carries signal above its noise, so long tails (flare) are kept and
//     noise beyond them is not.
//  4. Shading removed first: illumination fall-off multiplies the scene by a
//     slowly varying factor, which tilts both plateaus in proportion to
//     their levels; left in, the tilt enters the line spread function as
//     a constant that the window (widened while the profile still carries
//     signal) keeps taking in, and the MTF reads low when the light side
//     faces the optical centre. A plane a + b u + c d is fitted to each
//     plateau (u along the edge, d from it); the part of the slopes
//     proportional to the level, g = (c_light - c_dark) / (a_light - a_dark)
//     and likewise along u, is the relative gradient of the illumination,
//     and every pixel is divided by 1 + g_u u + g_d d. A slope common to
//     both plateaus (the slowly falling tail of a line spread function,
//     diffraction or flare) is left alone: it belongs to the lens.
//  5. Noise-bias removal: the expected noise power in |X(f)|^2, computed
//     exactly from the plateau noise and the window, is subtracted before
//     the square root, removing the upward bias that noise gives a
//     magnitude spectrum at high frequencies.

const (
	finePx   = 1.0 / 64 // merge width for samples at (nearly) the same phase, px
	coarsePx = 0.25     // bin width of the profiles reported for plots, px
)

// point is a merged sample of the edge profile.
type point struct {
	d, v float64 // mean distance (px) and mean value
	n    float64 // number of pixels merged
}

func measureRefined(m *Measurement, f lineFit, s samples, freq []float64, sdDark, sdLight float64, shape noiseShape) error {
	d := s.dists(f)
	reach := math.Inf(1) // distance to the nearest end of the sampled profile
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range d {
		lo, hi = min(lo, x), max(hi, x)
	}
	reach = math.Min(-lo, hi)
	if reach < 3 {
		return ErrNoEdge
	}
	// Plateaus, noise and the coarse profile, after removing the shading
	// (illumination fall-off) common to both plateaus.
	core := math.Min(coreWidth(f), reach-1)
	v, dark, light := s.flattened(d, core)
	var bins *[]point
	if s.sc != nil {
		bins = &s.sc.bins
	}
	pts := merge(d, v, bins)
	step := light - dark
	if !(step > 0) {
		return ErrNoEdge
	}
	m.Dark, m.Light = dark, light
	m.NoiseRMS = math.Sqrt(0.5 * (sdDark*sdDark + sdLight*sdLight))
	esf, perBin := coarse(d, v, -reach, reach)
	lsfX, lsfV := derivative(esf)

	// Window: centre at the line spread function's centroid, flat part
	// widened while the profile still carries signal.
	centre := centroid(lsfX, lsfV, core)
	a := widen(lsfX, lsfV, centre, core, reach, m.NoiseRMS, perBin)
	b := math.Min(a+math.Max(2, a/2), reach-0.5)
	if b <= a {
		a = 0.75 * b
	}
	win := func(x float64) float64 {
		x = math.Abs(x - centre)
		switch {
		case x <= a:
			return 1
		case x >= b:
			return 0
		}
		return 0.5 * (1 + math.Cos(math.Pi*(x-a)/(b-a)))
	}

	// Fourier-Stieltjes sum over consecutive merged samples inside the
	// window.
	i0, i1 := 0, len(pts)-1
	for i0 < i1 && win(pts[i0+1].d) == 0 {
		i0++
	}
	for i1 > i0 && win(pts[i1-1].d) == 0 {
		i1--
	}
	pts = pts[i0 : i1+1]
	k := len(pts) - 1
	if k < 8 {
		return ErrNoEdge
	}
	mid := make([]float64, k) // midpoints relative to the window centre
	wts := make([]float64, k) // window at the midpoints
	dv := make([]float64, k)  // differences
	var gapW, gapSum float64
	for i := 0; i < k; i++ {
		mid[i] = 0.5*(pts[i].d+pts[i+1].d) - centre
		wts[i] = win(mid[i] + centre)
		dv[i] = pts[i+1].v - pts[i].v
		gapW += wts[i] * math.Abs(dv[i]) * (pts[i+1].d - pts[i].d)
		gapSum += wts[i] * math.Abs(dv[i])
	}
	h := 0.0
	if gapSum > 0 {
		h = gapW / gapSum
	}
	m.PhasePx = h
	// Noise variance of each merged sample, interpolated by level between
	// the two plateaus' variances.
	nv := make([]float64, len(pts))
	for i, p := range pts {
		t := min(max((p.v-dark)/step, 0), 1)
		nv[i] = ((1-t)*sdDark*sdDark + t*sdLight*sdLight) / p.n
	}
	val, se := stieltjes(mid, wts, dv, nv, freq, shape.factor)
	if val == nil {
		return ErrNoEdge
	}
	for j, fr := range freq {
		if corr := sinc(fr * h); corr > 0.5 {
			val[j] /= corr
			se[j] /= corr
		}
	}
	m.Curve.Freq, m.Curve.Value = freq, val
	m.SE = se
	m.ESF, m.LSF = profiles(esf, lsfX, lsfV, dark, step, centre, b)
	return nil
}

// stieltjes evaluates |X(f)| / X(0) with X(f) = sum_i w_i dv_i
// exp(-2 pi i f m_i) on a uniform frequency grid freq (freq[0] = 0), after
// subtracting from |X(f)|^2 the expected noise power: merged sample j (noise
// variance nv[j]) enters difference j-1 with +1 and difference j with -1,
// so it contributes nv[j] |w[j-1] e(m[j-1]) - w[j] e(m[j])|^2. Phasors
// advance by recurrence from one frequency to the next. It returns nil if
// X(0) is not positive.
//
// It also returns the standard error of each value: noise of total power
// P_n(f) in X(f) (complex, circular) puts half of it along the signal's
// phasor, so |X| scatters by sqrt(P_n / 2) (first-order error propagation;
// the noise on X(0) is negligible, the window being flat where the edge
// changes), divided by X(0) as the value is.
//
// shape(f) scales the noise power for noise that is not white (see
// noisepsd.go): the variances nv are those of the pixels' own noise, and
// shape(f) is the noise spectrum at f relative to white noise of that
// variance (1 for white noise).
func stieltjes(mid, wts, dv, nv, freq []float64, shape func(float64) float64) (out, se []float64) {
	k := len(mid)
	var x0 float64
	for i := range mid {
		x0 += wts[i] * dv[i]
	}
	if !(x0 > 0) {
		return nil, nil
	}
	step := 0.0
	if len(freq) > 1 {
		step = freq[1] - freq[0]
	}
	// Everything the pass over the samples reads, side by side in memory.
	type term struct {
		zr, zi float64 // exp(-2 pi i f m) at the current frequency
		sr, si float64 // exp(-2 pi i step m)
		a      float64 // w_i dv_i
		cc     float64 // 2 nv[i] w[i-1] w[i] (0 for i = 0), see below
	}
	ts := make([]term, k)
	for i, m := range mid {
		s, c := math.Sincos(-2 * math.Pi * step * m)
		ts[i] = term{zr: 1, sr: c, si: s}
	}
	// The noise power sum_j nv[j] |w[j-1] e(m[j-1]) - w[j] e(m[j])|^2
	// expands, with |e| = 1, into a part that does not depend on f,
	// sum_j nv[j] (w[j-1]^2 + w[j]^2), less the cross terms
	// sum_j 2 nv[j] w[j-1] w[j] Re(e(m[j-1]) conj(e(m[j]))), which the
	// same pass as the signal sums.
	var pw float64
	for i := 0; i <= k; i++ {
		if i > 0 {
			pw += nv[i] * wts[i-1] * wts[i-1]
		}
		if i < k {
			pw += nv[i] * wts[i] * wts[i]
			ts[i].a = wts[i] * dv[i]
		}
		if i > 0 && i < k {
			ts[i].cc = 2 * nv[i] * wts[i-1] * wts[i]
		}
	}
	out = make([]float64, len(freq))
	se = make([]float64, len(freq))
	for j := range freq {
		var re, im, cross, pr, pi float64
		for i := range ts {
			t := &ts[i]
			r, q := t.zr, t.zi
			if j > 0 {
				r, q = r*t.sr-q*t.si, r*t.si+q*t.sr
				t.zr, t.zi = r, q
			}
			re += t.a * r
			im += t.a * q
			cross += t.cc * (pr*r + pi*q)
			pr, pi = r, q
		}
		p := re*re + im*im
		if j > 0 {
			pn := math.Max(pw-cross, 0)
			// The shaped power is subtracted; the standard error takes
			// the larger of the shaped and the white power, because the
			// shaping leaves out what the window's taper leaks between
			// frequencies (see noisepsd.go).
			ps := pn * shape(freq[j])
			p = math.Max(p-ps, 0)
			se[j] = math.Sqrt(math.Max(pn, ps)/2) / x0
		}
		out[j] = math.Sqrt(p) / x0
	}
	return out, se
}

// merge averages the samples that fall into the same bin of finePx along
// the normal (no sort needed: the bins are indexed directly) and returns
// the occupied bins in order of distance, each at its samples' mean
// distance and mean value. The bins are the array *buf (grown as needed)
// unless buf is nil.
func merge(d, v []float64, buf *[]point) []point {
	if len(d) == 0 {
		return nil
	}
	lo, hi := d[0], d[0]
	for _, x := range d {
		lo, hi = min(lo, x), max(hi, x)
	}
	i0 := int(math.Floor(lo / finePx))
	nb := int(math.Floor(hi/finePx)) - i0 + 1
	var bins []point
	if buf != nil {
		bins = take(*buf, nb)[:nb]
		clear(bins)
		*buf = bins
	} else {
		bins = make([]point, nb)
	}
	for i, x := range d {
		b := &bins[int(math.Floor(x/finePx))-i0]
		b.d += x
		b.v += v[i]
		b.n++
	}
	out := bins[:0]
	for _, b := range bins {
		if b.n > 0 {
			b.d /= b.n
			b.v /= b.n
			out = append(out, b)
		}
	}
	return out
}

// unshade returns v divided by the illumination gradient fitted to the two
// plateaus (pixels farther than core px from the edge; see point 4 at the
// top of this file), or v itself when a plateau is too small to fit.
func unshade(u, d, v []float64, core float64) []float64 {
	var a, b planeStats
	for i := range d {
		switch {
		case d[i] < -core:
			a.add(u[i], d[i], v[i])
		case d[i] > core:
			b.add(u[i], d[i], v[i])
		}
	}
	ca, okA := a.coef()
	cb, okB := b.coef()
	if !okA || !okB || !(cb[0]-ca[0] > 0) {
		return v
	}
	gu := (cb[1] - ca[1]) / (cb[0] - ca[0])
	gd := (cb[2] - ca[2]) / (cb[0] - ca[0])
	out := make([]float64, len(v))
	for i := range v {
		k := 1 + gu*u[i] + gd*d[i]
		if !(k > 0.2) { // no plausible fall-off: leave the profile as it is
			return v
		}
		out[i] = v[i] / k
	}
	return out
}

// flattened returns unshade's profile values for the samples' distances d
// (dists, for the final fit) and core, and the plateau levels of plateaus on them. The
// estimator and the sharpening check both need them for the one final fit
// of a measurement; with a scratch they are computed once and shared
// (read-only).
func (s *samples) flattened(d []float64, core float64) (v []float64, dark, light float64) {
	if c := s.sc; c != nil && c.flat.ok && c.flat.core == core {
		return c.flat.v, c.flat.dark, c.flat.light
	}
	v = unshade(s.u, d, s.v, core)
	dark, light, _, _ = plateaus(d, v, core)
	if s.sc != nil {
		s.sc.flat = flatCache{ok: true, core: core, v: v, dark: dark, light: light}
	}
	return v, dark, light
}

// planeStats accumulates a least-squares plane v = c0 + c1 x + c2 y.
type planeStats struct {
	n float64
	m [3][3]float64 // normal matrix (add fills the upper triangle; coef mirrors it)
	r [3]float64    // right-hand side
}

// add accumulates the point (x, y) of value v: the products of (1, x, y)
// with itself and with v.
func (p *planeStats) add(x, y, v float64) {
	p.n++
	p.m[0][0]++
	p.m[0][1] += x
	p.m[0][2] += y
	p.m[1][1] += x * x
	p.m[1][2] += x * y
	p.m[2][2] += y * y
	p.r[0] += v
	p.r[1] += x * v
	p.r[2] += y * v
}

// coef solves the normal equations by Gaussian elimination with partial
// pivoting; ok is false for fewer than 8 points or a singular system.
func (p *planeStats) coef() (c [3]float64, ok bool) {
	if p.n < 8 {
		return c, false
	}
	m, r := p.m, p.r
	m[1][0], m[2][0], m[2][1] = m[0][1], m[0][2], m[1][2]
	for k := range 3 {
		piv := k
		for i := k + 1; i < 3; i++ {
			if math.Abs(m[i][k]) > math.Abs(m[piv][k]) {
				piv = i
			}
		}
		m[k], m[piv] = m[piv], m[k]
		r[k], r[piv] = r[piv], r[k]
		if math.Abs(m[k][k]) <= 1e-9*p.n {
			return c, false
		}
		for i := k + 1; i < 3; i++ {
			t := m[i][k] / m[k][k]
			for j := k; j < 3; j++ {
				m[i][j] -= t * m[k][j]
			}
			r[i] -= t * r[k]
		}
	}
	for k := 2; k >= 0; k-- {
		s := r[k]
		for j := k + 1; j < 3; j++ {
			s -= m[k][j] * c[j]
		}
		c[k] = s / m[k][k]
	}
	return c, true
}

// plateaus estimates the dark and light levels and their noise from the
// pixels farther than core px from the edge. Slow shading across each
// plateau is removed with a straight-line fit before the spread is taken.
func plateaus(d, v []float64, core float64) (dark, light, sdDark, sdLight float64) {
	var a, b lineStats
	for i := range d {
		switch {
		case d[i] < -core:
			a.add(d[i], v[i])
		case d[i] > core:
			b.add(d[i], v[i])
		}
	}
	dark, sdDark = a.mean(), a.spread()
	light, sdLight = b.mean(), b.spread()
	return
}

// lineStats accumulates a least-squares straight line v = p + q x.
type lineStats struct{ n, sx, sy, sxx, sxy, syy float64 }

func (l *lineStats) add(x, y float64) {
	l.n++
	l.sx += x
	l.sy += y
	l.sxx += x * x
	l.sxy += x * y
	l.syy += y * y
}

func (l *lineStats) coef() (p, q float64) {
	if l.n == 0 {
		return math.NaN(), 0
	}
	det := l.n*l.sxx - l.sx*l.sx
	if l.n < 3 || det <= 1e-12*l.n*l.n {
		return l.sy / l.n, 0
	}
	q = (l.n*l.sxy - l.sx*l.sy) / det
	return (l.sy - q*l.sx) / l.n, q
}

// mean returns the plateau's mean level.
func (l *lineStats) mean() float64 {
	if l.n == 0 {
		return math.NaN()
	}
	return l.sy / l.n
}

// spread returns the rms residual about the fitted line.
func (l *lineStats) spread() float64 {
	if l.n < 4 {
		return 0
	}
	p, q := l.coef()
	// sum (y - p - q x)^2 expanded.
	ss := l.syy + p*p*l.n + q*q*l.sxx - 2*p*l.sy - 2*q*l.sxy + 2*p*q*l.sx
	return math.Sqrt(math.Max(ss, 0) / (l.n - 2))
}

// coarse bins the profile at coarsePx from lo to hi (bin centres at
// multiples of coarsePx), filling empty bins by linear interpolation. It also
// returns the mean number of pixels per bin.
func coarse(d, v []float64, lo, hi float64) (Profile, float64) {
	i0 := int(math.Ceil(lo / coarsePx))
	i1 := int(math.Floor(hi / coarsePx))
	nb := i1 - i0 + 1
	sum := make([]float64, nb)
	cnt := make([]float64, nb)
	for i := range d {
		k := int(math.Round(d[i]/coarsePx)) - i0
		if k >= 0 && k < nb {
			sum[k] += v[i]
			cnt[k]++
		}
	}
	p := Profile{X: make([]float64, nb), V: make([]float64, nb)}
	for k := range p.X {
		p.X[k] = float64(k+i0) * coarsePx
		if cnt[k] > 0 {
			p.V[k] = sum[k] / cnt[k]
		} else {
			p.V[k] = math.NaN()
		}
	}
	fillGaps(p.V)
	var tot float64
	for _, c := range cnt {
		tot += c
	}
	return p, tot / float64(nb)
}

// fillGaps replaces NaN entries by linear interpolation between the nearest
// defined neighbours (or copies the nearest one at the ends).
func fillGaps(v []float64) {
	last := -1
	for i := range v {
		if math.IsNaN(v[i]) {
			continue
		}
		if last < 0 {
			for j := 0; j < i; j++ {
				v[j] = v[i]
			}
		} else {
			for j := last + 1; j < i; j++ {
				t := float64(j-last) / float64(i-last)
				v[j] = v[last]*(1-t) + v[i]*t
			}
		}
		last = i
	}
	if last >= 0 {
		for j := last + 1; j < len(v); j++ {
			v[j] = v[last]
		}
	}
}

// derivative returns the central difference of a coarse profile.
func derivative(p Profile) (x, v []float64) {
	n := len(p.V)
	x = append([]float64(nil), p.X...)
	v = make([]float64, n)
	for i := 1; i < n-1; i++ {
		v[i] = (p.V[i+1] - p.V[i-1]) / (2 * coarsePx)
	}
	return x, v
}

// centroid returns the first moment of v over |x - peak| <= half, where peak
// is the position of the largest value.
func centroid(x, v []float64, half float64) float64 {
	pk := 0
	for i := range v {
		if v[i] > v[pk] {
			pk = i
		}
	}
	var s, sw float64
	for i := range v {
		if math.Abs(x[i]-x[pk]) <= half {
			s += v[i] * x[i]
			sw += v[i]
		}
	}
	if sw <= 0 {
		return x[pk]
	}
	return s / sw
}

// widen returns the half-width of the flat part of the window: at least
// core, grown in 0.5 px steps while the line spread function in the next
// 1 px shell (both sides together) stays above three times the standard
// error its noise alone would give. noise is the plateau noise rms and
// perBin the mean number of pixels in a coarse bin.
func widen(x, v []float64, centre, core, reach, noise, perBin float64) float64 {
	a := core
	sdBin := noise * math.Sqrt(2/math.Max(perBin, 1)) / (2 * coarsePx)
	for a+1 < reach-1 {
		var s float64
		var n int
		for i := range x {
			r := math.Abs(x[i] - centre)
			if r > a && r <= a+1 {
				s += v[i]
				n++
			}
		}
		if n == 0 || s/float64(n) < 3*sdBin/math.Sqrt(float64(n)) || s <= 0 {
			break
		}
		a += 0.5
	}
	return a
}

// profiles normalises the coarse ESF (dark 0, light 1) and LSF (peak 1)
// for display, centred on the edge and cut to the window's extent.
func profiles(esf Profile, lx, lv []float64, dark, step, centre, half float64) (Profile, Profile) {
	var e, l Profile
	peak := 0.0
	for _, v := range lv {
		peak = math.Max(peak, v)
	}
	for i, x := range esf.X {
		if math.Abs(x-centre) > half {
			continue
		}
		e.X = append(e.X, x-centre)
		e.V = append(e.V, (esf.V[i]-dark)/step)
		l.X = append(l.X, lx[i]-centre)
		if peak > 0 {
			l.V = append(l.V, lv[i]/peak)
		} else {
			l.V = append(l.V, 0)
		}
	}
	return e, l
}

// sinc is sin(pi x)/(pi x).
func sinc(x float64) float64 {
	if x == 0 {
		return 1
	}
	return math.Sin(math.Pi*x) / (math.Pi * x)
}
