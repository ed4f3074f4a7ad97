package field

import (
	"math"
	"sort"

	"sagitta/core/internal/rank"
)

// LOWESS: locally weighted regression with bisquare robustness iterations,
// after W. S. Cleveland, "Robust locally weighted regression and smoothing
// scatterplots", J. Amer. Statist. Assoc. 74 (1979) 829-836,
// https://doi.org/10.1080/01621459.1979.10481038 (section 2 for the fit,
// section 3 for the choices used here), with the local quadratic of W. S.
// Cleveland and S. J. Devlin, "Locally weighted regression: an approach to
// regression analysis by local fitting", J. Amer. Statist. Assoc. 83 (1988)
// 596-610, https://doi.org/10.1080/01621459.1988.10478639, as the other
// choice of degree.
//
// At a point x0 the q = round(span * n) points nearest in x form the
// neighbourhood; h is the distance to the farthest of them. Point k gets the
// weight
//
//	v_k = r_k * W(|x_k - x0| / h),  W(u) = (1 - u^3)^3 for u < 1, else 0 (tricube),
//
// where r_k is its robustness weight (1 in the first pass), and the fit is
// the weighted least-squares polynomial of degree 1 (a line, Cleveland 1979)
// or 2 (a parabola, Cleveland and Devlin 1988; less biased where the curve
// bends, notably at the ends of the range) through the neighbourhood,
// evaluated at x0.
// After each pass the residuals e_i give s = median |e_i| and new robustness
// weights r_i = B(e_i / (6 s)), B(u) = (1 - u^2)^2 for |u| < 1, else 0
// (bisquare). Cleveland recommends two robustness iterations; so do we.
//
// The fit is linear in the data: yhat(x0) = sum_k l_k(x0) y_k with
//
//	l_k(x0) = v_k e1' (X' V X)^-1 p(d_k),  p(d) = (1, d, d^2 for degree 2),
//	d_k = (x_k - x0)/h, X the rows p(d_k), V = diag(v_k),
//
// so with a residual scale sigma the pointwise standard error is
// se(x0) = sigma sqrt(sum_k l_k(x0)^2) (Cleveland and Devlin 1988, section
// 2; it treats the final robustness weights as fixed and ignores the
// smoothing bias).
//
// As in Cleveland's program, points closer than Delta of the range to the
// last fitted point are interpolated rather than fitted.
//
// Deviations from Cleveland (1979): the span and the degree are chosen from
// Spans and Degrees by cross-validation (see chooseSpan and clusterCV)
// instead of being fixed;
// the bisquare and the standard error use the local median residual of the
// neighbourhood instead of the global one (see localMAD); the neighbourhood
// never holds fewer than minNeighbours points, and widens until minHeights
// distinct heights carry weight (measurements cluster at equal heights);
// and when every weight of a neighbourhood is zero the robustness weights
// are dropped there.

// Spans are the candidate fractions of the points that form each local
// neighbourhood; the smoother picks one by cross-validation.
var Spans = []float64{0.1, 0.15, 0.2, 0.25, 0.33, 0.45, 0.6, 0.8}

// Degrees are the candidate degrees of the local polynomials: lines and
// parabolas.
var Degrees = []int{1, 2}

// RobustIterations is the number of bisquare robustness passes after the
// first fit (Cleveland 1979, section 3: "t = 2").
const RobustIterations = 2

// minNeighbours is the smallest neighbourhood of a local line.
const minNeighbours = 6

// minHeights is the fewest distinct heights with a non-zero weight in a
// local line (one more for a local parabola); the neighbourhood widens until
// it holds them.
const minHeights = 3

// smooth is a fitted LOWESS curve over points sorted by x.
type smooth struct {
	x, y    []float64 // data sorted by x
	rw      []float64 // final robustness weights, 0..1
	fit     []float64 // fitted values at the data
	lii     []float64 // diagonal of the smoother matrix, l_i(x_i)
	q       int       // neighbourhood size, points
	degree  int       // of the local polynomial: 1 (line) or 2 (parabola)
	span    float64   // q / n as chosen
	sigma   float64   // robust residual scale of the whole curve
	mad     float64   // median absolute residual of the whole curve
	dof     float64   // sqrt(n / (n - nu)), the scale's degrees-of-freedom factor
	absRes  []float64 // absolute residuals of the final fit
	sel     []float64 // scratch for local medians
	anchors []int     // indices fitted exactly (see Delta)
	nu      float64   // equivalent number of parameters, trace of the smoother
	cv      float64   // cross-validation score of this span
	wbuf    []float64 // scratch local weights
}

// newSmooth sorts the points by x (keeping pairs together) and returns an
// unfitted smoother. It panics if len(x) != len(y) (a programmer error).
func newSmooth(x, y []float64) *smooth {
	if len(x) != len(y) {
		panic("field: lowess x and y lengths differ")
	}
	idx := make([]int, len(x))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return x[idx[a]] < x[idx[b]] })
	s := &smooth{x: make([]float64, len(x)), y: make([]float64, len(x))}
	for i, k := range idx {
		s.x[i], s.y[i] = x[k], y[k]
	}
	s.degree = 1
	s.setAnchors()
	return s
}

// fitSpan fits the curve with a neighbourhood of round(span * n) points (at
// least minNeighbours, at most n) and iters robustness passes.
func (s *smooth) fitSpan(span float64, iters int) {
	n := len(s.x)
	s.q = min(n, max(minNeighbours, int(math.Round(span*float64(n)))))
	s.span = float64(s.q) / float64(n)
	s.rw = resize(s.rw, n)
	s.fit = resize(s.fit, n)
	s.lii = resize(s.lii, n)
	for i := range s.rw {
		s.rw[i] = 1
	}
	res := make([]float64, n)
	scale := make([]float64, n)
	for pass := 0; ; pass++ {
		for _, i := range s.anchors {
			s.fit[i], _, s.lii[i] = s.local(s.x[i], i, -1, -1)
		}
		s.interpolate(s.fit)
		s.interpolate(s.lii)
		for i := range res {
			res[i] = math.Abs(s.y[i] - s.fit[i])
		}
		m := median(append([]float64(nil), res...))
		if pass == iters || !(m > 1e-12*(1+maxAbs(s.y))) {
			break
		}
		for _, i := range s.anchors {
			scale[i] = s.localMAD(s.x[i], res, m)
		}
		s.interpolate(scale)
		for i, e := range res {
			u := e / (6 * scale[i])
			if u < 1 {
				s.rw[i] = (1 - u*u) * (1 - u*u)
			} else {
				s.rw[i] = 0
			}
		}
	}
	s.absRes = res
	// Residual scale: 1.4826 * MAD is the normal-consistent robust scale
	// (Hampel 1974; common practice), inflated by n / (n - nu) for the
	// parameters the smoother spends.
	s.nu = 0
	for _, l := range s.lii {
		s.nu += l
	}
	s.mad = median(append([]float64(nil), res...))
	s.dof = math.Sqrt(float64(n) / math.Max(float64(n)-s.nu, 1))
	s.sigma = 1.4826 * s.mad * s.dof
	s.cv = s.clusterCV()
}

// Delta is the spacing, as a fraction of the range of heights, below which
// the smoother fits only the first of several nearby points and
// interpolates the others linearly: the device of Cleveland's own program
// (its argument delta, suggested there as 0.01 of the range), which makes
// the cost grow with the number of distinct heights, not of points.
const Delta = 0.01

// setAnchors chooses the points fitted exactly: the first, each one at
// least Delta of the range beyond the last chosen, and the last.
func (s *smooth) setAnchors() {
	n := len(s.x)
	s.anchors = s.anchors[:0]
	if n == 0 {
		return
	}
	d := Delta * (s.x[n-1] - s.x[0])
	last := 0
	s.anchors = append(s.anchors, 0)
	for i := 1; i < n; i++ {
		if s.x[i]-s.x[last] >= d || i == n-1 {
			s.anchors = append(s.anchors, i)
			last = i
		}
	}
}

// interpolate fills v between anchors by linear interpolation in x; v must
// hold its values at the anchors.
func (s *smooth) interpolate(v []float64) {
	for k := 1; k < len(s.anchors); k++ {
		a, b := s.anchors[k-1], s.anchors[k]
		for i := a + 1; i < b; i++ {
			t := 0.0
			if s.x[b] > s.x[a] {
				t = (s.x[i] - s.x[a]) / (s.x[b] - s.x[a])
			}
			v[i] = v[a] + t*(v[b]-v[a])
		}
	}
}

// clusterCV returns the cross-validation score of the current fit: the
// robustness-weighted mean squared error of predicting measurements from
// the others, leaving out at once every measurement at (nearly) the same
// height. Leaving out one point at a time, which the hat-matrix
// shortcut e_i / (1 - l_ii) of a linear smoother gives (T. J. Hastie and
// R. J. Tibshirani, Generalized Additive Models (1990), section 3.4), would
// let the tied neighbours of a point predict it and favour spans that are
// too narrow; leaving out whole groups is the usual remedy for grouped data
// (common practice).
func (s *smooth) clusterCV() float64 {
	n := len(s.x)
	tol := 1e-3 * (s.x[n-1] - s.x[0])
	var num, den float64
	// The groups held out are those that begin at an anchor (see Delta):
	// at most about 1/Delta of them, so the cost does not grow with the
	// square of the number of measurements.
	for k, a := range s.anchors {
		if k > 0 && a <= s.anchors[k-1] {
			continue
		}
		b := a + 1
		for b < n && s.x[b]-s.x[b-1] <= tol {
			b++
		}
		if b-a == n {
			continue
		}
		// One fit serves the whole group: its heights differ by at most a
		// thousandth of the range per step.
		v, _, _ := s.local(s.x[a], -1, a, b)
		for i := a; i < b; i++ {
			e := s.y[i] - v
			num += s.rw[i] * e * e
			den += s.rw[i]
		}
	}
	if !(den > 0) {
		return math.Inf(1)
	}
	return num / den
}

// chooseSpan fits every span in spans with a local polynomial of each
// degree in degrees and keeps the pair with the smallest cross-validation
// score (ties go to the later, smoother choice).
func (s *smooth) chooseSpan(spans []float64, degrees []int, iters int) {
	bestF, bestD, bestCV := -1.0, 1, math.Inf(1)
	for _, d := range degrees {
		s.degree = d
		seen := map[int]bool{}
		for _, f := range spans {
			s.fitSpan(f, iters)
			if seen[s.q] {
				continue
			}
			seen[s.q] = true
			if s.cv <= bestCV {
				bestF, bestD, bestCV = f, d, s.cv
			}
		}
	}
	s.degree = bestD
	s.fitSpan(bestF, iters)
}

// local fits the weighted line at x0 and returns its value there, the sum of
// the squared smoother weights sum_k l_k(x0)^2, and l_self(x0) for the data
// index self (0 if self < 0). The data with index in [exLo, exHi) are left
// out (weight 0); pass -1, -1 to use all.
func (s *smooth) local(x0 float64, self, exLo, exHi int) (yhat, sumL2, lself float64) {
	// Measurements come in clusters of equal height (the sides of one
	// target, targets placed symmetrically about the centre), so the q
	// nearest points can hold only one or two distinct heights with a
	// non-zero weight, and the local line would be a wild extrapolation.
	// Widen the neighbourhood until minHeights distinct heights weigh in.
	q := s.q
	lo := s.windowQ(x0, q)
	h := math.Max(x0-s.x[lo], s.x[lo+q-1]-x0)
	for q < len(s.x) && s.distinct(lo, lo+q, x0, h, exLo, exHi) < minHeights+s.degree-1 {
		q = min(len(s.x), q+max(1, q/8))
		lo = s.windowQ(x0, q)
		h = math.Max(x0-s.x[lo], s.x[lo+q-1]-x0)
	}
	hi := lo + q
	s.wbuf = resize(s.wbuf, q)
	w := s.wbuf[:q]
	for pass := 0; pass < 2; pass++ {
		var V float64
		for k := lo; k < hi; k++ {
			u := 0.0
			if h > 0 {
				u = math.Abs(s.x[k]-x0) / h
			}
			t := 0.0
			if u < 1 {
				t = 1 - u*u*u
				t = t * t * t
			}
			if pass == 0 {
				t *= s.rw[k]
			}
			if k >= exLo && k < exHi {
				t = 0
			}
			w[k-lo] = t
			V += t
		}
		if V > 0 {
			break
		}
		if pass == 1 {
			// Every neighbour lies at distance h (only possible when
			// all of them sit in two clusters with x0 midway): equal weights.
			for k := range w {
				if k+lo < exLo || k+lo >= exHi {
					w[k] = 1
				}
			}
		}
	}
	// Weighted least squares in d = (x - x0)/h, which keeps the normal
	// equations well scaled (|d| <= 1); yhat is the fitted intercept.
	sc := h
	if !(sc > 0) {
		sc = 1
	}
	var m [3][3]float64
	for k := lo; k < hi; k++ {
		if w[k-lo] == 0 {
			continue
		}
		d := (s.x[k] - x0) / sc
		p := [3]float64{1, d, d * d}
		for a := 0; a < 3; a++ {
			for b := 0; b < 3; b++ {
				m[a][b] += w[k-lo] * p[a] * p[b]
			}
		}
	}
	if !(m[0][0] > 0) {
		return math.NaN(), math.NaN(), 0
	}
	// A neighbourhood that cannot carry the polynomial (too few distinct
	// heights) fits one of lower degree.
	deg := s.degree
	var c [3]float64
	for ; deg > 0; deg-- {
		var ok bool
		if c, ok = firstColumn(m, deg+1); ok {
			break
		}
	}
	if deg == 0 {
		c = [3]float64{1 / m[0][0]}
	}
	for k := lo; k < hi; k++ {
		d := (s.x[k] - x0) / sc
		lk := w[k-lo] * (c[0] + c[1]*d + c[2]*d*d)
		yhat += lk * s.y[k]
		sumL2 += lk * lk
		if k == self {
			lself = lk
		}
	}
	return yhat, sumL2, lself
}

// firstColumn returns the first column of the inverse of the leading n x n
// block of the symmetric matrix m (the coefficients that give the fitted
// intercept), by Gaussian elimination with partial pivoting; ok is false
// when a pivot falls below 1e-9 of the largest diagonal element (the local
// design cannot carry a polynomial of that degree).
func firstColumn(m [3][3]float64, n int) (c [3]float64, ok bool) {
	var a [3][4]float64
	big := 0.0
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			a[i][j] = m[i][j]
		}
		big = math.Max(big, m[i][i])
	}
	a[0][n] = 1
	for col := 0; col < n; col++ {
		p := col
		for r := col + 1; r < n; r++ {
			if math.Abs(a[r][col]) > math.Abs(a[p][col]) {
				p = r
			}
		}
		if !(math.Abs(a[p][col]) > 1e-9*big) {
			return c, false
		}
		a[col], a[p] = a[p], a[col]
		for r := 0; r < n; r++ {
			if r == col {
				continue
			}
			f := a[r][col] / a[col][col]
			for k := col; k <= n; k++ {
				a[r][k] -= f * a[col][k]
			}
		}
	}
	for i := 0; i < n; i++ {
		c[i] = a[i][n] / a[i][i]
	}
	return c, true
}

// distinct counts the distinct heights among x[lo:hi] that lie strictly
// within h of x0 (those with a non-zero tricube weight); heights within
// h/20 of the first of a run count as one (the targets of one cluster lie
// a few hundredths of a pixel apart in height).
func (s *smooth) distinct(lo, hi int, x0, h float64, exLo, exHi int) int {
	tol := h / 20
	n, last := 0, math.Inf(-1)
	for k := lo; k < hi; k++ {
		if (k < exLo || k >= exHi) && math.Abs(s.x[k]-x0) < h && s.x[k]-last > tol {
			n++
			last = s.x[k]
		}
	}
	return n
}

// window returns the first index of the q points nearest to x0 (a
// contiguous run of the sorted x).
func (s *smooth) window(x0 float64) int { return s.windowQ(x0, s.q) }

// windowQ returns the first index of the q points nearest to x0.
func (s *smooth) windowQ(x0 float64, q int) int {
	n := len(s.x)
	// Start with the run whose left end is the first x >= x0 - ..., then
	// slide: the run [lo, lo+q) moves right while the point that would
	// enter is nearer than the one that would leave.
	lo := sort.SearchFloat64s(s.x, x0) - q/2
	lo = max(0, min(lo, n-q))
	for lo > 0 && x0-s.x[lo-1] < s.x[lo+q-1]-x0 {
		lo--
	}
	for lo+q < n && s.x[lo+q]-x0 < x0-s.x[lo] {
		lo++
	}
	return lo
}

// at returns the fitted value and its standard error at x0, the latter
// from the local residual scale (see localMAD).
func (s *smooth) at(x0 float64) (value, se float64) {
	v, l2, _ := s.local(x0, -1, -1, -1)
	return v, 1.4826 * s.localMAD(x0, s.absRes, s.mad) * s.dof * math.Sqrt(l2)
}

// localMAD returns the median of the absolute residuals res over the
// neighbourhood of x0 (the q nearest points), or global when that median
// is zero. Cleveland (1979) scales the bisquare by the median over all
// points; field data are heteroscedastic (the scatter grows towards the
// corners, and a decentred lens splits the points at one height into a
// sharp and a soft group), and a global scale would then discard whole
// groups of valid outer measurements as outliers. A local scale keeps
// rejecting isolated outliers only.
func (s *smooth) localMAD(x0 float64, res []float64, global float64) float64 {
	lo := s.window(x0)
	s.sel = append(s.sel[:0], res[lo:lo+s.q]...)
	if m := median(s.sel); m > 0 {
		return m
	}
	return global
}

// median returns the median of v, reordering it; NaN for an empty slice.
func median(v []float64) float64 {
	n := len(v)
	if n == 0 {
		return math.NaN()
	}
	m := rank.Select(v, n/2)
	if n%2 == 1 {
		return m
	}
	// The lower middle is the largest of the elements before n/2.
	lo := v[0]
	for _, x := range v[1 : n/2] {
		lo = math.Max(lo, x)
	}
	return (lo + m) / 2
}

func maxAbs(v []float64) float64 {
	m := 0.0
	for _, x := range v {
		m = math.Max(m, math.Abs(x))
	}
	return m
}

// resize returns v with length n, reusing its storage when it can.
func resize(v []float64, n int) []float64 {
	if cap(v) >= n {
		return v[:n]
	}
	return make([]float64, n)
}
